package scenarios

import (
	"bytes"
	"encoding/json"
	"fmt"
	"strconv"
	"unicode/utf8"
)

// Clip returns s for echoing in a message: at most n characters, with
// the cut marked and the full length given, so that a 5 000-character
// name does not fill a terminal or a response.
func Clip(s string, n int) string {
	if utf8.RuneCountInString(s) <= n {
		return s
	}
	r := []rune(s)
	return string(r[:n]) + fmt.Sprintf("… (%d characters)", len(r))
}

// clipQ is Clip quoted, for %s in messages that would use %q.
func clipQ(s string) string { return strconv.Quote(Clip(s, echoLen)) }

// echoLen is how many characters of a user's string an error repeats.
const echoLen = 60

// checkEncoding finds what encoding/json would silently accept or
// mangle: a UTF-8 byte order mark at the start, and bytes that are not
// UTF-8 (which it replaces with U+FFFD). The error names the field whose
// string holds the first bad byte, found by walking the tokens up to it.
func checkEncoding(data []byte) *FieldError {
	if bytes.HasPrefix(data, []byte{0xEF, 0xBB, 0xBF}) {
		return &FieldError{Message: "the document starts with a UTF-8 byte order mark (BOM, bytes EF BB BF); save it as UTF-8 without a BOM"}
	}
	if utf8.Valid(data) {
		return nil
	}
	bad := 0
	for bad < len(data) {
		r, size := utf8.DecodeRune(data[bad:])
		if r == utf8.RuneError && size <= 1 {
			break
		}
		bad += size
	}
	path := pathAt(data, bad)
	return &FieldError{Path: path, Message: fmt.Sprintf("byte %d (0x%02X) is not valid UTF-8; the document must be UTF-8 text", bad, data[bad])}
}

// pathAt returns the JSON path (radar.name, targets[2].id) of the value
// or key whose token spans byte offset off, "" when none does.
func pathAt(data []byte, off int) string {
	type frame struct {
		array bool
		key   string
		index int
		inKey bool // an object waiting for its next key
	}
	var stack []frame
	path := func() string {
		p := ""
		for _, f := range stack {
			switch {
			case f.array:
				p += fmt.Sprintf("[%d]", f.index)
			case f.key != "":
				if p != "" {
					p += "."
				}
				p += f.key
			}
		}
		return p
	}
	dec := json.NewDecoder(bytes.NewReader(data))
	for {
		tok, err := dec.Token()
		if err != nil {
			return path()
		}
		end := int(dec.InputOffset())
		top := len(stack) - 1
		switch t := tok.(type) {
		case json.Delim:
			switch t {
			case '{':
				stack = append(stack, frame{inKey: true})
			case '[':
				stack = append(stack, frame{array: true, index: 0})
			default:
				stack = stack[:top]
				top--
				if top >= 0 {
					advance(&stack[top].array, &stack[top].index, &stack[top].inKey)
				}
			}
			continue
		case string:
			if top >= 0 && !stack[top].array && stack[top].inKey {
				stack[top].key = Clip(t, echoLen)
				stack[top].inKey = false
				if end > off {
					return path()
				}
				continue
			}
		}
		if end > off {
			return path()
		}
		if top >= 0 {
			advance(&stack[top].array, &stack[top].index, &stack[top].inKey)
		}
	}
}

// advance moves a container past one value: an array to its next index,
// an object back to waiting for a key.
func advance(array *bool, index *int, inKey *bool) {
	if *array {
		*index++
	} else {
		*inKey = true
	}
}
