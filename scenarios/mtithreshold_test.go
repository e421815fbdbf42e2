package scenarios

import (
	"context"
	"encoding/json"
	"math"
	"testing"

	"github.com/pulsewright/pulsewright/dsp"
)

// TestMTIThresholdsBounded evaluates every built-in demo with each MTI
// setting (where its pulse count allows one) and checks that the map
// detector's threshold on the range profile stays within a sane bound:
// the largest noise of any Doppler bin (the three-pulse canceller's
// |H(f)|²/Σh² peaks at 16/6, Richards 2014, §5.2.2; 3 is used) plus the
// largest expected echo anywhere on the profile, times the cell-averaging
// multiplier of as few as four independent training cells,
// 4·(Pfa^(−1/4) − 1) (Richards 2014, §6.5.1: more or correlated cells
// only lower it). Before the fix, hill-clutter-doppler with a two-pulse
// canceller put the threshold some 492 dB above noise from 6.0 to 9.5 km
// and its jet's threshold_margin_db at −555 dB.
func TestMTIThresholdsBounded(t *testing.T) {
	demos, err := Demos()
	if err != nil {
		t.Fatal(err)
	}
	for _, d := range demos {
		for _, mti := range []string{MTINone, MTITwoPulse, MTIThreePulse} {
			data, err := Canonical(d.Scenario)
			if err != nil {
				t.Fatal(err)
			}
			var raw map[string]any
			if err := json.Unmarshal(data, &raw); err != nil {
				t.Fatal(err)
			}
			rx, _ := raw["receiver"].(map[string]any)
			if rx == nil {
				rx = map[string]any{}
				raw["receiver"] = rx
			}
			rx["mti"] = mti
			data, _ = json.Marshal(raw)
			s, err := Decode(data)
			if err != nil {
				if mti == MTINone {
					t.Fatalf("%s: %v", d.Name, err)
				}
				continue // a single pulse, or too few for this canceller
			}
			res, err := Evaluate(context.Background(), s)
			if err != nil {
				t.Fatalf("%s, mti %s: %v", d.Name, mti, err)
			}
			se := res.Series
			maxClean := 0.0
			for _, c := range se.CleanDB {
				maxClean = math.Max(maxClean, dsp.FromDB(c))
			}
			pfa := s.Receiver.Detector.PFA
			bound := dsp.DB((3+maxClean)*4*(math.Pow(pfa, -0.25)-1)) + 0.01
			worst, at := math.Inf(-1), 0
			for k, th := range se.ThresholdDB {
				if th > worst {
					worst, at = th, k
				}
			}
			if worst > bound {
				t.Errorf("%s, mti %s: threshold %.1f dB at %.0f m, above the bound %.1f dB (largest echo %.1f dB, Pfa %g)",
					d.Name, mti, worst, se.RangeM0+float64(at)*se.RangeStepM, bound, dsp.DB(maxClean), pfa)
			}
			for _, tg := range res.Report.Targets {
				if m := tg.ThresholdMarginDB; m != nil && math.Abs(*m) > bound+100 {
					t.Errorf("%s, mti %s: target %s threshold margin %.1f dB", d.Name, mti, tg.ID, *m)
				}
			}
			t.Logf("%s, mti %s: highest threshold %.1f dB (bound %.1f dB)", d.Name, mti, worst, bound)
		}
	}
}
