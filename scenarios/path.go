package scenarios

import (
	"bytes"
	"encoding/json"
	"fmt"
	"sort"
	"strconv"
	"strings"
)

// Assignment sets the value at one JSON path of a scenario document.
//
// Path segments are object keys separated by dots, and array elements in
// brackets, either by index or, for targets, by id:
//
//	receiver.window.sidelobe_db
//	targets[1].range_m
//	targets[skiff].rcs_dbsm
//
// Value is a JSON value (a number, a quoted string, true, false).
type Assignment struct {
	Path  string
	Value json.RawMessage
}

// With returns a copy of s with each assignment applied in order to its
// canonical JSON document, decoded and validated as Decode does: a point
// that breaks a rule gets the usual *ValidationError naming the field. A
// path that does not lead anywhere gives an error wrapping ErrInvalid that
// names the path and what exists there. Missing objects on the way are
// created (a field left at its default is absent from the canonical form),
// so setting receiver.window.kind on a scenario without a window works.
func With(s *Scenario, sets ...Assignment) (*Scenario, error) {
	canon, err := Canonical(s)
	if err != nil {
		return nil, err
	}
	doc, err := decodeGeneric(canon)
	if err != nil {
		return nil, err
	}
	for _, a := range sets {
		segs, err := parsePath(a.Path)
		if err != nil {
			return nil, err
		}
		if !json.Valid(a.Value) {
			return nil, fmt.Errorf("path %s: value %s is not JSON: %w", a.Path, describe(a.Value), ErrInvalid)
		}
		val, err := decodeGeneric(a.Value)
		if err != nil {
			return nil, err
		}
		if doc, err = setPath(doc, segs, 0, a.Path, val); err != nil {
			return nil, err
		}
	}
	data, err := json.Marshal(doc)
	if err != nil {
		return nil, fmt.Errorf("encode scenario: %w", err)
	}
	return Decode(data)
}

// ParseValue turns a command-line value into JSON: anything that is JSON
// already (3.5, -20, true, "x") stays as it is, anything else (taylor) is a
// string.
func ParseValue(v string) json.RawMessage {
	t := strings.TrimSpace(v)
	if json.Valid([]byte(t)) {
		return json.RawMessage(t)
	}
	b, _ := json.Marshal(v) // a Go string always encodes
	return b
}

func decodeGeneric(data []byte) (any, error) {
	dec := json.NewDecoder(bytes.NewReader(data))
	dec.UseNumber() // keep numbers exactly as written
	var v any
	if err := dec.Decode(&v); err != nil {
		return nil, fmt.Errorf("decode %s: %w", describe(data), ErrInvalid)
	}
	return v, nil
}

// segment is one step of a path: a key, or an element by index or id.
type segment struct {
	key   string // object key, when !elem
	elem  bool
	index int    // element index, when id == ""
	id    string // element id
}

func (g segment) String() string {
	switch {
	case !g.elem:
		return g.key
	case g.id != "":
		return "[" + g.id + "]"
	}
	return "[" + strconv.Itoa(g.index) + "]"
}

// parsePath splits a.b[2].c[id] into segments.
func parsePath(p string) ([]segment, error) {
	bad := func(why string) error {
		return fmt.Errorf("path %q: %s: %w", p, why, ErrInvalid)
	}
	if p == "" {
		return nil, bad("empty")
	}
	var segs []segment
	rest := p
	for rest != "" {
		switch rest[0] {
		case '[':
			end := strings.IndexByte(rest, ']')
			if end < 0 {
				return nil, bad("'[' without ']'")
			}
			in := rest[1:end]
			if in == "" {
				return nil, bad("empty brackets")
			}
			g := segment{elem: true}
			if n, err := strconv.Atoi(in); err == nil {
				if n < 0 {
					return nil, bad("negative index " + in)
				}
				g.index = n
			} else {
				g.id = in
			}
			segs = append(segs, g)
			rest = rest[end+1:]
			if rest != "" && rest[0] != '.' && rest[0] != '[' {
				return nil, bad("expected '.' or '[' after ']'")
			}
			rest = strings.TrimPrefix(rest, ".")
		default:
			end := strings.IndexAny(rest, ".[")
			if end < 0 {
				end = len(rest)
			}
			if end == 0 {
				return nil, bad("empty key")
			}
			segs = append(segs, segment{key: rest[:end]})
			rest = rest[end:]
			if strings.HasPrefix(rest, ".") {
				rest = rest[1:]
				if rest == "" {
					return nil, bad("ends with '.'")
				}
			}
		}
	}
	return segs, nil
}

