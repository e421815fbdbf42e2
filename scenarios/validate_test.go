package scenarios

import (
	"errors"
	"fmt"
	"runtime"
	"strings"
	"testing"
)

const okWave = `"waveform":{"kind":"lfm","pulse_width_s":1e-5,"bandwidth_hz":1e6}`

// TestBadScenarios checks that each bad input gets an error naming the
// JSON path, the value and the valid range, as the format's Errors section
// asks (scenario-format.md: `targets[3].range_m: -5 is below the minimum 0`).
func TestBadScenarios(t *testing.T) {
	tests := []struct {
		name, doc string
		want      []string // each must appear in one error line
	}{
		{"spec example", `{"version":2,` + okWave + `,"targets":[{"id":"a","kind":"point","range_m":1,"rcs_dbsm":0},{"id":"b","kind":"point","range_m":1,"rcs_dbsm":0},{"id":"c","kind":"point","range_m":1,"rcs_dbsm":0},{"id":"d","kind":"point","range_m":-5,"rcs_dbsm":0}]}`,
			[]string{"targets[3].range_m: -5 is below the minimum 0"}},
		{"version missing", `{` + okWave + `}`, []string{"version: required", "supported: 1"}},
		{"version 4", `{"version":4}`, []string{"version: 4 is not supported (supported versions: 1, 2, 3)"}},
		{"not an object", `[1,2]`, []string{"is not a JSON object"}},
		{"broken json", `{"version":2,`, []string{"not valid JSON"}},
		{"empty", ``, []string{"empty input"}},
		{"unknown top field", `{"version":2,` + okWave + `,"colour":"red"}`, []string{"colour: unknown field"}},
		{"unknown radar field", `{"version":2,` + okWave + `,"radar":{"carrier":1}}`, []string{"radar.carrier: unknown field", "carrier_hz"}},
		{"waveform missing", `{"version":2}`, []string{"waveform: required"}},
		{"waveform kind unknown", `{"version":2,"waveform":{"kind":"chirp"}}`, []string{`waveform.kind: "chirp" is not one of rect, lfm`}},
		{"field of other kind", `{"version":2,"waveform":{"kind":"lfm","pulse_width_s":1e-5,"bandwidth_hz":1e6,"length":13}}`, []string{`waveform.length: not a field of kind "lfm"`}},
		{"carrier range", `{"version":2,` + okWave + `,"radar":{"carrier_hz":5e11}}`, []string{"radar.carrier_hz: 5e+11 is above the maximum 3e+11"}},
		{"power zero", `{"version":2,` + okWave + `,"radar":{"peak_power_w":0}}`, []string{"radar.peak_power_w: 0 must be above 0"}},
		{"string for number", `{"version":2,` + okWave + `,"radar":{"noise_figure_db":"3"}}`, []string{`radar.noise_figure_db: "3" is not a number`}},
		{"pulses int", `{"version":2,` + okWave + `,"radar":{"pulses":2.5}}`, []string{"radar.pulses: 2.5 is not an integer"}},
		{"pulses range", `{"version":2,` + okWave + `,"radar":{"pulses":2000}}`, []string{"radar.pulses: 2000 is outside the valid range 1 … 1024"}},
		{"sample rate below B", `{"version":2,` + okWave + `,"radar":{"sample_rate_hz":5e5}}`, []string{"radar.sample_rate_hz: 500000 is below the minimum 1e+06"}},
		{"pri below tau", `{"version":2,` + okWave + `,"radar":{"pri_s":5e-6}}`, []string{"radar.pri_s: 5e-06 must be above 1e-05"}},
		{"window order", `{"version":2,` + okWave + `,"radar":{"window_start_m":5000,"window_stop_m":4000}}`, []string{"radar.window_stop_m: 4000 must be above 5000"}},
		{"window too many samples", `{"version":2,` + okWave + `,"radar":{"sample_rate_hz":1e9,"pri_s":0.01}}`, []string{"radar.window_stop_m", "the limit is 1048576"}},
		{"barker length", `{"version":2,"waveform":{"kind":"barker","length":6,"chip_s":1e-6}}`, []string{"waveform.length: 6 is not a Barker length (valid: 2, 3, 4, 5, 7, 11, 13)"}},
		{"frank square", `{"version":2,"waveform":{"kind":"frank","length":20,"chip_s":1e-6}}`, []string{"waveform.length: 20 is not a perfect square"}},
		{"p2 even root", `{"version":2,"waveform":{"kind":"p2","length":25,"chip_s":1e-6}}`, []string{"P2 needs an even root"}},
		{"zc root", `{"version":2,"waveform":{"kind":"zadoff_chu","length":64,"root":4,"chip_s":1e-6}}`, []string{"waveform.root: 4 shares the factor 4 with length 64"}},
		{"costas length", `{"version":2,"waveform":{"kind":"costas","length":8,"chip_s":1e-6}}`, []string{"waveform.length: 8 is not p−1 for a prime p", "6 or 10"}},
		{"mls degree", `{"version":2,"waveform":{"kind":"mls","degree":17,"chip_s":1e-6}}`, []string{"waveform.degree: 17 is outside the valid range 2 … 16"}},
		{"chip missing", `{"version":2,"waveform":{"kind":"p4","length":64}}`, []string{"waveform.chip_s: required"}},
		{"binary chars", `{"version":2,"waveform":{"kind":"phase_code","binary":"++x-","chip_s":1e-6}}`, []string{`waveform.binary: character 3 is "x"`}},
		{"both codes", `{"version":2,"waveform":{"kind":"phase_code","binary":"++","phases_deg":[0,0],"chip_s":1e-6}}`, []string{"waveform.binary: give either phases_deg or binary"}},
		{"phases not numbers", `{"version":2,"waveform":{"kind":"phase_code","phases_deg":[0,"a"],"chip_s":1e-6}}`, []string{`waveform.phases_deg[1]: "a" is not a number`}},
		{"ls on lfm", `{"version":2,` + okWave + `,"receiver":{"filter":"least_squares"}}`, []string{`receiver.filter: least_squares applies to phase codes`}},
		{"ls too long", `{"version":2,"waveform":{"kind":"mls","degree":12,"chip_s":1e-6},"receiver":{"filter":"least_squares"}}`, []string{"receiver.filter_length_factor", "least_squares limit of 4096 taps"}},
		{"minimax too long", `{"version":2,"waveform":{"kind":"p4","length":40,"chip_s":1e-6},"receiver":{"filter":"minimax","filter_length_factor":4}}`, []string{"receiver.filter_length_factor: 4 × 40 chips = 160 taps exceed the minimax limit of 128 taps"}},
		{"hann on two samples", `{"version":2,"radar":{"sample_rate_hz":2e6},"waveform":{"kind":"rect","pulse_width_s":1e-6},"receiver":{"window":{"kind":"hann"}}}`, []string{"receiver.window: hann is zero at both ends of a pulse of 2 samples"}},
		{"minimax on lfm", `{"version":2,` + okWave + `,"receiver":{"filter":"minimax"}}`, []string{`receiver.filter: minimax applies to phase codes`}},
		{"taylor sll", `{"version":2,` + okWave + `,"receiver":{"window":{"kind":"taylor","sidelobe_db":-5}}}`, []string{"receiver.window.sidelobe_db: -5 is above the maximum -15"}},
		{"window param of other kind", `{"version":2,` + okWave + `,"receiver":{"window":{"kind":"hann","beta":3}}}`, []string{`receiver.window.beta: not a field of kind "hann"`}},
		{"pfa", `{"version":2,` + okWave + `,"receiver":{"detector":{"kind":"ca_cfar","pfa":0.5}}}`, []string{"receiver.detector.pfa: 0.5 is above the maximum 0.1"}},
		{"pd_required high", `{"version":2,` + okWave + `,"receiver":{"detector":{"kind":"fixed","pd_required":1}}}`, []string{"receiver.detector.pd_required: 1 is above the maximum 0.9999"}},
		{"pd_required low", `{"version":2,` + okWave + `,"receiver":{"detector":{"kind":"ca_cfar","pd_required":0.001}}}`, []string{"receiver.detector.pd_required: 0.001 is below the minimum 0.01"}},
		{"pd_required under pfa", `{"version":2,` + okWave + `,"receiver":{"detector":{"kind":"fixed","pfa":0.05,"pd_required":0.02}}}`, []string{"receiver.detector.pd_required: 0.02 is not above pfa (0.05): a required Pd must exceed the false-alarm probability; valid range max(pfa, 0.01) … 0.9999"}},
		{"odd training", `{"version":2,` + okWave + `,"receiver":{"detector":{"kind":"ca_cfar","training_cells":15}}}`, []string{"receiver.detector.training_cells: 15 is odd"}},
		{"os rank", `{"version":2,` + okWave + `,"receiver":{"detector":{"kind":"os_cfar","training_cells":16,"rank":17}}}`, []string{"receiver.detector.rank: 17 is outside the valid range 1 … 16"}},
		{"fixed has no cells", `{"version":2,` + okWave + `,"receiver":{"detector":{"kind":"fixed","guard_cells":2}}}`, []string{`receiver.detector.guard_cells: not a field of kind "fixed"`}},
		{"target id chars", `{"version":2,` + okWave + `,"targets":[{"id":"a b","kind":"point","range_m":1,"rcs_dbsm":0}]}`, []string{`targets[0].id: "a b" may hold only letters`}},
		{"target id dup", `{"version":2,` + okWave + `,"targets":[{"id":"a","kind":"point","range_m":1,"rcs_dbsm":0},{"id":"a","kind":"point","range_m":2,"rcs_dbsm":0}]}`, []string{`targets[1].id: "a" is already the id of targets[0]`}},
		{"target missing", `{"version":2,` + okWave + `,"targets":[{"id":"a","kind":"point"}]}`, []string{"targets[0].range_m: required", "targets[0].rcs_dbsm: required"}},
		{"extended order", `{"version":2,` + okWave + `,"targets":[{"id":"a","kind":"extended","range_start_m":10,"range_stop_m":5,"rcs_dbsm_per_m":-10}]}`, []string{"targets[0].range_stop_m: 5 must be above 10"}},
		{"volume dbz", `{"version":2,` + okWave + `,"targets":[{"id":"a","kind":"volume","range_start_m":10,"range_stop_m":50,"reflectivity_dbz":99}]}`, []string{"targets[0].reflectivity_dbz: 99 is above the maximum 80"}},
		{"fluctuation", `{"version":2,` + okWave + `,"targets":[{"id":"a","kind":"point","range_m":1,"rcs_dbsm":0,"fluctuation":"swerling5"}]}`, []string{`targets[0].fluctuation: "swerling5" is not one of none, swerling1`}},
		{"view not object", `{"version":2,` + okWave + `,"view":3}`, []string{"view: 3 is not a JSON object"}},
		{"view too big", `{"version":2,` + okWave + `,"view":{"x":"` + strings.Repeat("a", 5000) + `"}}`, []string{"view: 5008 bytes exceed the limit of 4096 bytes"}},
		{"name too long", `{"version":2,` + okWave + `,"name":"` + strings.Repeat("n", 201) + `"}`, []string{"name: 201 characters exceed the limit of 200"}},
		{"seed negative", `{"version":2,` + okWave + `,"seed":-1}`, []string{"seed: -1 is outside the valid range 0 … 9007199254740991"}},
		{"too many targets", `{"version":2,` + okWave + `,"targets":[` + strings.Repeat(`{},`, 300) + `{}]}`, []string{"targets: 301 entries exceed the limit of 256"}},
		{"all at once", `{"version":2,` + okWave + `,"radar":{"carrier_hz":1,"noise_figure_db":99},"seed":-3}`,
			[]string{"radar.carrier_hz: 1 is below the minimum 1e+06", "radar.noise_figure_db: 99 is above the maximum 30", "seed: -3"}},
	}
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			_, err := Decode([]byte(tt.doc))
			if err == nil {
				t.Fatal("accepted a bad scenario")
			}
			if !errors.Is(err, ErrInvalid) {
				t.Errorf("error %v does not match ErrInvalid", err)
			}
			var ve *ValidationError
			if !errors.As(err, &ve) {
				t.Fatalf("error %T is not a *ValidationError", err)
			}
			text := err.Error()
			for _, w := range tt.want {
				if !strings.Contains(text, w) {
					t.Errorf("error does not contain %q:\n%s", w, text)
				}
			}
		})
	}
}

