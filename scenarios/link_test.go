package scenarios

import (
	"bytes"
	"compress/flate"
	"encoding/base64"
	"errors"
	"reflect"
	"strings"
	"testing"
)

func deflateLink(t *testing.T, data []byte) string {
	t.Helper()
	var buf bytes.Buffer
	zw, _ := flate.NewWriter(&buf, flate.BestCompression)
	zw.Write(data)
	zw.Close()
	return "#s=" + base64.RawURLEncoding.EncodeToString(buf.Bytes())
}

func TestLinkForms(t *testing.T) {
	d, err := LoadDemo(DefaultDemo)
	if err != nil {
		t.Fatal(err)
	}
	link, err := Link(d.Scenario)
	if err != nil {
		t.Fatal(err)
	}
	if !strings.HasPrefix(link, "/#s=") {
		t.Fatalf("link %q does not start with /#s=", link)
	}
	frag := strings.TrimPrefix(link, "/")
	for _, form := range []string{"http://127.0.0.1:8750" + link, "https://example.test:9/x?y=1" + link, frag, strings.TrimPrefix(frag, "#"), "  " + frag + "\n"} {
		s, err := ParseLink(form)
		if err != nil {
			t.Fatalf("%q: %v", form[:20], err)
		}
		if !reflect.DeepEqual(s, d.Scenario) {
			t.Fatalf("%q: scenario differs", form[:20])
		}
	}
}

func TestBadLinks(t *testing.T) {
	good, _ := Link(mustDemo(t))
	bomb := deflateLink(t, bytes.Repeat([]byte(" "), 64<<20)) // 64 MiB of spaces, about 64 KiB compressed
	tests := []struct{ name, link, want string }{
		{"no fragment", "http://127.0.0.1:8750/", `no "#s=" part`},
		{"empty", "#s=", "empty scenario part"},
		{"not base64", "#s=ab$cd", "not base64url"},
		{"truncated", good[:len(good)/2], "cut short"},
		{"corrupt", "#s=" + base64.RawURLEncoding.EncodeToString([]byte{0xff, 0xfe, 0x00, 0x12, 0x34}), "corrupt"},
		{"bomb", bomb, "inflates past the limit"},
		{"unknown version", deflateLink(t, []byte(`{"version":7,"waveform":{"kind":"rect","pulse_width_s":1e-6}}`)), "version: 7 is not supported (supported versions: 1, 2, 3)"},
		{"invalid scenario", deflateLink(t, []byte(`{"version":2,"waveform":{"kind":"rect","pulse_width_s":-1}}`)), "waveform.pulse_width_s: -1 must be above 0"},
		{"oversized", "#s=" + strings.Repeat("A", maxLinkChars+1), "exceed the limit"},
	}
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			s, err := ParseLink(tt.link)
			if err == nil {
				t.Fatalf("accepted, got %+v", s)
			}
			if !errors.Is(err, ErrInvalid) {
				t.Errorf("error %v does not match ErrInvalid", err)
			}
			if !strings.Contains(err.Error(), tt.want) {
				t.Errorf("error %q does not contain %q", err, tt.want)
			}
		})
	}
}

func mustDemo(t testing.TB) *Scenario {
	t.Helper()
	d, err := LoadDemo(DefaultDemo)
	if err != nil {
		t.Fatal(err)
	}
	return d.Scenario
}

// TestLinkerReuse: links made one after another by one Linker (its
// compressor reset between them) are those Link makes afresh.
func TestLinkerReuse(t *testing.T) {
	demos, err := Demos()
	if err != nil {
		t.Fatal(err)
	}
	var l Linker
	for range 2 {
		for _, d := range demos {
			got, err := l.Link(d.Scenario)
			if err != nil {
				t.Fatal(err)
			}
			want, err := Link(d.Scenario)
			if err != nil {
				t.Fatal(err)
			}
			if got != want {
				t.Errorf("%s: reused linker gives %.60s…, fresh %.60s…", d.Name, got, want)
			}
		}
	}
}
