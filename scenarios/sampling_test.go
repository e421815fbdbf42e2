package scenarios

import (
	"math"
	"math/big"
	"math/cmplx"
	"math/rand/v2"
	"testing"

	"github.com/pulsewright/pulsewright/dsp"
)

// threeDigits returns a random value with three significant digits
// between lo and hi (lo, hi > 0), as a user types them: 1.3e-6, 6.98e-6.
func threeDigits(rng *rand.Rand, lo, hi float64) float64 {
	for {
		v := lo * math.Pow(hi/lo, rng.Float64())
		e := math.Floor(math.Log10(v)) - 2
		m := math.Round(v / math.Pow(10, e))
		// Parse the decimal as Go would from the text, e.g. "698e-8".
		x := m * math.Pow(10, e)
		if e < 0 {
			x = m / math.Pow(10, -e)
		}
		if x >= lo && x <= hi {
			return x
		}
	}
}

// exactChip returns ⌊(n/fs − delay)/chip⌋ computed with rationals from
// the double values: the definition the sampling must follow.
func exactChip(n int, fs, delay, chip float64) int {
	t := new(big.Rat).SetFrac64(int64(n), 1)
	t.Quo(t, new(big.Rat).SetFloat64(fs))
	t.Sub(t, new(big.Rat).SetFloat64(delay))
	t.Quo(t, new(big.Rat).SetFloat64(chip))
	q := new(big.Int).Quo(t.Num(), t.Denom()) // truncates toward zero
	if t.Sign() < 0 && new(big.Rat).SetInt(q).Cmp(t) != 0 {
		q.Sub(q, big.NewInt(1))
	}
	return int(q.Int64())
}

// chipOf decides the chip of sample n like exactChip, using rationals only
// where the float quotient is within 1e-6 of a whole number (elsewhere
// the float floor is certainly right).
func chipOf(n int, fs, delay, chip float64) int {
	q := (float64(n)/fs - delay) / chip
	if math.Abs(q-math.Round(q)) > 1e-6 {
		return int(math.Floor(q))
	}
	return exactChip(n, fs, delay, chip)
}

// randomCodeWaveform returns a valid chip-based waveform of a random kind
// with the given chip.
func randomCodeWaveform(rng *rand.Rand, chip float64) Waveform {
	kinds := []string{KindBarker, KindMPS, KindMLS, KindFrank, KindP1, KindP2, KindP3, KindP4, KindZadoffChu, KindCostas, KindPhaseCode}
	w := Waveform{Kind: kinds[rng.IntN(len(kinds))], ChipS: chip}
	switch w.Kind {
	case KindBarker:
		w.Length = []int{2, 3, 4, 5, 7, 11, 13}[rng.IntN(7)]
	case KindMPS:
		w.Length = 2 + rng.IntN(40)
	case KindMLS:
		w.Degree = 2 + rng.IntN(8)
	case KindFrank, KindP1:
		m := 2 + rng.IntN(10)
		w.Length = m * m
	case KindP2:
		m := 2 * (1 + rng.IntN(5))
		w.Length = m * m
	case KindP3, KindP4:
		w.Length = 2 + rng.IntN(150)
	case KindZadoffChu:
		w.Length = 2 + rng.IntN(120)
		for w.Root = 1 + rng.IntN(w.Length-1); gcd(w.Root, w.Length) != 1; w.Root = 1 + rng.IntN(w.Length-1) {
		}
	case KindCostas:
		w.Length = []int{2, 4, 6, 10, 12, 16, 18, 22}[rng.IntN(8)]
	case KindPhaseCode:
		w.PhasesDeg = make([]float64, 1+rng.IntN(40))
		for i := range w.PhasesDeg {
			w.PhasesDeg[i] = float64(rng.IntN(360))
		}
	}
	return w
}

