package dsp

import (
	"math"
	"math/cmplx"
	"math/rand/v2"
	"slices"
	"testing"
)

// TestCorrelatorOutputs: a plan for the first n outputs of a longer window
// against the definition y[k] = Σ x[k+i]·conj(h[i]) summed directly (x
// zero beyond its end) and against the full plan's first n outputs, for
// single blocks, overlap-save blocks (with a shorter last block), both
// FFT plans and two workers.
func TestCorrelatorOutputs(t *testing.T) {
	r := rand.New(rand.NewPCG(3, 4))
	tails := 0
	for _, c := range []struct{ nIn, n, m, workers int }{
		{1133, 734, 400, 1}, {1133, 734, 400, 2}, {1133, 1133, 400, 1}, {5000, 700, 13, 1},
		{70000, 65536, 5000, 2}, {70000, 65536, 5000, 1}, {70000, 9000, 64, 2}, {9000, 9000, 64, 1}, {300, 1, 300, 1}, {10, 10, 1, 1},
	} {
		h := make([]complex128, c.m)
		x := make([]complex128, c.nIn)
		for i := range h {
			h[i] = ComplexNormal(r)
		}
		for i := range x {
			x[i] = ComplexNormal(r)
		}
		p := NewCorrelatorOutputs(h, c.nIn, c.n, c.workers)
		if p.tail != nil {
			tails++
		}
		if p.Len() != c.n || p.InLen() != c.nIn {
			t.Fatalf("%+v: Len %d InLen %d", c, p.Len(), p.InLen())
		}
		y := p.Apply(nil, x)
		full := NewCorrelator(h, c.nIn).Apply(nil, x)
		scale := 0.0
		for _, v := range h {
			scale += real(v)*real(v) + imag(v)*imag(v)
		}
		scale = math.Sqrt(scale * float64(c.m)) // a bound on |y| of unit samples, roughly
		for _, k := range []int{0, c.n / 3, c.n / 2, c.n - 1} {
			var want complex128
			for i := range h {
				if k+i < c.nIn {
					want += x[k+i] * cmplx.Conj(h[i])
				}
			}
			if d := cmplx.Abs(y[k] - want); d > 1e-12*scale {
				t.Errorf("%+v: y[%d] = %v, direct sum %v", c, k, y[k], want)
			}
		}
		for k := range y {
			if d := cmplx.Abs(y[k] - full[k]); d > 1e-12*scale {
				t.Fatalf("%+v: y[%d] = %v, full plan %v", c, k, y[k], full[k])
			}
		}
	}
	if tails == 0 {
		t.Error("no case ran a shorter last block")
	}
}

// TestClones: a cloned correlator gives its original's outputs to the last
// bit (the same tables, the same blocks), on one and two workers; a cloned
// CA-CFAR warmed on a validity pattern gives its original's thresholds to
// the last bit, and filling the clone's caches leaves the original's
// untouched.
func TestClones(t *testing.T) {
	r := rand.New(rand.NewPCG(5, 6))
	h := make([]complex128, 300)
	x := make([]complex128, 5000)
	for i := range h {
		h[i] = ComplexNormal(r)
	}
	for i := range x {
		x[i] = ComplexNormal(r)
	}
	for _, workers := range []int{1, 2} {
		c := NewCorrelatorWorkers(h, len(x), workers)
		want := c.Apply(nil, x)
		got := c.Clone().Apply(nil, x)
		for k := range want {
			if got[k] != want[k] {
				t.Fatalf("workers %d: clone's y[%d] = %v, original %v", workers, k, got[k], want[k])
			}
		}
	}
	rho := NoiseCorrelation(nil, h)
	p := make([]float64, 700)
	valid := make([]bool, len(p))
	for i := range p {
		p[i] = r.ExpFloat64()
		valid[i] = i%97 > 3
	}
	cf := &CFAR{PFA: 1e-6, Guard: 2, Train: 16, Rho: rho}
	want := cf.ThresholdsValid(nil, p, valid)
	cl := cf.Clone()
	got := cl.ThresholdsValid(nil, p, valid)
	for k := range want {
		if got[k] != want[k] && !(math.IsInf(got[k], 1) && math.IsInf(want[k], 1)) {
			t.Fatalf("clone's threshold %d = %v, original %v", k, got[k], want[k])
		}
	}
	nPattern := len(cf.pattern)
	cl.ThresholdsValid(nil, p, nil)
	cl.ThresholdsValid(nil, p[:300], valid[:300])
	if len(cf.pattern) != nPattern || len(cf.caCoef) != len(p) || !slices.Equal(cf.caValid, valid) {
		t.Error("the clone's caches share the original's")
	}
}

