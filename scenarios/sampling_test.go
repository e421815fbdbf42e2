package scenarios

import (
	"fmt"
	"math"
	"math/big"
	"math/cmplx"
	"math/rand/v2"
	"testing"

	"github.com/pulsewright/pulsewright/dsp"
)

// decimal is a value as a user types it: exact as a rational, and the
// nearest double the program receives.
type decimal struct {
	r *big.Rat
	f float64
}

func newDecimal(r *big.Rat) decimal {
	f, _ := r.Float64()
	return decimal{r, f}
}

// threeDigits returns a random decimal with three significant digits
// between lo and hi, such as 1.3e-6 or 6.98e-6.
func threeDigits(rng *rand.Rand, lo, hi float64) decimal {
	for {
		v := lo * math.Pow(hi/lo, rng.Float64())
		e := int(math.Floor(math.Log10(v))) - 2
		m := int64(math.Round(v / math.Pow(10, float64(e))))
		r, _ := new(big.Rat).SetString(fmt.Sprintf("%de%d", m, e))
		if d := newDecimal(r); d.f >= lo && d.f <= hi {
			return d
		}
	}
}

// exactChip returns ⌊(n/fs − delay)/chip⌋ of the decimal values with
// rationals: the definition the sampling must follow.
func exactChip(n int, fs, delay, chip *big.Rat) int {
	t := new(big.Rat).SetFrac64(int64(n), 1)
	t.Quo(t, fs)
	t.Sub(t, delay)
	t.Quo(t, chip)
	q := new(big.Int).Quo(t.Num(), t.Denom()) // truncates toward zero
	if t.Sign() < 0 && new(big.Rat).SetInt(q).Cmp(t) != 0 {
		q.Sub(q, big.NewInt(1))
	}
	return int(q.Int64())
}

// chipOf decides the chip of sample n like exactChip, with rationals only
// where the float quotient is within 1e-6 of a whole number (elsewhere
// the float floor is certainly right).
func chipOf(n int, fs, delay, chip decimal) int {
	q := (float64(n)/fs.f - delay.f) / chip.f
	if math.Abs(q-math.Round(q)) > 1e-6 {
		return int(math.Floor(q))
	}
	return exactChip(n, fs.r, delay.r, chip.r)
}

// randomRate returns a sample rate for chips of length chip: a whole
// number of samples per chip, a usual ratio (1.5, 2.5 …) or a three-digit
// value; as a rational, and as the double the program computes from the
// user's numbers (K/chip) or reads.
func randomRate(rng *rand.Rand, chip decimal) decimal {
	switch rng.IntN(3) {
	case 0:
		k := int64(1 + rng.IntN(8))
		return decimal{new(big.Rat).Quo(big.NewRat(k, 1), chip.r), float64(k) / chip.f}
	case 1:
		k := []float64{1, 1.5, 2, 2.5, 3, 4, 8}[rng.IntN(7)]
		kr := new(big.Rat).SetFloat64(k)
		return decimal{new(big.Rat).Quo(kr, chip.r), k / chip.f}
	}
	return threeDigits(rng, 1/chip.f, 8/chip.f)
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
// three-digit chip lengths and rates, with and without an echo delay, and
// compares every sample with the definition u(n/fs − delay), the chip
// taken as the exact rational floor of the decimal values (issue 12:
// 1.3e-6 s chips used to take the previous chip wherever t/chip lands
// just below a whole number).
func TestSampleChipsExact(t *testing.T) {
	rng := rand.New(rand.NewPCG(12, 1))
	trials := 3000
	if testing.Short() {
		trials = 300
	}
	var boundary int // samples exactly on a chip boundary: the hard cases
	zero := decimal{new(big.Rat), 0}
	for trial := range trials {
		chip := threeDigits(rng, 1e-8, 1e-4)
		fs := randomRate(rng, chip)
		w := randomCodeWaveform(rng, chip.f)
		wave, err := buildWaveform(w)
		if err != nil {
			t.Fatalf("trial %d: %+v: %v", trial, w, err)
		}
		delay := zero
		switch rng.IntN(3) {
		case 0: // a whole number of samples
			m := int64(rng.IntN(50))
			delay = decimal{new(big.Rat).Quo(big.NewRat(m, 1), fs.r), float64(m) / fs.f}
		case 1:
			delay = threeDigits(rng, 1e-9, 1e-4)
		}
		tau := wave.Duration()
		got := make([]complex128, int(math.Ceil((tau+delay.f)*fs.f))+3)
		dsp.AddEcho(got, wave, fs.f, delay.f, 1, 0)
		var nChips int
		var value func(k, n int) complex128
		switch v := wave.(type) {
		case dsp.PhaseCoded:
			nChips = len(v.Phases)
			value = func(k, n int) complex128 { return cmplx.Rect(1, v.Phases[k]) }
		case dsp.Costas:
			nChips = len(v.Order)
			m := float64(len(v.Order)-1) / 2
			value = func(k, n int) complex128 {
				f := (float64(v.Order[k]) - m) / chip.f
				return cmplx.Rect(1, 2*math.Pi*f*(float64(n)/fs.f-delay.f))
			}
		default:
			t.Fatalf("kind %s built %T", w.Kind, wave)
		}
		for n := range got {
			k := chipOf(n, fs, delay, chip)
			q := (float64(n)/fs.f - delay.f) / chip.f
			if math.Abs(q-math.Round(q)) < 1e-6 && k == int(math.Round(q)) {
				boundary++
			}
			want := complex128(0)
			if k >= 0 && k < nChips {
				want = value(k, n)
			}
			if cmplx.Abs(got[n]-want) > 1e-6 {
				t.Fatalf("trial %d: %s chip %g s, fs %g Hz, delay %g s: sample %d is %v, want %v (chip %d of %d)", trial, w.Kind, chip.f, fs.f, delay.f, n, got[n], want, k, nChips)
			}
		}
	}
	if boundary < trials {
		t.Errorf("only %d samples on chip boundaries: the property does not exercise the hard case", boundary)
	}
}

// TestChipIndexExact compares dsp.ChipIndex with the rational definition
// on samples chosen to sit on and next to chip boundaries.
func TestChipIndexExact(t *testing.T) {
	rng := rand.New(rand.NewPCG(12, 2))
	zero := decimal{new(big.Rat), 0}
	for range 20000 {
		chip := threeDigits(rng, 1e-9, 1e-3)
		fs := randomRate(rng, chip)
		k := rng.IntN(5000)
		n := int(math.Round(float64(k) * chip.f * fs.f))
		delay := zero
		if rng.IntN(3) == 0 {
			m := int64(rng.IntN(100))
			delay = decimal{new(big.Rat).Quo(big.NewRat(m, 1), fs.r), float64(m) / fs.f}
			n += int(m)
		}
		for dn := -1; dn <= 1; dn++ {
			if got, want := dsp.ChipIndex(float64(n+dn), fs.f, delay.f, chip.f), exactChip(n+dn, fs.r, delay.r, chip.r); got != want {
				t.Fatalf("ChipIndex(%d, %g, %g, %g) = %d, want %d", n+dn, fs.f, delay.f, chip.f, got, want)
			}
		}
	}
}
