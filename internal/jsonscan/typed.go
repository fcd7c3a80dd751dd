package jsonscan

import (
	"math"
	"strconv"
)

// Int64 reads the number at the scan as encoding/json stores one in an
// int64: an integer without fraction or exponent, in the int64 range.
func (s *Scanner) Int64() (int64, error) {
	s.space()
	start := s.pos
	mag, neg, err := s.integer(true)
	switch {
	case err != nil:
		return 0, err
	case neg && mag <= 1<<63:
		return -int64(mag), nil // -(1<<63) wraps to math.MinInt64
	case !neg && mag <= math.MaxInt64:
		return int64(mag), nil
	}
	return 0, s.unread(start)
}

// Uint64 reads the number at the scan as encoding/json stores one in a
// uint64: an integer without fraction, exponent or minus sign, in the
// uint64 range.
func (s *Scanner) Uint64() (uint64, error) {
	s.space()
	mag, _, err := s.integer(false)
	return mag, err
}

// integer reads the integer literal at the scan (white space skipped)
// and returns its magnitude and sign (signed false: a minus sign is
// refused). The scan of a number refused is moved back to its first byte.
func (s *Scanner) integer(signed bool) (mag uint64, neg bool, err error) {
	data, i := s.data, s.pos
	if i < len(data) && data[i] == '-' {
		neg = true
		i++
	}
	first := i
	// 19 digits cannot overflow a uint64.
	for i < len(data) && i-first < 19 && data[i] >= '0' && data[i] <= '9' {
		mag = mag*10 + uint64(data[i]-'0')
		i++
	}
	if i == first || neg && !signed || data[first] == '0' && i-first > 1 ||
		i < len(data) && (data[i] >= '0' && data[i] <= '9' || data[i] == '.' || data[i] == 'e' || data[i] == 'E') {
		return s.parseInteger(signed, s.pos)
	}
	s.pos = i
	return mag, neg, nil
}

// parseInteger is integer for what its fast path does not take: a long
// literal, a value that is not an integer, or bad syntax.
func (s *Scanner) parseInteger(signed bool, start int) (uint64, bool, error) {
	if s.pos == len(s.data) || kindOf[s.data[s.pos]] != Number {
		return 0, false, s.mismatch()
	}
	lit, err := s.number()
	if err != nil {
		return 0, false, err
	}
	if signed {
		v, err := strconv.ParseInt(string(lit), 10, 64)
		if err != nil {
			return 0, false, s.unread(start)
		}
		if v < 0 {
			return uint64(-v), true, nil // -math.MinInt64 wraps to itself: 1<<63 as a uint64
		}
		return uint64(v), false, nil
	}
	v, err := strconv.ParseUint(string(lit), 10, 64)
	if err != nil {
		return 0, false, s.unread(start)
	}
	return v, false, nil
}

// Float64 reads the number at the scan as encoding/json stores one in a
// float64: strconv.ParseFloat of the literal, in the float64 range.
func (s *Scanner) Float64() (float64, error) {
	s.space()
	start := s.pos
	if s.pos == len(s.data) || kindOf[s.data[s.pos]] != Number {
		return 0, s.mismatch()
	}
	lit, err := s.number()
	if err != nil {
		return 0, err
	}
	v, err := strconv.ParseFloat(string(lit), 64)
	if err != nil {
		return 0, s.unread(start)
	}
	return v, nil
}

// Bool reads true or false.
func (s *Scanner) Bool() (bool, error) {
	s.space()
	if s.pos < len(s.data) {
		switch s.data[s.pos] {
		case 't':
			return true, s.literal("true")
		case 'f':
			return false, s.literal("false")
		}
	}
	return false, s.mismatch()
}

// unread moves the scan back to start, the first byte of the number just
// read, which its type cannot hold, and returns ErrType.
func (s *Scanner) unread(start int) error {
	s.pos = start
	return &ParseError{Offset: s.pos, Err: ErrType}
}
