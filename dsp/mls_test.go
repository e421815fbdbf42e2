package dsp

import (
	"math"
	"math/cmplx"
	"testing"

	"gonum.org/v1/gonum/dsp/fourier"
)

// TestMLS proves each tap set primitive: an LFSR sequence has period
// 2^n − 1 exactly when its polynomial is primitive, and then (Golomb,
// Shift Register Sequences, 1967, from memory; R-p308 for the PN
// sidelobes) a period is balanced (2^(n−1) ones) and its ±1 periodic
// autocorrelation is N at lag 0 and −1 elsewhere. A two-valued periodic
// ACF also rules out any shorter period.
func TestMLS(t *testing.T) {
	maxDeg := 20
	if testing.Short() {
		maxDeg = 14
	}
	for deg := 2; deg <= maxDeg; deg++ {
		ph, err := MLS(deg)
		if err != nil {
			t.Fatal(err)
		}
		n := 1<<deg - 1
		if len(ph) != n {
			t.Fatalf("MLS(%d): %d chips, want %d", deg, len(ph), n)
		}
		bits := make([]int, n)
		ones := 0
		for i, p := range ph {
			switch p {
			case 0:
			case math.Pi:
				bits[i] = 1
				ones++
			default:
				t.Fatalf("MLS(%d) chip %d phase %v, want 0 or π", deg, i, p)
			}
		}
		if ones != (n+1)/2 {
			t.Errorf("MLS(%d): %d chips of −1, want %d (balance)", deg, ones, (n+1)/2)
		}
		// The period closes: the recurrence holds cyclically.
		taps := mlsTaps(deg)
		for k := range n {
			b := 0
			for _, tp := range taps {
				b ^= bits[(k-tp+n)%n]
			}
			if b != bits[k] {
				t.Fatalf("MLS(%d): recurrence fails cyclically at %d: period is not %d", deg, k, n)
			}
		}
		// Periodic ACF p_k = r_k + r_{k−N} from the aperiodic ACF, which a
		// zero-padded power-of-two FFT (gonum) gives: |X|², inverse.
		m := 1
		for m < 2*n {
			m <<= 1
		}
		fft := fourier.NewCmplxFFT(m)
		x := make([]complex128, m)
		for i, b := range bits {
			x[i] = complex(1-2*float64(b), 0)
		}
		spec := fft.Coefficients(nil, x)
		for i, v := range spec {
			spec[i] = complex(real(v)*real(v)+imag(v)*imag(v), 0)
		}
		ac := fft.Sequence(nil, spec) // ac[k] = m·r_k, ac[m−k] = m·r_{−k}
		r := make([]complex128, n)
		for k := range n {
			r[k] = ac[k]
			if k > 0 {
				r[k] += ac[m-(n-k)]
			}
			r[k] /= complex(float64(m), 0)
		}
		tol := 1e-9 * float64(n)
		if cmplx.Abs(r[0]-complex(float64(n), 0)) > tol {
			t.Errorf("MLS(%d) periodic r[0] = %v, want %d", deg, r[0], n)
		}
		for k := 1; k < n; k++ {
			if v := r[k]; cmplx.Abs(v+1) > tol {
				t.Fatalf("MLS(%d) periodic r[%d] = %v, want −1", deg, k, v)
			}
		}
	}
	for _, d := range []int{-1, 0, 1, 21} {
		if _, err := MLS(d); err == nil {
			t.Errorf("MLS(%d): no error", d)
		}
	}
}

func TestMLS1023Sidelobe(t *testing.T) {
	// R-p308: a PN code of N = 1023 has its aperiodic peak sidelobe "just
	// above −30 dB" (≈ −10log10 N); tolerance ±2 dB (Richards 2014, p. 308).
	ph, _ := MLS(10)
	db := pslrDB(acfMag(codeSamples(ph)))
	if db < -32 || db > -26 {
		t.Errorf("MLS(10) aperiodic PSLR = %.2f dB, want about −30", db)
	}
}

// codeSamples returns exp(jφ) per chip.
func codeSamples(ph []float64) []complex128 {
	x := make([]complex128, len(ph))
	for i, p := range ph {
		x[i] = phasor(p)
	}
	return x
}
