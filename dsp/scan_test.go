package dsp

import (
	"encoding/json"
	"fmt"
	"math"
	"os"
	"path/filepath"
	"testing"
)

type scanGolden struct {
	SincK float64 `json:"sinc_k"`
	Cases []struct {
		Shape          string
		N              int
		Step           float64
		CoherentDB     float64  `json:"coherent_db"`
		NoncoherentDB  float64  `json:"noncoherent_db"`
		CoherentHannDB *float64 `json:"coherent_hann_db"`
	}
	Offset []struct {
		Shape          string
		N              int
		Step, U0       float64
		CoherentHannDB float64 `json:"coherent_hann_db"`
	}
	Dense []struct {
		Shape         string
		NoncoherentDB float64 `json:"noncoherent_db"`
		CoherentDB    float64 `json:"coherent_db"`
		TwoWayWidth   float64 `json:"two_way_width"`
	}
	NoncoherentPd []struct {
		Shape  string
		N      int
		Step   float64
		LossDB float64 `json:"loss_db"`
	} `json:"noncoherent_pd"`
}

func readScanGolden(t *testing.T) scanGolden {
	t.Helper()
	b, err := os.ReadFile(filepath.Join("..", "testdata", "golden", "scan.json"))
	if err != nil {
		t.Fatal(err)
	}
	var g scanGolden
	if err := json.Unmarshal(b, &g); err != nil {
		t.Fatal(err)
	}
	return g
}

func beamByName(s string) BeamShape {
	if s == "sinc" {
		return SincBeam
	}
	return GaussianBeam
}

// TestBeamHalfPower: both shapes are at half power (one way) at u = ±½.
func TestBeamHalfPower(t *testing.T) {
	g := readScanGolden(t)
	if math.Abs(g.SincK-sincBeamK) > 1e-12 {
		t.Errorf("sinc k = %.13f, scipy's brentq gives %.13f", sincBeamK, g.SincK)
	}
	for _, b := range []BeamShape{GaussianBeam, SincBeam} {
		for _, u := range []float64{-0.5, 0.5} {
			if v := b.Voltage(u); math.Abs(v*v-0.5) > 1e-12 {
				t.Errorf("%s: f(%g)² = %.15f, want ½", b, u, v*v)
			}
		}
		if v := b.Voltage(0); v != 1 {
			t.Errorf("%s: f(0) = %g, want 1", b, v)
		}
	}
}

// TestScanLossGolden checks the losses of pulse trains against
// testdata/golden/scan.json (scan.py: the definitions evaluated with
// NumPy, the Hann window from scipy.signal.windows).
func TestScanLossGolden(t *testing.T) {
	const tol = 1e-9 // dB
	for _, c := range readScanGolden(t).Cases {
		b := beamByName(c.Shape)
		a := b.ScanGains(nil, c.N, c.Step)
		if got := DB(CoherentScanLoss(a, nil)); math.Abs(got-c.CoherentDB) > tol {
			t.Errorf("%s n=%d step=%g: coherent %.12f dB, golden %.12f", c.Shape, c.N, c.Step, got, c.CoherentDB)
		}
		if got := DB(NoncoherentScanLoss(a)); math.Abs(got-c.NoncoherentDB) > tol {
			t.Errorf("%s n=%d step=%g: noncoherent %.12f dB, golden %.12f", c.Shape, c.N, c.Step, got, c.NoncoherentDB)
		}
		if c.CoherentHannDB != nil {
			w := Hann{}.Coefficients(make([]float64, c.N))
			if got := DB(CoherentScanLoss(a, w)); math.Abs(got-*c.CoherentHannDB) > tol {
				t.Errorf("%s n=%d step=%g: coherent with Hann %.12f dB, golden %.12f", c.Shape, c.N, c.Step, got, *c.CoherentHannDB)
			}
		}
	}
}