// TestLimitsCheapAllocations feeds hostile documents and bounds the memory
// they cost: far less than the documents claim.
func TestLimitsCheapAllocations(t *testing.T) {
	huge := fmt.Sprintf(`{"version":2,"waveform":{"kind":"phase_code","chip_s":1e-6,"phases_deg":[%s0]}}`, strings.Repeat("0,", 70000))
	deep := `{"version":2,"view":` + strings.Repeat(`{"a":`, 100000) + "1" + strings.Repeat("}", 100000) + "}"
	manyTargets := `{"version":2,` + okWave + `,"targets":[` + strings.Repeat(`{"id":"x","kind":"point","range_m":1,"rcs_dbsm":0},`, 60000) + `{}]}`
	cases := []struct {
		name   string
		doc    string
		maxMiB float64
	}{
		{"phases over limit", huge, 2},
		{"deep nesting", deep, 2},
		{"many targets", manyTargets, 8},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			doc := []byte(c.doc)
			var before, after runtime.MemStats
			runtime.ReadMemStats(&before)
			_, err := Decode(doc)
			runtime.ReadMemStats(&after)
			if err == nil {
				t.Fatal("accepted")
			}
			mib := float64(after.TotalAlloc-before.TotalAlloc) / (1 << 20)
			t.Logf("%s: %d bytes in, %.2f MiB allocated, %v", c.name, len(c.doc), mib, err.Error()[:min(80, len(err.Error()))])
			if mib > c.maxMiB {
				t.Errorf("allocated %.1f MiB, want at most %.1f", mib, c.maxMiB)
			}
		})
	}
}

// TestReadCapsInput checks that a reader claiming a gigabyte is cut at the
// limit after reading at most MaxDocumentBytes+1 bytes.
func TestReadCapsInput(t *testing.T) {
	r := &endless{}
	_, err := Read(r)
	if err == nil || !strings.Contains(err.Error(), "larger than the limit") {
		t.Fatalf("err = %v", err)
	}
	if r.n > MaxDocumentBytes+1<<16 {
		t.Fatalf("read %d bytes of a 1 GB stream", r.n)
	}
}

// endless is a 1 GB stream of spaces.
type endless struct{ n int }

func (e *endless) Read(p []byte) (int, error) {
	for i := range p {
		p[i] = ' '
	}
	e.n += len(p)
	return len(p), nil
}
