package dsp

import (
	"fmt"
	"math"
	"math/cmplx"
	"math/rand/v2"
	"testing"

	"gonum.org/v1/gonum/dsp/fourier"
)

// norm2 returns the Euclidean norm of v.
func norm2(v []complex128) float64 {
	var s float64
	for _, c := range v {
		s += real(c)*real(c) + imag(c)*imag(c)
	}
	return math.Sqrt(s)
}

// Source: gonum's fourier.CmplxFFT (a port of FFTPACK), a general-purpose
// reference library. The error is measured as max|ours − gonum| over the
// transform's norm ‖X‖₂ and must stay below 1e-12.
func TestFFTPlanGonum(t *testing.T) {
	const tol = 1e-12
	rnd := rand.New(rand.NewPCG(1, 1))
	sizes := []int{1, 2, 3, 4, 5, 6, 8, 9, 10, 12, 15, 16, 25, 27, 30, 32, 45, 60, 64, 75, 81, 125,
		128, 243, 256, 360, 625, 1000, 1024, 1215, 2048, 3125, 4096, 6561, 16384, 72000, 1 << 17}
	if !testing.Short() {
		sizes = append(sizes, 576000, 1<<20)
	}
	for _, n := range sizes {
		t.Run(fmt.Sprint(n), func(t *testing.T) {
			x := randComplex(rnd, n)
			want := fourier.NewCmplxFFT(n).Coefficients(nil, x)
			got := append([]complex128(nil), x...)
			newFFTPlan(n).transform(got, make([]complex128, n))
			var e float64
			for i := range got {
				e = math.Max(e, cmplx.Abs(got[i]-want[i]))
			}
			if e /= norm2(want); e > tol {
				t.Errorf("n=%d: max error %.3g of the norm > %v", n, e, tol)
			}
		})
	}
}

// Source: the DFT definition, evaluated directly for a few small lengths.
func TestFFTPlanDefinition(t *testing.T) {
	rnd := rand.New(rand.NewPCG(4, 4))
	for _, n := range []int{7 - 1, 20, 48, 50} {
		x := randComplex(rnd, n)
		got := append([]complex128(nil), x...)
		newFFTPlan(n).transform(got, make([]complex128, n))
		for k := range n {
			var s complex128
			for i, v := range x {
				s += v * cmplx.Rect(1, -2*math.Pi*float64(k*i%n)/float64(n))
			}
			if cmplx.Abs(s-got[k]) > 1e-12*norm2(x)*math.Sqrt(float64(n)) {
				t.Errorf("n=%d k=%d: %v, want %v", n, k, got[k], s)
			}
		}
	}
}

func TestFFTPlanPanics(t *testing.T) {
	for _, n := range []int{0, 7, 14, 1001} {
		func() {
			defer func() {
				if r, ok := recover().(string); !ok || r[:5] != "dsp: " {
					t.Errorf("n=%d: panic %v, want a \"dsp: \" message", n, r)
				}
			}()
			newFFTPlan(n)
		}()
	}
}

// BenchmarkFFT compares the plan with gonum's at the lengths the
// correlator uses.
func BenchmarkFFT(b *testing.B) {
	for _, n := range []int{1215, 2048, 16384, 72000, 1 << 17, 1 << 18, 576000, 1 << 20} {
		rnd := rand.New(rand.NewPCG(3, 3))
		x := randComplex(rnd, n)
		b.Run(fmt.Sprintf("ours/n=%d", n), func(b *testing.B) {
			p, w := newFFTPlan(n), make([]complex128, n)
			b.ReportAllocs()
			for b.Loop() {
				p.transform(x, w)
			}
		})
		b.Run(fmt.Sprintf("gonum/n=%d", n), func(b *testing.B) {
			p := fourier.NewCmplxFFT(n)
			b.ReportAllocs()
			for b.Loop() {
				p.Coefficients(x, x)
			}
		})
	}
}

// The fused first stage (run with pre) must equal the transform of
// conj(x·pre), for first radices 4, 2, 3 and 5, with x left intact when it
// is neither scratch buffer. Source: gonum's CmplxFFT, as above.
func TestFFTRunFused(t *testing.T) {
	rnd := rand.New(rand.NewPCG(8, 8))
	for _, n := range []int{1, 2, 3, 5, 8, 12, 40, 64, 1024, 4096, 6000, 6561, 15625, 1 << 15} {
		x, pre := randComplex(rnd, n), randComplex(rnd, n)
		in := make([]complex128, n)
		for i := range in {
			in[i] = cmplx.Conj(x[i] * pre[i])
		}
		want := fourier.NewCmplxFFT(n).Coefficients(nil, in)
		keep := append([]complex128(nil), x...)
		a, b := make([]complex128, n), make([]complex128, n)
		got := newFFTPlan(n).run(x, a, b, pre)
		var e float64
		for i := range got {
			e = math.Max(e, cmplx.Abs(got[i]-want[i]))
		}
		if e /= norm2(want); e > 1e-12 {
			t.Errorf("n=%d: max error %.3g of the norm > 1e-12", n, e)
		}
		for i := range x {
			if x[i] != keep[i] {
				t.Fatalf("n=%d: run wrote into its source at %d", n, i)
			}
		}
	}
}
