package scenarios

import (
	"context"
	"encoding/json"
	"math"
	"strings"
	"testing"

	"github.com/pulsewright/pulsewright/dsp"
)

// withSchedule returns a demo's JSON with radar.schedule set.
func withSchedule(t *testing.T, demo string, schedule any) []byte {
	t.Helper()
	d, err := demoFS.ReadFile("demos/" + demo + ".json")
	if err != nil {
		t.Fatal(err)
	}
	var doc map[string]any
	if err := json.Unmarshal(d, &doc); err != nil {
		t.Fatal(err)
	}
	doc["radar"].(map[string]any)["schedule"] = schedule
	out, _ := json.Marshal(doc)
	return out
}

func TestScheduleDecodeErrors(t *testing.T) {
	for _, c := range []struct {
		schedule any
		path     string
		words    string
	}{
		{map[string]any{}, "radar.schedule.cpis", "required"},
		{map[string]any{"cpis": []any{}}, "radar.schedule.cpis", "0 entries"},
		{map[string]any{"cpis": make([]any, 16)}, "radar.schedule.cpis", "16 entries"},
		{map[string]any{"cpis": []any{map[string]any{"pulses": 4}}}, "radar.schedule.cpis[0].pri_s", "required"},
		{map[string]any{"cpis": []any{map[string]any{"pri_s": 1e-5}}}, "radar.schedule.cpis[0].pri_s", "must be above 0.00012"},
		{map[string]any{"cpis": []any{map[string]any{"pri_s": 2e-3, "pulses": 0}}}, "radar.schedule.cpis[0].pulses", "0 is outside the valid range 1 … 1024"},
		{map[string]any{"cpis": []any{map[string]any{"pri_s": 2e-3}}, "m": 3}, "radar.schedule.m", "3 is outside the valid range 1 … 2"},
		{map[string]any{"cpis": []any{map[string]any{"pri_s": 2e-3, "prf": 5}}}, "radar.schedule.cpis[0].prf", "unknown field"},
		{map[string]any{"cpis": []any{map[string]any{"pri_s": 2e-3}}, "stagger": 1}, "radar.schedule.stagger", "unknown field"},
		{map[string]any{"cpis": "1e-3"}, "radar.schedule.cpis", "not an array"},
	} {
		_, err := Decode(withSchedule(t, "long-pulse-blind", c.schedule))
		wantFieldError(t, c.schedule, err, c.path, c.words)
	}
}

// TestScheduleUnfoldsFoldedTarget: the long-pulse demo's airliner at 210
// km with PRIs of 1.0 and 1.1 ms appears at 60.10 km and 45.11 km, and
// the combined unambiguous range is c·11 ms/2 ≈ 1649 km (Skolnik,
// Introduction to Radar Systems, 3rd ed., ch. 3, multiple PRFs; values
// recomputed by hand: 210 − 149.896 = 60.104 km, 210 − 164.886 =
// 45.114 km). The schedule detects it 2-of-2 and unfolds its range to
// 210 km within a range gate plus its range–Doppler shift.
func TestScheduleUnfoldsFoldedTarget(t *testing.T) {
	s, err := Decode(withSchedule(t, "long-pulse-blind", map[string]any{"cpis": []any{map[string]any{"pri_s": 1.1e-3}}}))
	if err != nil {
		t.Fatal(err)
	}
	rep, err := Analyse(context.Background(), s)
	if err != nil {
		t.Fatal(err)
	}
	sr := rep.Schedule
	if sr == nil || sr.N != 2 || sr.M != 2 || len(sr.CPIs) != 2 {
		t.Fatalf("schedule %+v", sr)
	}
	if sr.UnambiguousRangeM == nil || math.Abs(*sr.UnambiguousRangeM-1649e3) > 0.5e3 {
		t.Errorf("combined unambiguous range %v, want 1649 km", sr.UnambiguousRangeM)
	}
	const j = 3 // airliner-far
	gate := C / (2 * s.Radar.SampleRateHz)
	shift := rep.Targets[j].RangeShiftM
	for k, want := range []float64{60.104e3, 45.114e3} {
		ct := sr.CPIs[k].Targets[j]
		if !ct.Detected || ct.Folds != 1 || ct.ApparentRangeM == nil || math.Abs(*ct.ApparentRangeM-shift-want) > gate/2+1 {
			t.Errorf("CPI %d: %+v, want detected, folded once, at %.2f km", k+1, ct, want/1e3)
		}
	}
	st := sr.Targets[j]
	if !st.Detected || st.DetectedIn != 2 || !st.RangeResolved || math.Abs(*st.RangeM-shift-210e3) > gate {
		t.Errorf("combined %+v, want detected 2-of-2 and resolved to 210 km", st)
	}
	// The first CPI of the schedule is the report without it: the fold
	// is no detection there.
	if rep.Targets[j].Status == StatusDetected {
		t.Errorf("first CPI's own report: %s, want the fold reported as before", rep.Targets[j].Status)
	}
	// The drone is eclipsed in both: missed, and its Pd is the product rule.
	d := sr.Targets[0]
	if d.Detected || d.DetectedIn != 0 || d.RangeResolved {
		t.Errorf("drone: %+v", d)
	}
}

