package scenarios

import (
	"errors"
	"strings"
	"testing"
)

// TestDecodeEncoding: a BOM and bytes that are not UTF-8 are refused
// with a message that says so and names the field, where encoding/json
// alone would accept the BOM as an error about an invalid character and
// replace bad bytes with U+FFFD silently.
func TestDecodeEncoding(t *testing.T) {
	good := `{"version":2,"name":"ok","waveform":{"kind":"barker","length":13,"chip_s":1e-6},"targets":[{"id":"a","kind":"point","range_m":5000,"rcs_dbsm":0},{"id":"b","kind":"point","range_m":6000,"rcs_dbsm":0}]}`
	if _, err := Decode([]byte(good)); err != nil {
		t.Fatal(err)
	}
	tests := []struct {
		name, doc, path, want string
	}{
		{"bom", "\xEF\xBB\xBF" + good, "", "byte order mark (BOM"},
		{"name", strings.Replace(good, `"name":"ok"`, "\"name\":\"o\xffk\"", 1), "name", "not valid UTF-8"},
		{"target id", strings.Replace(good, `"id":"b"`, "\"id\":\"b\xc3\"", 1), "targets[1].id", "not valid UTF-8"},
		{"key", strings.Replace(good, `"chip_s"`, "\"chip\xfe_s\"", 1), "waveform", "not valid UTF-8"},
	}
	for _, tt := range tests {
		_, err := Decode([]byte(tt.doc))
		var ve *ValidationError
		if !errors.As(err, &ve) || len(ve.Fields) != 1 {
			t.Errorf("%s: %v", tt.name, err)
			continue
		}
		f := ve.Fields[0]
		if !strings.HasPrefix(f.Path, tt.path) || !strings.Contains(f.Message, tt.want) {
			t.Errorf("%s: %s: %s; want path %q and %q", tt.name, f.Path, f.Message, tt.path, tt.want)
		}
	}
}

// TestLongNamesClipped: a 5 000-character name or key is not echoed in
// full.
func TestLongNamesClipped(t *testing.T) {
	long := strings.Repeat("x", 5000)
	if err := ValidName(long); err == nil || len(err.Error()) > 300 || !strings.Contains(err.Error(), "5000 characters") {
		t.Errorf("ValidName: %.400v", err)
	}
	_, err := Decode([]byte(`{"version":2,"` + long + `":1,"waveform":{"kind":"` + long + `"}}`))
	if err == nil || len(err.Error()) > 1500 {
		t.Errorf("Decode echoes %d bytes: %.300v", len(err.Error()), err)
	}
}
