package scenarios

import (
	"errors"
	"strconv"
	"strings"
	"testing"
)

// ftoa formats v in the shortest form that reads back exactly; tests of
// several files build JSON with it.
func ftoa(v float64) string { return strconv.FormatFloat(v, 'g', -1, 64) }

// wantFieldError reports a test error unless err is a *ValidationError
// with a field at path whose message contains words; what names the case
// in the message.
func wantFieldError(t *testing.T, what any, err error, path, words string) {
	t.Helper()
	var ve *ValidationError
	if !errors.As(err, &ve) {
		t.Errorf("%v: error %v, want a ValidationError", what, err)
		return
	}
	for _, f := range ve.Fields {
		if f.Path == path && strings.Contains(f.Message, words) {
			return
		}
	}
	t.Errorf("%v: errors %v, want %s: …%s…", what, ve.Fields, path, words)
}