// TestSampleChipsExact builds every chip-based kind at thousands of
// three-digit chip lengths and rates, with and without a fractional echo
// delay, and compares every sample with the definition u(n/fs − delay),
// the chip taken as the exact rational floor (issue 12: 1.3e-6 s chips
// used to take the previous chip wherever t/chip lands just below a whole
// number).
func TestSampleChipsExact(t *testing.T) {
	rng := rand.New(rand.NewPCG(12, 1))
	trials := 3000
	if testing.Short() {
		trials = 300
	}
	var boundary int // samples within 1e-6 of a chip boundary: the hard cases
	for trial := range trials {
		chip := threeDigits(rng, 1e-8, 1e-4)
		var fs float64
		switch rng.IntN(3) {
		case 0: // a whole number of samples per chip, as users set it
			fs = float64(1+rng.IntN(8)) / chip
		case 1:
			fs = threeDigits(rng, 1/chip, 8/chip)
		default:
			fs = []float64{1, 1.5, 2, 2.5, 3, 4, 8}[rng.IntN(7)] / chip
		}
		w := randomCodeWaveform(rng, chip)
		wave, err := buildWaveform(w)
		if err != nil {
			t.Fatalf("trial %d: %+v: %v", trial, w, err)
		}
		delay := 0.0
		if rng.IntN(2) == 0 {
			delay = float64(rng.IntN(50)) / fs
			if rng.IntN(2) == 0 {
				delay = threeDigits(rng, 1e-9, 1e-4)
			}
		}
		tau := wave.Duration()
		got := make([]complex128, int(math.Ceil((tau+delay)*fs))+3)
		dsp.AddEcho(got, wave, fs, delay, 1, 0)
		var nChips int
		value := func(k, n int) complex128 { return 0 }
		switch v := wave.(type) {
		case dsp.PhaseCoded:
			nChips = len(v.Phases)
			value = func(k, n int) complex128 { return cmplx.Rect(1, v.Phases[k]) }
		case dsp.Costas:
			nChips = len(v.Order)
			m := float64(len(v.Order)-1) / 2
			value = func(k, n int) complex128 {
				f := (float64(v.Order[k]) - m) / chip
				return cmplx.Rect(1, 2*math.Pi*f*(float64(n)/fs-delay))
			}
		default:
			t.Fatalf("kind %s built %T", w.Kind, wave)
		}
		for n := range got {
			q := (float64(n)/fs - delay) / chip
			if math.Abs(q-math.Round(q)) < 1e-6 {
				boundary++
			}
			k := chipOf(n, fs, delay, chip)
			want := complex128(0)
			if k >= 0 && k < nChips {
				want = value(k, n)
			}
			if cmplx.Abs(got[n]-want) > 1e-6 {
				t.Fatalf("trial %d: %s chip %g s, fs %g Hz, delay %g s: sample %d is %v, want %v (chip %d of %d)", trial, w.Kind, chip, fs, delay, n, got[n], want, k, nChips)
			}
		}
	}
	if boundary < trials {
		t.Errorf("only %d samples near chip boundaries: the property does not exercise the hard case", boundary)
	}
}

// TestChipIndexExact compares dsp.ChipIndex with the rational definition
// on values chosen to sit on and next to chip boundaries.
func TestChipIndexExact(t *testing.T) {
	rng := rand.New(rand.NewPCG(12, 2))
	for range 20000 {
		chip := threeDigits(rng, 1e-9, 1e-3)
		fs := threeDigits(rng, 0.5/chip, 16/chip)
		if rng.IntN(2) == 0 {
			fs = float64(1+rng.IntN(16)) / chip
		}
		k := rng.IntN(5000)
		n := int(math.Round(float64(k) * chip * fs))
		delay := 0.0
		if rng.IntN(3) == 0 {
			delay = float64(rng.IntN(100)) / fs
			n += rng.IntN(100)
		}
		for dn := -1; dn <= 1; dn++ {
			if got, want := dsp.ChipIndex(float64(n+dn), fs, delay, chip), exactChip(n+dn, fs, delay, chip); got != want {
				t.Fatalf("ChipIndex(%d, %g, %g, %g) = %d, want %d", n+dn, fs, delay, chip, got, want)
			}
		}
	}
}
