package scenarios

import (
	"bytes"
	"errors"
	"math"
	"strings"
	"testing"

	"github.com/pulsewright/pulsewright/dsp"
)

// TestBlindZonesClosedForms: on a fine grid over many folds, the fraction
// of range cells eclipsed in each CPI matches the closed form
// 2·(1 − f)·τ/PRI (an echo loses at least the fraction f to the pulse at
// the start of the PRI when its delay mod PRI is ≤ (1 − f)·τ, to the next
// one when it is ≥ PRI − (1 − f)·τ), widened by one cell since a cell is
// marked when any part of it is eclipsed; and the fraction of range-rate
// rows at a blind speed matches (v_b/N + Δv)/v_b (the zero-Doppler bin of
// an N-pulse DFT is PRF/N wide). Both closed forms are derived here from the definitions
// (no source).
func TestBlindZonesClosedForms(t *testing.T) {
	s := BlindZoneSpec{PRIs: []float64{1e-3, 1.1e-3, 1.25e-3}, Pulses: []int{8, 16, 10}, PulseS: 50e-6, CarrierHz: 3e9, M: 2,
		RangeMinM: 0, RangeMaxM: 1.5e6, RangeCells: 2000, RateMaxMPS: 600, RateCells: 1000}
	b, err := BlindZones(s)
	if err != nil {
		t.Fatal(err)
	}
	lambda := C / s.CarrierHz
	for k, p := range s.PRIs {
		ecl, blind := 0, 0
		for j := range b.Ranges {
			if b.Eclipsed[0][j]&(1<<k) != 0 {
				ecl++
			}
		}
		for i := range b.Rates {
			if b.Blind[i][0]&(1<<k) != 0 {
				blind++
			}
		}
		// Cells touching an eclipsed interval: (2w + Δr)/Ru of them,
		// to within one cell per fold.
		dr := (s.RangeMaxM - s.RangeMinM) / float64(s.RangeCells)
		ru := C * p / 2
		want := (2*0.5*C*s.PulseS/2 + dr) / ru
		if got := float64(ecl) / float64(len(b.Ranges)); math.Abs(got-want) > 1.5*dr/ru {
			t.Errorf("CPI %d: eclipsed fraction %.4f, closed form %.4f", k+1, got, want)
		}
		// Over ±600 m/s the bins repeat every blind speed; compare with
		// the exact count of rates within PRF/(2N) of a multiple.
		vb := dsp.BlindSpeed(p, lambda)
		half := vb / (2 * float64(s.Pulses[k]))
		dv := 2 * s.RateMaxMPS / float64(s.RateCells)
		exact := 0
		for _, v := range b.Rates {
			if math.Abs(v-vb*math.Round(v/vb)) <= half+dv/2 {
				exact++
			}
		}
		if blind != exact || math.Abs(float64(blind)/float64(len(b.Rates))-(2*half+dv)/vb) > 0.01 {
			t.Errorf("CPI %d: %d blind rows, %d by the blind speed %.2f m/s, 1/N = %.4f", k+1, blind, exact, vb, 1/float64(s.Pulses[k]))
		}
	}
	// Point checks: the 210 km target of 1.0/1.1 ms is clear; a range a
	// whole unambiguous range of the first PRI (plus τ/4 of delay) is
	// eclipsed in CPI 1 only; a zero range rate is blind in every CPI.
	if f := EclipsedFraction(dsp.UnambiguousRange(1e-3)+C*s.PulseS/8, 1e-3, s.PulseS); math.Abs(f-0.75) > 1e-9 {
		t.Errorf("eclipsed fraction τ/4 after the next pulse: %v, want 0.75", f)
	}
	if f := EclipsedFraction(210e3, 1e-3, s.PulseS); f != 0 {
		t.Errorf("210 km at 1 ms: eclipsed fraction %v, want 0", f)
	}
	if !AtBlindSpeed(0, 1e-3, lambda, 8) || !AtBlindSpeed(dsp.BlindSpeed(1e-3, lambda), 1e-3, lambda, 8) || AtBlindSpeed(dsp.BlindSpeed(1e-3, lambda)/2, 1e-3, lambda, 8) {
		t.Error("AtBlindSpeed: want blind at 0 and at the blind speed, clear at half of it")
	}
	// M-of-N: a cell is detected iff at least M CPIs see it.
	for i := range b.Rates {
		for j := range b.Ranges {
			n := 0
			for k := range s.PRIs {
				if (b.Eclipsed[i][j]|b.Blind[i][j])&(1<<k) == 0 {
					n++
				}
			}
			if n != b.Seen(i, j) {
				t.Fatalf("cell %d,%d: seen %d, counted %d", i, j, b.Seen(i, j), n)
			}
		}
	}
	if math.Abs(b.UnambiguousRangeM-C*55e-3/2) > 1 {
		t.Errorf("combined unambiguous range %.0f m, want c·lcm(1, 1.1, 1.25 ms)/2 = c·55 ms/2", b.UnambiguousRangeM)
	}
}

