package scenarios

import (
	"context"
	"errors"
	"math"
	"strings"
	"testing"
)

// TestCoverageCheckValue: a steady target whose test sees 17.02 dB at
// 5 km reaches the 13.18 dB it needs for Pd 0.9 at Pfa 1e-6 (Marcum Q;
// Richards, Fundamentals of Radar Signal Processing, 2nd ed., eq. 6.79)
// at 6.24 km by the R⁴ law: 5 km × 10^(3.84/40) (issue check value). The
// range curve, whose points keep the target's straddle, crosses Pd 0.9
// there too, and its SNR falls 40 dB per decade of range.
func TestCoverageCheckValue(t *testing.T) {
	if got := DetectionRange(5000, 17.02, 13.18); math.Abs(got-6237) > 1 {
		t.Errorf("DetectionRange(5 km, 17.02, 13.18) = %.1f m, want 6237 m", got)
	}
	fixed := `{"kind":"fixed","pfa":1e-6}`
	s := tunedScene(t, lfmDoc, fixed, []mcTarget{{"a", "none", 5000, 17.02}})
	c, err := CoverageOf(context.Background(), s, "a", 0, 0, 200)
	if err != nil {
		t.Fatal(err)
	}
	if c.SNRDB == nil || math.Abs(*c.SNRDB-17.02) > 0.01 || c.SNRRequiredDB == nil || math.Abs(*c.SNRRequiredDB-13.18) > 0.01 {
		t.Fatalf("SNR %v, required %v", c.SNRDB, c.SNRRequiredDB)
	}
	if c.DetectionRangeM == nil || math.Abs(*c.DetectionRangeM-6237) > 5 {
		t.Errorf("detection range %v, want 6237 m", c.DetectionRangeM)
	}
	if r := target(mustEvaluate(t, s), "a"); r.DetectionRangeM == nil || math.Abs(*r.DetectionRangeM-6237) > 5 {
		t.Errorf("report detection_range_m %v, want 6237 m", r.DetectionRangeM)
	}
	if c.CoverageM == nil || math.Abs(*c.CoverageM-6237) > 10 {
		t.Errorf("coverage from the curve %v, want 6237 m", c.CoverageM)
	}
	if len(c.ByRange) < 150 || len(c.BySNR) < 100 {
		t.Fatalf("%d range points, %d SNR points", len(c.ByRange), len(c.BySNR))
	}
	for _, p := range c.ByRange {
		if p.SNRDB == nil {
			t.Fatalf("no SNR at %.0f m (%s)", p.RangeM, p.Status)
		}
		if want := 17.02 - 40*math.Log10(p.RangeM/5000); math.Abs(*p.SNRDB-want) > 0.01 {
			t.Errorf("SNR at %.0f m %.3f dB, R⁴ law %.3f dB", p.RangeM, *p.SNRDB, want)
		}
	}
	// Pd against SNR passes 0.9 at the required SNR.
	for i := 1; i < len(c.BySNR); i++ {
		a, b := c.BySNR[i-1], c.BySNR[i]
		if a.Pd < 0.9 && b.Pd >= 0.9 && !(a.SNRDB <= 13.18 && b.SNRDB >= 13.18) {
			t.Errorf("Pd crosses 0.9 between %.2f and %.2f dB, want 13.18 dB", a.SNRDB, b.SNRDB)
		}
	}
}

// TestDetectionRangeEclipsed: the long-pulse demo's drone is eclipsed at
// 9 km (46.1 dB of its echo lost inside the 18 km blind range). Its
// detection range is the radar equation's range for its RCS, from its
// unblanked SNR (tested SNR + eclipsing_loss_db) by the R⁴ law: about
// 44 km, not the 3.1 km the eclipsed SNR would give, since the loss does
// not follow the target along the range axis (it vanishes beyond the
// blind range). An unblanked target is unchanged: R·10^(margin/40).
func TestDetectionRangeEclipsed(t *testing.T) {
	d, err := LoadDemo("long-pulse-blind")
	if err != nil {
		t.Fatal(err)
	}
	res := mustEvaluate(t, d.Scenario)
	dr := target(res, "drone")
	if dr.Status != StatusEclipsed || dr.EclipsingLossDB == nil || dr.MarginDB == nil || dr.DetectionRangeM == nil {
		t.Fatalf("drone: %s, eclipsing loss %v, margin %v, detection range %v", dr.Status, dr.EclipsingLossDB, dr.MarginDB, dr.DetectionRangeM)
	}
	want := dr.RangeM * math.Pow(10, (*dr.MarginDB+*dr.EclipsingLossDB)/40)
	if math.Abs(*dr.DetectionRangeM-want) > 1 || *dr.DetectionRangeM < 40000 {
		t.Errorf("drone detection range %.0f m, want %.0f m (unblanked SNR, R⁴ law)", *dr.DetectionRangeM, want)
	}
	la := target(res, "light-aircraft")
	if want := la.RangeM * math.Pow(10, *la.MarginDB/40); la.DetectionRangeM == nil || math.Abs(*la.DetectionRangeM-want) > 1 {
		t.Errorf("light aircraft detection range %v, want %.0f m", la.DetectionRangeM, want)
	}
}

