package dsp

import (
	"fmt"
	"math"
	"math/cmplx"
	"math/rand/v2"
	"testing"
)

// normalResidual returns ‖Aᴴ(A·g − e)‖ / ‖Aᴴe‖ for g = conj(h): zero at
// the least-squares optimum (the normal equations), whatever the solver.
func normalResidual(code, h []complex128, lead int) float64 {
	n, l := len(code), len(h)
	rows := n + l - 1
	centre := l - 1 - lead
	res := make([]complex128, rows)
	for r := range rows {
		for m := range l {
			if i := r - (l - 1) + m; i >= 0 && i < n {
				res[r] += code[i] * cmplx.Conj(h[m])
			}
		}
	}
	res[centre]--
	var num, den float64
	for m := range l {
		var s, b complex128
		for r := range rows {
			if i := r - (l - 1) + m; i >= 0 && i < n {
				s += cmplx.Conj(code[i]) * res[r]
				if r == centre {
					b += cmplx.Conj(code[i])
				}
			}
		}
		num += real(s)*real(s) + imag(s)*imag(s)
		den += real(b)*real(b) + imag(b)*imag(b)
	}
	return math.Sqrt(num / den)
}

// Source: numpy.linalg.lstsq on the same problem (testdata/golden/
// lsfilter.py, lsfilter.json): taps, PSLR and mismatch loss for Barker-13
// at one sample per chip. The brief asked for a PSLR 20 dB below the
// matched filter's −22.28 dB (§9) at 39 taps; the least-squares optimum
// at 39 taps is −38.47 dB (numpy agrees), and −42.3 dB is first reached
// at 45 taps, which is checked here.
func TestLeastSquaresBarker13(t *testing.T) {
	const tolTaps, tolDB = 1e-9, 1e-6
	var g struct {
		Numpy string
		Cases []struct {
			Length, Lead   int
			H              []float64
			PSLRDB         float64 `json:"pslr_db"`
			MismatchLossDB float64 `json:"mismatch_loss_db"`
		}
	}
	readGolden(t, "lsfilter.json", &g)
	if len(g.Cases) == 0 {
		t.Fatal("no cases")
	}
	code := barker13(1)
	matched := ResponseFigures(code, code, 0, 1e6, 0)
	for _, c := range g.Cases {
		t.Run(fmt.Sprint("L=", c.Length), func(t *testing.T) {
			h, lead, err := LeastSquaresFilter(code, c.Length)
			if err != nil {
				t.Fatal(err)
			}
			if lead != c.Lead || len(h) != c.Length {
				t.Fatalf("lead %d, len %d; want %d, %d", lead, len(h), c.Lead, c.Length)
			}
			for i, want := range c.H {
				if cmplx.Abs(h[i]-complex(want, 0)) > tolTaps {
					t.Fatalf("h[%d] = %v, numpy %s gives %v", i, h[i], g.Numpy, want)
				}
			}
			f := ResponseFigures(code, h, lead, 1e6, 0)
			t.Logf("Barker-13, %d-tap LS filter: PSLR %.2f dB (matched %.2f), ISLR %.2f dB, mismatch loss %.3f dB",
				c.Length, f.PSLRDB, matched.PSLRDB, f.ISLRDB, f.MismatchLossDB)
			if math.Abs(f.PSLRDB-c.PSLRDB) > tolDB || math.Abs(f.MismatchLossDB-c.MismatchLossDB) > tolDB {
				t.Errorf("PSLR %.6f dB, loss %.6f dB; numpy %.6f, %.6f", f.PSLRDB, f.MismatchLossDB, c.PSLRDB, c.MismatchLossDB)
			}
			if c.Length >= 45 && f.PSLRDB > matched.PSLRDB-20 {
				t.Errorf("PSLR %.2f dB, want ≤ %.2f", f.PSLRDB, matched.PSLRDB-20)
			}
			if f.PeakOffset != 0 {
				t.Errorf("peak offset %g s, want 0 (peak at lag −lead)", f.PeakOffset)
			}
			if r := normalResidual(code, h, lead); r > 1e-10 {
				t.Errorf("normal-equation residual %.3g", r)
			}
			// An echo at sample d peaks at y[d−lead].
			x := make([]complex128, 200)
			copy(x[90:], code)
			y := NewCorrelator(h, len(x)).Apply(nil, x)
			mag := make([]float64, len(y))
			for i, v := range y {
				mag[i] = cmplx.Abs(v)
			}
			if k := argmax(mag); k != 90-lead {
				t.Errorf("echo at 90 peaks at %d, want %d", k, 90-lead)
			}
		})
	}
}

// Source: the normal equations Aᴴ(Ag − e) = 0 characterise the optimum;
// the Cholesky path (gonum/mat) and the Levinson path must both satisfy them
// and agree with each other.
func TestLeastSquaresSolvers(t *testing.T) {
	rnd := rand.New(rand.NewPCG(7, 7))
	for _, c := range []struct{ n, l int }{{13, 13}, {13, 40}, {31, 93}, {20, 128}, {64, 200}, {100, 1000}} {
		t.Run(fmt.Sprintf("n=%d/L=%d", c.n, c.l), func(t *testing.T) {
			code := make([]complex128, c.n) // random polyphase code
			for i := range code {
				code[i] = expj(2 * math.Pi * rnd.Float64())
			}
			h, lead, err := LeastSquaresFilter(code, c.l)
			if err != nil {
				t.Fatal(err)
			}
			if r := normalResidual(code, h, lead); r > 1e-8 {
				t.Errorf("normal-equation residual %.3g", r)
			}
			if c.l <= denseMaxTaps {
				g, err := lsLevinson(code, c.l, lead, 0)
				if err != nil {
					t.Fatal(err)
				}
				for i := range g {
					g[i] = cmplx.Conj(g[i])
				}
				if e := maxRelErr(g, h); e > 1e-8 {
					t.Errorf("Levinson vs Cholesky: relative difference %.3g", e)
				}
			}
		})
	}
}

func TestLeastSquaresErrors(t *testing.T) {
	for _, c := range []struct {
		code   []complex128
		length int
	}{
		{nil, 10}, {[]complex128{1, 1, 1}, 2}, {[]complex128{1}, MaxLSFilterTaps + 1},
		{[]complex128{0, 0}, 4}, {[]complex128{1, complex(math.NaN(), 0)}, 4},
	} {
		if _, _, err := LeastSquaresFilter(c.code, c.length); err == nil {
			t.Errorf("code %v length %d: no error", c.code, c.length)
		}
	}
}
