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
