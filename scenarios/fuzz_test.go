package scenarios

import (
	"reflect"
	"testing"
)

// FuzzDecode checks that no document makes Decode panic, and that every
// accepted document survives the canonical round trip. The seed corpus is
// in testdata/fuzz/FuzzDecode plus the demos.
func FuzzDecode(f *testing.F) {
	for _, name := range demoNames() {
		data, _ := demoFS.ReadFile("demos/" + name + ".json")
		f.Add(data)
	}
	f.Add([]byte(`{"version":2,"waveform":{"kind":"phase_code","binary":"+-+","chip_s":1e-6},"view":{"a":[1,{"b":null}]}}`))
	f.Add([]byte(`{"version":2,"waveform":{"kind":"samples","sample_rate_hz":2e6,"bandwidth_hz":1e6,"i":[1,0.5,-1],"q":[0,1,0]},"receiver":{"filter":"custom","taps":{"amplitude":[1,1],"phase_deg":[0,90]}}}`))
	f.Add([]byte(`{"version":2,"radar":{"pri_s":1e-3,"pulses":8,"schedule":{"cpis":[{"pri_s":1.1e-3},{"pri_s":9e-4,"pulses":4}],"m":2}},"waveform":{"kind":"lfm","pulse_width_s":1e-5,"bandwidth_hz":1e6}}`))
	f.Add([]byte(`{"version":2,"radar":{"pulses":8,"pri_stagger_s":[1e-4,1.25e-4],"schedule":{"cpis":[{"pri_stagger_s":[1.1e-4,1.3e-4,1.2e-4]}],"m":1}},"waveform":{"kind":"lfm","pulse_width_s":1e-5,"bandwidth_hz":1e6}}`))
	f.Add([]byte(`{"version":2,"radar":{"pri_s":1e-3,"pulses":8,"scan":{"rate_deg_s":60,"plane":"elevation","pattern":"sinc"}},"waveform":{"kind":"lfm","pulse_width_s":1e-5,"bandwidth_hz":1e6}}`))
	f.Fuzz(func(t *testing.T, data []byte) {
		s, err := Decode(data)
		if err != nil {
			return
		}
		canon, err := Canonical(s)
		if err != nil {
			t.Fatalf("canonical: %v", err)
		}
		again, err := Decode(canon)
		if err != nil {
			t.Fatalf("canonical form rejected: %v\n%s", err, canon)
		}
		// An older document is written in the current version: only the
		// record of its upgrade differs.
		s.ReadVersion, s.Upgraded = 0, nil
		if !reflect.DeepEqual(s, again) {
			t.Fatalf("round trip differs for %s", canon)
		}
	})
}

// FuzzParseLink checks that no link makes ParseLink panic and that an
// accepted link re-encodes to an equal scenario.
func FuzzParseLink(f *testing.F) {
	for _, name := range demoNames() {
		d, _ := LoadDemo(name)
		link, _ := Link(d.Scenario)
		f.Add(link)
	}
	f.Add("#s=")
	f.Add("s=AAAA")
	f.Fuzz(func(t *testing.T, link string) {
		s, err := ParseLink(link)
		if err != nil {
			return
		}
		l2, err := Link(s)
		if err != nil {
			t.Fatal(err)
		}
		s2, err := ParseLink(l2)
		s.ReadVersion, s.Upgraded = 0, nil // an older link is re-encoded in the current version
		if err != nil || !reflect.DeepEqual(s, s2) {
			t.Fatalf("re-encoded link differs: %v", err)
		}
	})
}