// TestCoverageWindowFromZero: the long-pulse demo's receive window opens
// at 0 m; the Pd curves of its light aircraft over the window (the
// default of the command and of the page's Pd curves tab) start at the
// first range above 0 instead of refusing the window as a range.
func TestCoverageWindowFromZero(t *testing.T) {
	d, err := LoadDemo("long-pulse-blind")
	if err != nil {
		t.Fatal(err)
	}
	if d.Scenario.Radar.WindowStartM != 0 {
		t.Fatalf("the demo's window starts at %g m; this test needs 0", d.Scenario.Radar.WindowStartM)
	}
	c, err := CoverageOf(context.Background(), d.Scenario, "light-aircraft", 0, 0, 30)
	if err != nil {
		t.Fatal(err)
	}
	if len(c.ByRange) < 20 || !(c.ByRange[0].RangeM > 0) || c.ByRange[len(c.ByRange)-1].RangeM > d.Scenario.Radar.WindowStopM {
		t.Errorf("%d points from %.0f m, want about 30 in (0, %.0f] m", len(c.ByRange), c.ByRange[0].RangeM, d.Scenario.Radar.WindowStopM)
	}
	// Inside the 18 km blind range the aircraft is eclipsed; beyond it, seen.
	for _, p := range c.ByRange {
		if p.RangeM > 25000 && p.RangeM < 60000 && p.Status != StatusDetected {
			t.Errorf("at %.0f m: %s, want detected", p.RangeM, p.Status)
		}
		if p.RangeM < 17000 && p.Status == StatusDetected {
			t.Errorf("at %.0f m, inside the blind range: detected", p.RangeM)
		}
	}
}

// TestCoverageEclipsing: with the window opening inside the blind range
// c·τ/2 (1.5 km for the 10 µs pulse), the range curve follows the R⁴ law
// outside it and falls below it inside, where part of the echo arrives
// while the radar transmits (docs/detection.md §3).
func TestCoverageEclipsing(t *testing.T) {
	fixed := `{"kind":"fixed","pfa":1e-6}`
	doc := func(det, targets string) string {
		return strings.Replace(lfmDoc(det, targets), `"window_start_m":3000`, `"window_start_m":600`, 1)
	}
	s := tunedScene(t, doc, fixed, []mcTarget{{"a", "none", 5000, 10}})
	c, err := CoverageOf(context.Background(), s, "a", 700, 3000, 60)
	if err != nil {
		t.Fatal(err)
	}
	var in, out int
	for _, p := range c.ByRange {
		law := 10 - 40*math.Log10(p.RangeM/5000)
		switch {
		case p.RangeM > 1600 && p.SNRDB != nil:
			out++
			if math.Abs(*p.SNRDB-law) > 0.01 {
				t.Errorf("%.0f m, outside the blind range: SNR %.2f dB, R⁴ law %.2f dB", p.RangeM, *p.SNRDB, law)
			}
		case p.RangeM < 1400:
			in++
			if p.SNRDB != nil && *p.SNRDB > law-1 {
				t.Errorf("%.0f m, inside the blind range (%s): SNR %.2f dB, not below the R⁴ law's %.2f dB", p.RangeM, p.Status, *p.SNRDB, law)
			}
		}
	}
	if in < 10 || out < 10 {
		t.Errorf("%d points inside the blind range, %d outside", in, out)
	}
}

func TestCoverageErrors(t *testing.T) {
	s := mustDecode(t, lfmDoc(`{"kind":"fixed","pfa":1e-6}`, pointJSON("a", 5000, 0)))
	for _, c := range []struct {
		id       string
		from, to float64
		points   int
		want     string
	}{
		{"b", 0, 0, 100, `target "b" is not in the scenario (targets: [a])`},
		{"a", 0, 0, 1, "points 1: want 2 … 2000"},
		{"a", 5000, 4000, 100, "ranges 5000 … 4000 m: want 0 < from < to"},
		{"a", -1, 4000, 100, "ranges -1 … 4000 m"},
	} {
		_, err := CoverageOf(context.Background(), s, c.id, c.from, c.to, c.points)
		if err == nil || !strings.Contains(err.Error(), c.want) || !errors.Is(err, ErrInvalid) {
			t.Errorf("%+v: error %v, want %q", c, err, c.want)
		}
	}
}