// TestScanLossOffsetGolden: trains placed off the beam's peak, pulse k at
// u0 + k·step, Hann weights, against scan.json's "offset" cases.
func TestScanLossOffsetGolden(t *testing.T) {
	for _, c := range readScanGolden(t).Offset {
		a := beamByName(c.Shape).ScanGainsFrom(make([]float64, c.N), c.U0, c.Step)
		w := Hann{}.Coefficients(make([]float64, c.N))
		if got := DB(CoherentScanLoss(a, w)); math.Abs(got-c.CoherentHannDB) > 1e-9 {
			t.Errorf("%s n=%d step=%g u0=%g: %.12f dB, golden %.12f", c.Shape, c.N, c.Step, c.U0, got, c.CoherentHannDB)
		}
	}
}

// TestBeamShapeLossDense: with many hits inside the 3-dB beamwidth the
// losses reach the integrals of the golden file (scipy.integrate.quad) and
// the closed forms of BeamShapeLoss's doc; the Gaussian beam's noncoherent
// loss, 1.67 dB, is Blake's beam-shape loss for a beam scanning in one
// plane, quoted as 1.6 dB (Radar Handbook, ch. 2, from memory).
func TestBeamShapeLossDense(t *testing.T) {
	for _, d := range readScanGolden(t).Dense {
		b := beamByName(d.Shape)
		// The midpoint rule over the beamwidth: error ~ 1/n².
		coh, non := b.BeamShapeLoss(4000)
		if math.Abs(DB(coh)-d.CoherentDB) > 1e-6 || math.Abs(DB(non)-d.NoncoherentDB) > 1e-6 {
			t.Errorf("%s dense: coherent %.7f noncoherent %.7f dB, golden %.7f %.7f", d.Shape, DB(coh), DB(non), d.CoherentDB, d.NoncoherentDB)
		}
		// quad over ±200 beamwidths for the sinc: its tail and quad's
		// tolerance leave about 3e-6.
		if w := b.TwoWayWidth(); math.Abs(w-d.TwoWayWidth) > 5e-6 {
			t.Errorf("%s two-way width %.9f, golden %.9f", d.Shape, w, d.TwoWayWidth)
		}
	}
	l2 := math.Ln2
	non := 1 / (math.Sqrt(math.Pi/(8*l2)) * math.Erf(math.Sqrt(2*l2)))
	c := math.Sqrt(math.Pi/(4*l2)) * math.Erf(math.Sqrt(l2))
	coh, nc := GaussianBeam.BeamShapeLoss(4000)
	if math.Abs(DB(nc)-DB(non)) > 1e-6 || math.Abs(DB(coh)-DB(1/(c*c))) > 1e-6 {
		t.Errorf("gaussian dense %.6f/%.6f dB, closed forms %.6f/%.6f", DB(coh), DB(nc), DB(1/(c*c)), DB(non))
	}
	if math.Abs(DB(nc)-1.6) > 0.1 {
		t.Errorf("gaussian beam-shape loss %.3f dB, Blake quotes 1.6 dB (from memory)", DB(nc))
	}
	// Barton & Leonov, Radar Technology Encyclopedia, p. 249: the
	// original beam-shape loss is the reciprocal of ∫f⁴ against a
	// rectangular beam of the one-way half-power width: 1.234 dB.
	if got := -DB(GaussianBeam.TwoWayWidth()); math.Abs(got-1.2339) > 1e-4 {
		t.Errorf("gaussian 1/∫f⁴ = %.5f dB, want 1.2339", got)
	}
}

// TestNoncoherentScanLossPd: the noncoherent loss is exact for a steady
// target: the peak SNR it needs for Pd 0.9 at Pfa 1e-6 with the
// pattern-weighted pulses, against n pulses at the peak, solved with
// scipy.stats.ncx2 in the golden file.
func TestNoncoherentScanLossPd(t *testing.T) {
	for _, c := range readScanGolden(t).NoncoherentPd {
		a := beamByName(c.Shape).ScanGains(nil, c.N, c.Step)
		if got := DB(NoncoherentScanLoss(a)); math.Abs(got-c.LossDB) > 1e-6 {
			t.Errorf("%s n=%d step=%g: loss %.8f dB, ncx2 gives %.8f", c.Shape, c.N, c.Step, got, c.LossDB)
		}
	}
}