// setPath sets segs[i:] inside node to val and returns the new node.
func setPath(node any, segs []segment, i int, full string, val any) (any, error) {
	if i == len(segs) {
		return val, nil
	}
	g := segs[i]
	here := pathString(segs[:i])
	if !g.elem {
		obj, ok := node.(map[string]any)
		if node == nil {
			obj, ok = map[string]any{}, true
		}
		if !ok {
			return nil, fmt.Errorf("path %s: %s is %s, not an object with field %q: %w", full, orTop(here), kindOf(node), g.key, ErrInvalid)
		}
		child, exists := obj[g.key]
		if !exists && i+1 < len(segs) && segs[i+1].elem {
			return nil, fmt.Errorf("path %s: %s has no array %q (%s): %w", full, orTop(here), g.key, keysOf(obj), ErrInvalid)
		}
		v, err := setPath(child, segs, i+1, full, val)
		if err != nil {
			return nil, err
		}
		obj[g.key] = v
		return obj, nil
	}
	arr, ok := node.([]any)
	if !ok {
		return nil, fmt.Errorf("path %s: %s is %s, not an array: %w", full, orTop(here), kindOf(node), ErrInvalid)
	}
	k := g.index
	if g.id != "" {
		k = -1
		for j, e := range arr {
			if m, ok := e.(map[string]any); ok && m["id"] == g.id {
				k = j
				break
			}
		}
		if k < 0 {
			return nil, fmt.Errorf("path %s: %s has no element with id %q (%s): %w", full, here, g.id, idsOf(arr), ErrInvalid)
		}
	} else if k >= len(arr) {
		return nil, fmt.Errorf("path %s: %s has %d element(s), so index %d does not exist (%s): %w", full, here, len(arr), k, idsOf(arr), ErrInvalid)
	}
	v, err := setPath(arr[k], segs, i+1, full, val)
	if err != nil {
		return nil, err
	}
	arr[k] = v
	return arr, nil
}

func pathString(segs []segment) string {
	var b strings.Builder
	for i, g := range segs {
		if i > 0 && !g.elem {
			b.WriteByte('.')
		}
		b.WriteString(g.String())
	}
	return b.String()
}

func orTop(p string) string {
	if p == "" {
		return "the scenario"
	}
	return p
}

func kindOf(v any) string {
	switch v := v.(type) {
	case map[string]any:
		return "an object"
	case []any:
		return "an array"
	case string:
		return fmt.Sprintf("the string %q", v)
	case json.Number:
		return "the number " + v.String()
	case bool:
		return fmt.Sprintf("%v", v)
	}
	return "null"
}

func keysOf(m map[string]any) string {
	keys := make([]string, 0, len(m))
	for k := range m {
		keys = append(keys, k)
	}
	sort.Strings(keys)
	return "fields set here: " + strings.Join(keys, ", ")
}

func idsOf(arr []any) string {
	var ids []string
	for i, e := range arr {
		if m, ok := e.(map[string]any); ok {
			if id, ok := m["id"].(string); ok {
				ids = append(ids, fmt.Sprintf("[%d] %s", i, id))
			}
		}
	}
	if len(ids) == 0 {
		return "it is empty"
	}
	return "elements: " + strings.Join(ids, ", ")
}