// TestBlindZonesStaggerBlindSpeed: two CPIs of 100 and 125 µs at 9.5 GHz
// are both blind only near 631.1 m/s (and 0) within ±700 m/s, the
// staggered first blind speed (Skolnik, Introduction to Radar Systems,
// ch. 3), so 1-of-2 misses only rows near 0 and ±631 m/s.
func TestBlindZonesStaggerBlindSpeed(t *testing.T) {
	b, err := BlindZones(BlindZoneSpec{PRIs: []float64{100e-6, 125e-6}, Pulses: []int{16}, PulseS: 1e-6, CarrierHz: 9.5e9, M: 1,
		RangeMinM: 2e3, RangeMaxM: 10e3, RangeCells: 10, RateMaxMPS: 700, RateCells: 1000})
	if err != nil {
		t.Fatal(err)
	}
	if math.Abs(b.FirstBlindMPS-631.1) > 0.1 {
		t.Errorf("first blind speed %.2f, want 631.1", b.FirstBlindMPS)
	}
	for i, v := range b.Rates {
		both := b.Blind[i][0] == 3
		near := math.Abs(v) < 5 || math.Abs(math.Abs(v)-631.1) < 5
		if both && !near {
			t.Errorf("%.1f m/s blind in both CPIs, away from 0 and ±631 m/s", v)
		}
		if math.Abs(v) < 2 || math.Abs(math.Abs(v)-631.1) < 2 {
			if !both {
				t.Errorf("%.1f m/s not blind in both CPIs", v)
			}
		}
	}
}

func TestBlindZonesErrorsAndOutputs(t *testing.T) {
	_, err := BlindZones(BlindZoneSpec{PRIs: []float64{1e-3, -2}, Pulses: []int{8, 8, 8}, PulseS: 1e-5, CarrierHz: 3e9, M: 4,
		RangeMinM: 5, RangeMaxM: 1, RangeCells: 1, RateMaxMPS: 0, RateCells: 5000})
	if !errors.Is(err, ErrInvalid) {
		t.Fatalf("want ErrInvalid, got %v", err)
	}
	for _, w := range []string{"pri[1]: -2 is outside the valid range", "pulses: 3 counts given for 2 PRIs", "m: 4 is outside the valid range 0 … 2",
		"range: 5:1 is not an interval", "rate: 0 is outside", "cells.range: 1 range cells", "cells.rate: 5000"} {
		if !strings.Contains(err.Error(), w) {
			t.Errorf("error %q lacks %q", err, w)
		}
	}
	b, err := BlindZones(BlindZoneSpec{PRIs: []float64{1e-3, 1.1e-3}, Pulses: []int{8}, PulseS: 1e-5, CarrierHz: 3e9,
		RangeMinM: 0, RangeMaxM: 300e3, RangeCells: 60, RateMaxMPS: 200, RateCells: 20})
	if err != nil {
		t.Fatal(err)
	}
	var txt, csv, page bytes.Buffer
	if b.WriteText(&txt) != nil || b.WriteCSV(&csv) != nil || b.WriteHTML(&page) != nil {
		t.Fatal("write failed")
	}
	if !strings.Contains(txt.String(), "combined unambiguous range 1648.86 km") {
		t.Errorf("text lacks the combined range:\n%s", txt.String())
	}
	if lines := strings.Count(csv.String(), "\n"); lines != 2+60*20 {
		t.Errorf("CSV has %d lines, want %d (the engine line, the header and a row per cell)", lines, 2+60*20)
	}
	eng := RunningEngine().String()
	if !strings.HasPrefix(csv.String(), "# "+eng+"\n") || !strings.HasSuffix(txt.String(), "\n"+eng+"\n") || !strings.Contains(page.String(), eng) {
		t.Errorf("an output does not name the engine %q", eng)
	}
	for _, out := range []string{txt.String(), csv.String(), page.String()} {
		if strings.Contains(out, "NaN") || strings.Contains(out, "Inf") {
			t.Error("NaN or Inf in an output")
		}
	}
}
