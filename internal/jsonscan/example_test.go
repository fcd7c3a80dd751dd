package jsonscan_test

import (
	"errors"
	"fmt"

	"github.com/bowline/bowline/internal/jsonscan"
)

// A decoder reads the members it knows and skips the others.
func ExampleScanner_Object() {
	data := []byte(`{"id": 7, "text": "caf\u00e9 on Quill Square", "tags": ["a", "b"]}`)
	s := jsonscan.New(data)
	var buf []byte
	err := s.Object(func(key []byte) error {
		switch string(key) {
		case "id":
			id, err := s.Int64()
			fmt.Println("id", id)
			return err
		case "text":
			text, copied, err := s.String(buf[:0])
			if copied {
				buf = text
			}
			fmt.Printf("text %q\n", text)
			return err
		}
		_, err := s.Skip()
		return err
	})
	if err == nil {
		err = s.End()
	}
	fmt.Println(err)
	// Output:
	// id 7
	// text "café on Quill Square"
	// <nil>
}

func ExampleParseError() {
	s := jsonscan.New([]byte(`{"id": 7,}`))
	_, err := s.Skip()
	fmt.Println(err)
	var pe *jsonscan.ParseError
	if errors.As(err, &pe) {
		fmt.Println(pe.Offset, errors.Is(err, jsonscan.ErrEnd))
	}
	_, err = jsonscan.New([]byte(`[1, 2`)).Skip()
	fmt.Println(err, errors.Is(err, jsonscan.ErrEnd))
	// Output:
	// parse error at byte 9: invalid character '}' looking for the beginning of an object key
	// 9 false
	// parse error at byte 5: unexpected end of JSON input true
}
