package scenarios

import (
	"errors"
	"strings"
	"testing"
)

func demoScenario(t *testing.T, name string) *Scenario {
	t.Helper()
	d, err := LoadDemo(name)
	if err != nil {
		t.Fatal(err)
	}
	return d.Scenario
}

func TestWithSetsFields(t *testing.T) {
	base := demoScenario(t, "harbour-skiff")
	s, err := With(base,
		Assignment{"receiver.window.kind", ParseValue("taylor")},
		Assignment{"receiver.window.sidelobe_db", ParseValue("-42")},
		Assignment{"targets[1].range_m", ParseValue("6400")},
		Assignment{"targets[pilot-boat].rcs_dbsm", ParseValue("12.5")},
		Assignment{"waveform.bandwidth_hz", ParseValue("2e7")},
		Assignment{"radar.pulses", ParseValue("4")},
	)
	if err != nil {
		t.Fatal(err)
	}
	if w := s.Receiver.Window; w.Kind != WindowTaylor || w.SidelobeDB != -42 || w.NBar != 5 {
		t.Errorf("window %+v, want taylor −42 dB with the default n̄ 5", w)
	}
	if s.Targets[1].RangeM != 6400 || s.Targets[2].RCSDBsm != 12.5 || s.Radar.Pulses != 4 {
		t.Errorf("targets %+v, pulses %d", s.Targets, s.Radar.Pulses)
	}
	// The sample rate was left at its default, 2·B, so it follows the
	// bandwidth (scenario-format.md, radar table).
	if s.Waveform.BandwidthHz != 2e7 || s.Radar.SampleRateHz != 4e7 {
		t.Errorf("bandwidth %g, sample rate %g", s.Waveform.BandwidthHz, s.Radar.SampleRateHz)
	}
	// The base is untouched.
	if base.Receiver.Window.Kind != WindowNone || base.Targets[1].RangeM != 6300 {
		t.Errorf("base changed: %+v", base.Receiver.Window)
	}
}

func TestWithErrors(t *testing.T) {
	base := demoScenario(t, "harbour-skiff")
	tests := []struct {
		path, value string
		want        []string
	}{
		{"targets[7].range_m", "1", []string{"targets has 3 element(s), so index 7 does not exist", "[1] skiff"}},
		{"targets[dinghy].range_m", "1", []string{`no element with id "dinghy"`, "[0] tanker"}},
		{"receiver.windw.kind", "taylor", []string{"receiver.windw: unknown field (fields here: filter"}},
		{"waveform.kind.x", "1", []string{`waveform.kind is the string "lfm", not an object`}},
		{"waveform[0]", "1", []string{"waveform is an object, not an array"}},
		{"radar.carrier_hz", "-5", []string{"radar.carrier_hz: -5"}},
		{"receiver.window.sidelobe_db", "-30", []string{"receiver.window.kind: required"}},
		{"targets..x", "1", []string{"empty key"}},
		{"targets[1", "1", []string{"'[' without ']'"}},
	}
	for _, tt := range tests {
		_, err := With(base, Assignment{tt.path, ParseValue(tt.value)})
		if err == nil || !errors.Is(err, ErrInvalid) {
			t.Errorf("%s=%s: error %v, want one wrapping ErrInvalid", tt.path, tt.value, err)
			continue
		}
		for _, w := range tt.want {
			if !strings.Contains(err.Error(), w) {
				t.Errorf("%s=%s: error %q lacks %q", tt.path, tt.value, err, w)
			}
		}
	}
}

func TestParseAxis(t *testing.T) {
	tests := []struct {
		spec string
		want string
	}{
		{"receiver.window.sidelobe_db=-20:-45:-5", "-20 -25 -30 -35 -40 -45"},
		{"targets[1].range_m=0.1:0.5:0.1", "0.1 0.2 0.3 0.4 0.5"},
		{"x=1:2:0.3", "1 1.3 1.6 1.9"},
		{"receiver.window.kind=taylor", "taylor"},
		{"receiver.window.kind=hann,hamming", "hann hamming"},
	}
	for _, tt := range tests {
		a, err := ParseAxis(tt.spec)
		if err != nil {
			t.Fatalf("%s: %v", tt.spec, err)
		}
		var got []string
		for i := range a.Values {
			got = append(got, a.Label(i))
		}
		if strings.Join(got, " ") != tt.want {
			t.Errorf("%s: values %v, want %s", tt.spec, got, tt.want)
		}
	}
	for _, bad := range []string{"x", "x=", "=1", "x=1:2:0", "x=1:2:-1", "x=1:a:1", "x=1:2", "x=0:1e9:1"} {
		if _, err := ParseAxis(bad); !errors.Is(err, ErrInvalid) {
			t.Errorf("%q: error %v, want ErrInvalid", bad, err)
		}
	}
}