// TestThresholdsValidIsLevelValid: the cell-averaging profile loop (cached
// factors, interior cells at fixed offsets) against the cell-by-cell
// definition, LevelValid (which sums the cells directly, so to 1e-12
// relative), with and without validity and correlation, for profiles
// shorter and longer than the CFAR window; a second call, from the
// cached factors, to the last bit.
func TestThresholdsValidIsLevelValid(t *testing.T) {
	r := rand.New(rand.NewPCG(7, 8))
	h := make([]complex128, 40)
	for i := range h {
		h[i] = ComplexNormal(r)
	}
	rho := NoiseCorrelation(nil, h)
	for _, n := range []int{1, 5, 21, 22, 23, 60, 500} {
		p := make([]float64, n)
		valid := make([]bool, n)
		for i := range p {
			p[i] = r.ExpFloat64()
			valid[i] = i%17 != 3
		}
		for _, v := range [][]bool{nil, valid} {
			for _, rh := range [][]complex128{nil, rho} {
				cf := &CFAR{PFA: 1e-5, Guard: 2, Train: 16, Rho: rh}
				got := cf.ThresholdsValid(nil, p, v)
				again := cf.ThresholdsValid(nil, p, v) // from the cached factors
				for k := range p {
					want := cf.LevelValid(p, v, k)
					same := math.IsInf(got[k], 1) && math.IsInf(want, 1) || math.Abs(got[k]-want) <= 1e-12*math.Abs(want)
					if !same || again[k] != got[k] {
						t.Fatalf("n %d, valid %v, rho %v: cell %d: %v (again %v), LevelValid %v", n, v != nil, rh != nil, k, got[k], again[k], want)
					}
				}
			}
		}
	}
}

// TestLevelsAt: thresholds at listed cells against ThresholdsValid's at the
// same cells (1e-12 relative: direct sums against prefix-sum
// differences), for cell averaging with and without correlation and
// validity, and for an ordered statistic (LevelValid on both sides);
// cells not listed are left alone.
func TestLevelsAt(t *testing.T) {
	r := rand.New(rand.NewPCG(9, 10))
	h := make([]complex128, 40)
	for i := range h {
		h[i] = ComplexNormal(r)
	}
	rho := NoiseCorrelation(nil, h)
	p := make([]float64, 300)
	valid := make([]bool, len(p))
	for i := range p {
		p[i] = r.ExpFloat64()
		valid[i] = i%41 > 2
	}
	cells := []int{0, 1, 5, 17, 40, 41, 42, 150, 290, 299}
	for _, cf := range []*CFAR{
		{PFA: 1e-5, Guard: 2, Train: 16},
		{PFA: 1e-5, Guard: 2, Train: 16, Rho: rho},
		{PFA: 1e-5, Guard: 3, Train: 24, Rank: 18},
	} {
		for _, v := range [][]bool{nil, valid} {
			want := cf.ThresholdsValid(nil, p, v)
			got := make([]float64, len(p))
			for i := range got {
				got[i] = -7
			}
			cf.LevelsAt(got, p, v, cells)
			for k := range p {
				if !slices.Contains(cells, k) {
					if got[k] != -7 {
						t.Fatalf("%+v: cell %d not listed but set", cf, k)
					}
					continue
				}
				if !(math.IsInf(got[k], 1) && math.IsInf(want[k], 1)) && math.Abs(got[k]-want[k]) > 1e-12*math.Abs(want[k]) {
					t.Errorf("%+v, valid %v: cell %d: %v, ThresholdsValid %v", cf, v != nil, k, got[k], want[k])
				}
			}
		}
	}
}