// TestScheduleBlindSpeedAndPd: a jet at a blind speed of the hill demo's
// 100 µs CPI is seen by a 120 µs CPI; the schedule's Pd is the M-of-N
// combination of the CPIs' own (checked against enumeration in
// dsp.TestAtLeast), and a target seen by every CPI has its range rate
// unfolded to within a Doppler bin of the truth.
func TestScheduleBlindSpeedAndPd(t *testing.T) {
	s, err := Decode(withSchedule(t, "hill-clutter-doppler", map[string]any{"cpis": []any{map[string]any{"pri_s": 1.2e-4}, map[string]any{"pri_s": 0.9e-4}}, "m": 2}))
	if err != nil {
		t.Fatal(err)
	}
	rep, err := Analyse(context.Background(), s)
	if err != nil {
		t.Fatal(err)
	}
	sr := rep.Schedule
	lambda := s.Radar.Wavelength()
	// PRIs 100, 120 and 90 µs on a 10 µs grid: λ/(2·10 µs).
	if sr.FirstBlindSpeedMPS == nil || math.Abs(*sr.FirstBlindSpeedMPS-lambda/2e-5) > 1e-6 {
		t.Errorf("first blind speed %v, want %.1f", sr.FirstBlindSpeedMPS, lambda/2e-5)
	}
	for j, tgt := range s.Targets {
		st := sr.Targets[j]
		var p []float64
		for _, c := range sr.CPIs {
			if c.Targets[j].Pd != nil {
				p = append(p, *c.Targets[j].Pd)
			}
		}
		if len(p) == sr.N && (st.Pd == nil || math.Abs(*st.Pd-dsp.AtLeast(p, 2)) > 1e-12) {
			t.Errorf("%s: Pd %v, want AtLeast(%v, 2)", tgt.ID, st.Pd, p)
		}
		if st.Detected != (st.DetectedIn >= 2) {
			t.Errorf("%s: detected %v with %d CPIs", tgt.ID, st.Detected, st.DetectedIn)
		}
		if tgt.ID == "car" || tgt.ID == "helicopter" {
			bin := lambda / (2 * 0.9e-4 * 32) // the widest Doppler bin
			if !st.RangeRateResolved || math.Abs(*st.RangeRateMPS-tgt.RangeRateMPS) > bin {
				t.Errorf("%s: range rate %+v, want %.1f within a bin", tgt.ID, st, tgt.RangeRateMPS)
			}
		}
	}
	jet := sr.CPIs[0].Targets[2]
	if jet.BlindSpeed == nil || !*jet.BlindSpeed || jet.Detected {
		t.Errorf("jet in the 100 µs CPI: %+v, want at a blind speed, missed", jet)
	}
	if !sr.CPIs[1].Targets[2].Detected {
		t.Errorf("jet in the 120 µs CPI: %+v, want detected", sr.CPIs[1].Targets[2])
	}
}

