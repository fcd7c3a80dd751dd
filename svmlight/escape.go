package svmlight

// appendEscaped appends s to dst with backslash, tab, newline and carriage
// return written as \\, \t, \n and \r. When controls is true, every other
// ASCII control character (U+0000–U+001F and U+007F) is written as \xHH with
// two lower-case hex digits. All other bytes, including non-ASCII UTF-8, are
// copied unchanged.
func appendEscaped(dst []byte, s string, controls bool) []byte {
	const hexdig = "0123456789abcdef"
	for i := 0; i < len(s); i++ {
		c := s[i]
		switch {
		case c == '\\':
			dst = append(dst, '\\', '\\')
		case c == '\t':
			dst = append(dst, '\\', 't')
		case c == '\n':
			dst = append(dst, '\\', 'n')
		case c == '\r':
			dst = append(dst, '\\', 'r')
		case controls && (c < 0x20 || c == 0x7f):
			dst = append(dst, '\\', 'x', hexdig[c>>4], hexdig[c&15])
		default:
			dst = append(dst, c)
		}
	}
	return dst
}

func unhex(c byte) (byte, bool) {
	switch {
	case '0' <= c && c <= '9':
		return c - '0', true
	case 'a' <= c && c <= 'f':
		return c - 'a' + 10, true
	case 'A' <= c && c <= 'F':
		return c - 'A' + 10, true
	}
	return 0, false
}

// unescape reverses appendEscaped. With strict set, a backslash that does not
// begin one of the sequences \\ \t \n \r (or \xHH when hex is set) is an
// error, reported with the byte offset of the backslash; without it such a
// backslash is kept literally.
func unescape(b []byte, hex, strict bool) (string, int, bool) {
	i0 := -1
	for i, c := range b {
		if c == '\\' {
			i0 = i
			break
		}
	}
	if i0 < 0 {
		return string(b), 0, true
	}
	out := make([]byte, 0, len(b))
	out = append(out, b[:i0]...)
	for i := i0; i < len(b); i++ {
		c := b[i]
		if c != '\\' {
			out = append(out, c)
			continue
		}
		var next byte
		if i+1 < len(b) {
			next = b[i+1]
		}
		switch next {
		case '\\':
			out = append(out, '\\')
			i++
			continue
		case 't':
			out = append(out, '\t')
			i++
			continue
		case 'n':
			out = append(out, '\n')
			i++
			continue
		case 'r':
			out = append(out, '\r')
			i++
			continue
		case 'x':
			if hex && i+3 < len(b) {
				h, ok1 := unhex(b[i+2])
				l, ok2 := unhex(b[i+3])
				if ok1 && ok2 {
					out = append(out, h<<4|l)
					i += 3
					continue
				}
			}
		}
		if strict {
			return "", i, false
		}
		out = append(out, c)
	}
	return string(out), 0, true
}
