package scenarios

import (
	"errors"
	"fmt"
	"strings"
)

// Error kinds. Use errors.Is to classify an error returned by this package.
var (
	// ErrInvalid marks a scenario, link or name that the user must correct.
	ErrInvalid = errors.New("invalid")
	// ErrNotFound marks a demo or saved scenario that does not exist.
	ErrNotFound = errors.New("not found")
	// ErrConflict marks a write against a stale revision.
	ErrConflict = errors.New("conflict")
	// ErrTooLarge marks input over a size limit.
	ErrTooLarge = errors.New("too large")
)

// FieldError is one problem with one field: Path is its JSON path
// (targets[3].range_m), Message says what is wrong, with the value and the
// valid range.
type FieldError struct {
	Path    string `json:"path"`
	Message string `json:"message"`
}

func (e FieldError) Error() string {
	if e.Path == "" {
		return e.Message
	}
	return e.Path + ": " + e.Message
}

// ValidationError holds every problem found in one scenario. It matches
// ErrInvalid under errors.Is.
type ValidationError struct {
	Fields []FieldError
}

func (e *ValidationError) Error() string {
	msgs := make([]string, len(e.Fields))
	for i, f := range e.Fields {
		msgs[i] = f.Error()
	}
	return strings.Join(msgs, "\n")
}

// Is reports whether target is ErrInvalid.
func (e *ValidationError) Is(target error) bool { return target == ErrInvalid }

// errList collects field errors, at most one per path, so that a field
// that failed to decode is not reported again by a range check.
type errList struct {
	fields []FieldError
	seen   map[string]bool
}

func (l *errList) add(path, format string, args ...any) {
	if l.seen == nil {
		l.seen = make(map[string]bool)
	}
	if l.seen[path] {
		return
	}
	l.seen[path] = true
	l.fields = append(l.fields, FieldError{Path: path, Message: fmt.Sprintf(format, args...)})
}

// mark records path as failed without a message of its own, when an
// error on an element of it was reported.
func (l *errList) mark(path string) {
	if l.seen == nil {
		l.seen = make(map[string]bool)
	}
	l.seen[path] = true
}

func (l *errList) has(path string) bool { return l.seen[path] }

func (l *errList) err() error {
	if len(l.fields) == 0 {
		return nil
	}
	return &ValidationError{Fields: l.fields}
}