func TestNoScheduleNoScheduleReport(t *testing.T) {
	d, err := LoadDemo("closing-jet")
	if err != nil {
		t.Fatal(err)
	}
	rep, err := Analyse(context.Background(), d.Scenario)
	if err != nil {
		t.Fatal(err)
	}
	if rep.Schedule != nil {
		t.Errorf("a scenario without a schedule has one in its report")
	}
	b, _ := json.Marshal(rep)
	if strings.Contains(string(b), `"schedule"`) {
		t.Errorf("report JSON names a schedule")
	}
}

// TestScheduleSuggestions: a target one PRI loses gets a verified extra
// CPI in its reason, and the suggested schedule does detect it.
func TestScheduleSuggestions(t *testing.T) {
	for _, c := range []struct {
		demo, id, want string
		schedule       map[string]any
	}{
		{"hill-clutter-doppler", "jet", "Adding a second CPI at PRI 120 µs (32 pulses), detecting 1-of-2", map[string]any{"cpis": []any{map[string]any{"pri_s": 1.2e-4}}, "m": 1}},
		{"long-pulse-blind", "airliner-far", "Adding a second CPI at PRI 1.1 ms (1 pulse), detecting 2-of-2", map[string]any{"cpis": []any{map[string]any{"pri_s": 1.1e-3}}, "m": 2}},
	} {
		d, err := LoadDemo(c.demo)
		if err != nil {
			t.Fatal(err)
		}
		d.Scenario.Radar.Schedule = nil // the demo's own schedule is the remedy
		res, err := Evaluate(context.Background(), d.Scenario)
		if err != nil {
			t.Fatal(err)
		}
		j := -1
		for i, tr := range res.Report.Targets {
			if tr.ID == c.id {
				j = i
			}
		}
		if j < 0 || !strings.Contains(res.Report.Targets[j].Reason, c.want) {
			t.Errorf("%s %s: reason %q, want …%s…", c.demo, c.id, res.Report.Targets[max(j, 0)].Reason, c.want)
			continue
		}
		s, err := Decode(withSchedule(t, c.demo, c.schedule))
		if err != nil {
			t.Fatal(err)
		}
		rep, err := Analyse(context.Background(), s)
		if err != nil {
			t.Fatal(err)
		}
		if !rep.Schedule.Targets[j].Detected {
			t.Errorf("%s: the suggested schedule misses %s: %+v", c.demo, c.id, rep.Schedule.Targets[j])
		}
	}
}

// TestScheduleFirstBlindSpeed: PRIs of 100 µs and 125 µs at 9.5 GHz
// (Δ = 25 µs, n = 4 and 5) are blind together first at λ/(2Δ) = 631.1
// m/s, (4 + 5)/2 = 4.5 times the 140.2 m/s blind speed of the mean PRI
// 112.5 µs (Skolnik, Introduction to Radar Systems, 3rd ed., ch. 3,
// staggered PRFs; recomputed: λ = c/9.5 GHz = 31.557 mm, 31.557 mm /
// 50 µs = 631.15 m/s).
func TestScheduleFirstBlindSpeed(t *testing.T) {
	s, err := Decode(withSchedule(t, "hill-clutter-doppler", map[string]any{"cpis": []any{map[string]any{"pri_s": 1.25e-4}}}))
	if err != nil {
		t.Fatal(err)
	}
	rep, err := Analyse(context.Background(), s)
	if err != nil {
		t.Fatal(err)
	}
	v := rep.Schedule.FirstBlindSpeedMPS
	if v == nil || math.Abs(*v-631.15) > 0.05 {
		t.Errorf("first blind speed %v, want 631.15 m/s", v)
	}
	mean := s.Radar.Wavelength() / (2 * 112.5e-6)
	if math.Abs(*v/mean-4.5) > 1e-9 {
		t.Errorf("ratio to the mean PRI's blind speed %.6f, want 4.5", *v/mean)
	}
}
