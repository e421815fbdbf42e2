package main

import (
	"fmt"
	"io"
	"unicode/utf8"
)

// termSafe wraps a writer bound for a terminal: every control character
// but newline and tab (C0, DEL, C1, and the bidirectional overrides
// that reorder what is shown) is written as a \u escape, so that a
// scenario's name or target id cannot move the cursor, retitle the
// window or hide text. In JSON the escape is the same string value, so
// JSON output stays valid and equal.
type termSafe struct {
	w    io.Writer
	tail []byte // an incomplete UTF-8 sequence held until the next write
}

func newTermSafe(w io.Writer) *termSafe { return &termSafe{w: w} }

// unsafeRune reports whether r must not reach a terminal raw.
func unsafeRune(r rune) bool {
	switch {
	case r == '\n' || r == '\t':
		return false
	case r < 0x20, r == 0x7f, r >= 0x80 && r <= 0x9f:
		return true
	case r >= 0x202a && r <= 0x202e, r >= 0x2066 && r <= 0x2069, r == 0x200e, r == 0x200f, r == 0x061c:
		return true
	}
	return false
}

func (t *termSafe) Write(p []byte) (int, error) {
	n := len(p)
	data := append(t.tail, p...)
	t.tail = nil
	out := make([]byte, 0, len(data))
	for i := 0; i < len(data); {
		r, size := utf8.DecodeRune(data[i:])
		if r == utf8.RuneError && size <= 1 {
			if !utf8.FullRune(data[i:]) {
				t.tail = append([]byte(nil), data[i:]...)
				break
			}
			out = append(out, fmt.Sprintf(`\u%04x`, utf8.RuneError)...)
			i++
			continue
		}
		if unsafeRune(r) {
			out = append(out, fmt.Sprintf(`\u%04x`, r)...)
		} else {
			out = append(out, data[i:i+size]...)
		}
		i += size
	}
	if _, err := t.w.Write(out); err != nil {
		return 0, err
	}
	return n, nil
}