// TestScanGainsFrom: a train shifted by half its length loses more than
// the centred one; shifted by 0 from its centred start it is ScanGains.
func TestScanGainsFrom(t *testing.T) {
	const n, step = 16, 0.1
	c := GaussianBeam.ScanGains(nil, n, step)
	same := GaussianBeam.ScanGainsFrom(make([]float64, n), -7.5*step, step)
	for k := range c {
		if c[k] != same[k] {
			t.Fatalf("pulse %d: %g != %g", k, c[k], same[k])
		}
	}
	off := GaussianBeam.ScanGainsFrom(make([]float64, n), -7.5*step+0.8, step)
	// The sum of a Gaussian over a shifted train: each gain carries the
	// factor exp(−4 ln2·((u+s)² − u²)); check pulse 0 by the formula.
	u := -7.5*step + 0.8
	if want := math.Exp(-4 * math.Ln2 * u * u); math.Abs(off[0]-want) > 1e-15 {
		t.Errorf("pulse 0 at u=%g: %g, want %g", u, off[0], want)
	}
	if CoherentScanLoss(off, nil) <= CoherentScanLoss(c, nil) {
		t.Error("an off-centre train loses no more than the centred one")
	}
}

func TestHitsPerScan(t *testing.T) {
	// 2° beam, 60°/s (10 rpm), PRI 1 ms: the beam dwells 1/30 s, 33.3
	// pulses (arithmetic).
	if got := HitsPerScan(2, 60, 1e-3); math.Abs(got-100.0/3) > 1e-12 {
		t.Errorf("hits per scan %g, want 33.333", got)
	}
}

func TestScanLossEdges(t *testing.T) {
	if l := CoherentScanLoss([]float64{1, 1, 1}, nil); l != 1 {
		t.Errorf("pulses at the peak: loss %g, want 1", l)
	}
	if l := NoncoherentScanLoss([]float64{0, 0}); !math.IsInf(l, 1) {
		t.Errorf("no gain: loss %g, want +Inf", l)
	}
	for _, f := range []func(){
		func() { GaussianBeam.ScanGains(nil, 3, -1) },
		func() { GaussianBeam.ScanGains(nil, 3, math.NaN()) },
		func() { CoherentScanLoss(nil, nil) },
		func() { CoherentScanLoss([]float64{1}, []float64{1, 2}) },
		func() { BeamShape(0).Voltage(0) },
	} {
		func() {
			defer func() {
				if recover() == nil {
					t.Error("want a panic")
				}
			}()
			f()
		}()
	}
}

func ExampleBeamShape_BeamShapeLoss() {
	coh, non := GaussianBeam.BeamShapeLoss(20)
	fmt.Printf("coherent %.2f dB, noncoherent %.2f dB\n", DB(coh), DB(non))
	// Output: coherent 1.83 dB, noncoherent 1.67 dB
}

// TestModulatedTone: the peak of a scan-modulated tone on the Doppler map
// falls by the coherent scan loss with the plan's own window weights (the
// definition of CoherentScanLoss applied to the DFT at the tone's bin).
func TestModulatedTone(t *testing.T) {
	const n = 16
	a := GaussianBeam.ScanGains(nil, n, 0.1)
	for _, w := range []Window{nil, Hann{}} {
		plan := NewSlowTimePlan(n, MTINone, w)
		fdT := plan.BinFrequency(5)
		ref := plan.ToneResponse(nil, fdT)
		mod := plan.ModulatedToneResponse(nil, fdT, a)
		var coef []float64
		if w != nil {
			coef = w.Coefficients(make([]float64, n))
		}
		if got, want := ref[5]/mod[5], CoherentScanLoss(a, coef); math.Abs(got/want-1) > 1e-12 {
			t.Errorf("window %v: peak ratio %.12f, coherent scan loss %.12f", w, got, want)
		}
		ones := make([]float64, n)
		for i := range ones {
			ones[i] = 1
		}
		if f := plan.FlatResponse(ones); math.Abs(f-1) > 1e-12 {
			t.Errorf("window %v: flat response of unit pulses %g, want 1", w, f)
		}
		pw := make([]float64, n)
		for i, v := range a {
			pw[i] = v * v
		}
		if f, want := plan.FlatResponse(pw), 1/NoncoherentScanLoss(a); w == nil && math.Abs(f/want-1) > 1e-12 {
			t.Errorf("no window: flat response %g, want Σa²/n = %g", f, want)
		}
	}
}
