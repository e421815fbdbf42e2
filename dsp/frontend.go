package dsp

import (
	"math"
	"math/rand/v2"
)

// PhaseNoise is an oscillator's phase-noise profile: the single-sideband
// level L(f) in dBc/Hz at offsets OffsetHz (Hz, > 0, strictly ascending),
// one level per offset in DBcHz. Between two points L is linear in
// log10 f (a power law in linear units); below the first offset it holds
// the first level and above the last offset the last level. The two-sided
// power spectral density of the phase φ(t), in rad²/Hz, is L(|f|) in
// linear units (small phase errors), so the phase variance over offsets
// f1 … f2 on both sides of the carrier is 2·∫L(f)df.
type PhaseNoise struct {
	OffsetHz []float64 // Hz, > 0, ascending
	DBcHz    []float64 // dBc/Hz, one per offset
}

// Level returns L(|f|) in dBc/Hz.
func (p PhaseNoise) Level(f float64) float64 {
	f = math.Abs(f)
	n := len(p.OffsetHz)
	if n == 0 {
		return math.Inf(-1)
	}
	if f <= p.OffsetHz[0] {
		return p.DBcHz[0]
	}
	for i := 1; i < n; i++ {
		if f <= p.OffsetHz[i] {
			f0, f1 := p.OffsetHz[i-1], p.OffsetHz[i]
			u := math.Log10(f/f0) / math.Log10(f1/f0)
			return p.DBcHz[i-1] + u*(p.DBcHz[i]-p.DBcHz[i-1])
		}
	}
	return p.DBcHz[n-1]
}

// Integral returns ∫ L(f) df over offsets f1 … f2 (Hz, 0 ≤ f1 ≤ f2) with
// L in linear units: the single-sideband integrated phase noise as a
// power ratio (dBc once in dB). Each power-law segment L1·(f/f1)^e is
// integrated in closed form, f1·L1·((b/f1)^(e+1) − (a/f1)^(e+1))/(e+1), or
// f1·L1·ln(b/a) when e = −1. An empty profile integrates to 0.
func (p PhaseNoise) Integral(f1, f2 float64) float64 {
	n := len(p.OffsetHz)
	if n == 0 || !(f2 > f1) {
		return 0
	}
	f1 = math.Max(f1, 0)
	sum := 0.0
	// Flat below the first point.
	if a, b := f1, math.Min(f2, p.OffsetHz[0]); b > a {
		sum += FromDB(p.DBcHz[0]) * (b - a)
	}
	for i := 1; i < n; i++ {
		x0, x1 := p.OffsetHz[i-1], p.OffsetHz[i]
		a, b := math.Max(f1, x0), math.Min(f2, x1)
		if !(b > a) {
			continue
		}
		l0 := FromDB(p.DBcHz[i-1])
		e := (p.DBcHz[i] - p.DBcHz[i-1]) / 10 / math.Log10(x1/x0) // L ∝ f^e
		if math.Abs(e+1) < 1e-12 {
			sum += l0 * x0 * math.Log(b/a)
		} else {
			sum += l0 * x0 * (math.Pow(b/x0, e+1) - math.Pow(a/x0, e+1)) / (e + 1)
		}
	}
	// Flat above the last point.
	if a, b := math.Max(f1, p.OffsetHz[n-1]), f2; b > a {
		sum += FromDB(p.DBcHz[n-1]) * (b - a)
	}
	return sum
}

// Variance returns the phase variance in rad² of offsets f1 … f2 (Hz)
// on both sides of the carrier: 2·Integral(f1, f2).
func (p PhaseNoise) Variance(f1, f2 float64) float64 { return 2 * p.Integral(f1, f2) }

// EchoBand returns ∫ L(f)·4·sin²(π·f·T) df over offsets f1 … f2 (Hz,
// 0 ≤ f1 ≤ f2), L linear: the one-sided power, as a fraction of the
// carrier, that the same oscillator puts on an echo delayed by T seconds
// when it both drives the transmitter and serves as the receiver's local
// oscillator. The echo's phase error φ(t−T) − φ(t) has the spectrum
// L(f)·|1 − exp(−j2πfT)|² = L(f)·4sin²(πfT) (range correlation: close-in
// noise cancels for a near target, far-out noise doubles). Above
// 8/T the factor is replaced by its mean, 2, which is exact where L is
// flat over each period 1/T of the factor; below, the integral is taken
// numerically (Simpson's rule on a logarithmic grid, 64 steps per
// decade). T = 0 gives 0.
func (p PhaseNoise) EchoBand(f1, f2, T float64) float64 {
	if !(f2 > f1) || !(T > 0) || len(p.OffsetHz) == 0 {
		return 0
	}
	f1 = math.Max(f1, 0)
	fc := 8 / T
	sum := 0.0
	if f2 > fc {
		sum += 2 * p.Integral(math.Max(f1, fc), f2)
	}
	a, b := f1, math.Min(f2, fc)
	if b <= a {
		return sum
	}
	// Below 1e-6/T the integrand is under 4·(π·1e-6)² of L: negligible.
	a = math.Max(a, 1e-6/T)
	if b <= a {
		return sum
	}
	g := func(u float64) float64 { // integrand in u = ln f
		f := math.Exp(u)
		s := math.Sin(math.Pi * f * T)
		return FromDB(p.Level(f)) * 4 * s * s * f
	}
	ua, ub := math.Log(a), math.Log(b)
	steps := 2 * int(math.Ceil((ub-ua)/math.Ln10*32))
	steps = max(steps, 8)
	h := (ub - ua) / float64(steps)
	acc := g(ua) + g(ub)
	for i := 1; i < steps; i++ {
		w := 2.0
		if i%2 == 1 {
			w = 4
		}
		acc += w * g(ua+float64(i)*h)
	}
	return sum + acc*h/3
}

// PhaseNoiseBins returns the variance (rad²) of each bin of an n-point
// DFT at sample rate fs (Hz) for a real stationary phase process whose
// two-sided spectrum is given by band(f1, f2), the power (rad²) of one
// side's offsets f1 … f2 (Hz): bin k (0 < k < n/2, spacing fs/n) gets the
// power of its width on its side, bin 0 the power within half a bin of
// zero on both sides, and bin n/2 (n even) half a bin on each side. Bins
// above n/2 mirror those below. The result feeds PhaseNoiseDraw.
func PhaseNoiseBins(n int, fs float64, band func(f1, f2 float64) float64) []float64 {
	v := make([]float64, n/2+1)
	df := fs / float64(n)
	for k := range v {
		switch {
		case k == 0:
			v[k] = 2 * band(0, df/2)
		case 2*k == n:
			v[k] = 2 * band((float64(k)-0.5)*df, float64(k)*df)
		default:
			v[k] = band((float64(k)-0.5)*df, (float64(k)+0.5)*df)
		}
	}
	return v
}

// PhaseNoiseDraw fills dst with one realisation (rad) of the real
// Gaussian process whose per-bin variances PhaseNoiseBins gave for
// n = len(dst): a Hermitian spectrum of independent Gaussian bins with
// those variances, inverse transformed, so the realisation is periodic
// over len(dst) samples and its variance is the bins' total. len(dst)
// must have no prime factor but 2, 3 and 5 and match bins
// (len(bins) = len(dst)/2 + 1); it panics otherwise. Draws come from rng.
// It returns dst.
func PhaseNoiseDraw(dst, bins []float64, rng *rand.Rand) []float64 {
	n := len(dst)
	if n == 0 {
		return dst
	}
	if len(bins) != n/2+1 {
		panic("dsp: PhaseNoiseDraw bins length mismatch")
	}
	spec := make([]complex128, n)
	for k, v := range bins {
		if !(v > 0) {
			continue
		}
		if k == 0 || 2*k == n {
			spec[k] = complex(math.Sqrt(v)*rng.NormFloat64(), 0)
			continue
		}
		// Bins k and n−k conjugate, so the inverse is real; the pair
		// carries variance 2·v, v on each side.
		z := complex(rng.NormFloat64(), rng.NormFloat64()) * complex(math.Sqrt(v/2), 0)
		spec[k] = z
		spec[n-k] = complex(real(z), -imag(z))
	}
	// x[i] = Σ_k X[k]·exp(+j2πki/n).
	newFFTPlan(n).inverse(spec, make([]complex128, n))
	for i := range dst {
		dst[i] = real(spec[i])
	}
	return dst
}

// FFTLen returns the smallest length ≥ n whose prime factors are 2, 3
// and 5: a length PhaseNoiseDraw and the correlators take.
func FFTLen(n int) int { return fftSize(n) }

// ADC is an analog-to-digital converter on both I and Q: Bits bits per
// channel over ±FullScale (the amplitude a full-scale tone reaches on each
// channel, in the units of the samples). Quantisation is mid-rise: levels
// at (i + ½)·Δ, Δ = 2·FullScale/2^Bits; a channel beyond ±FullScale is
// clipped to the outermost level.
type ADC struct {
	Bits      int
	FullScale float64
}

// Step returns the quantisation step Δ = 2·FullScale/2^Bits.
func (a ADC) Step() float64 { return 2 * a.FullScale / math.Exp2(float64(a.Bits)) }

// NoisePower returns the quantisation noise power of a complex sample,
// Δ²/12 on each of I and Q: Δ²/6, in the samples' power units (the
// uniform-error model of W. Kester, "Taking the Mystery out of the
// Infamous Formula, SNR = 6.02N + 1.76 dB", Analog Devices MT-001).
func (a ADC) NoisePower() float64 { d := a.Step(); return d * d / 6 }

// SQNRDB returns the signal-to-quantisation-noise ratio of a full-scale
// sine on one channel, 10·log10(1.5·2^(2·Bits)) = 6.02·Bits + 1.76 dB
// (Kester, MT-001).
func (a ADC) SQNRDB() float64 { return DB(1.5 * math.Exp2(2*float64(a.Bits))) }

// GaussianNoise returns, for a zero-mean Gaussian input of standard
// deviation sigma on one channel, the quantiser's Bussgang decomposition
// Q(x) = gain·x + d with d uncorrelated with x: gain = E[x·Q(x)]/σ², and
// the power of d re gain²·σ², ratio = E[Q(x)²]/(gain²·σ²) − 1, the
// quantisation noise as a fraction of the input noise, seen through the
// same gain as small signals. When the input spans many steps,
// gain → 1 and ratio → Δ²/(12σ²), the uniform model; when σ is below a
// step, the mid-rise levels ±Δ/2 dominate and the ratio grows. Both are
// exact sums over the levels of E[·] under the normal law; an input
// beyond full scale counts as clipped to the outermost level.
func (a ADC) GaussianNoise(sigma float64) (gain, ratio float64) {
	d := a.Step()
	top := math.Exp2(float64(a.Bits-1)) - 0.5 // outermost level, steps
	pdf := func(x float64) float64 { return math.Exp(-x*x/2) / math.Sqrt(2*math.Pi) }
	cdf := func(x float64) float64 { return 0.5 * math.Erfc(-x/math.Sqrt2) }
	// Level l (in steps) covers [l−½, l+½)·Δ, the outermost ones to ±∞;
	// by symmetry sum the positive side and double.
	var exq, eq2 float64
	lmax := math.Min(top, math.Ceil(12*sigma/d)+0.5)
	for l := 0.5; l <= lmax; l++ {
		lo, hi := (l-0.5)*d/sigma, (l+0.5)*d/sigma
		if l >= top || l >= lmax {
			hi = math.Inf(1)
		}
		p := cdf(hi) - cdf(lo)
		m := sigma * (pdf(lo) - pdf(hi)) // E[x·1{x in the interval}]
		exq += 2 * l * d * m
		eq2 += 2 * l * d * l * d * p
	}
	gain = exq / (sigma * sigma)
	if !(gain > 0) {
		return 0, math.Inf(1)
	}
	return gain, eq2/(gain*gain*sigma*sigma) - 1
}

// Apply quantises x into dst (dst may be x; nil allocates) and returns
// dst and the number of samples with a channel beyond full scale.
func (a ADC) Apply(dst, x []complex128) ([]complex128, int) {
	if dst == nil {
		dst = make([]complex128, len(x))
	}
	if len(dst) != len(x) {
		panic("dsp: ADC destination length mismatch")
	}
	d := a.Step()
	top := math.Exp2(float64(a.Bits-1)) - 0.5 // outermost level in steps
	clipped := 0
	q := func(v float64) (float64, bool) {
		l := math.Min(math.Max(math.Floor(v/d)+0.5, -top), top)
		return l * d, v > a.FullScale || v < -a.FullScale
	}
	for i, v := range x {
		re, c1 := q(real(v))
		im, c2 := q(imag(v))
		if c1 || c2 {
			clipped++
		}
		dst[i] = complex(re, im)
	}
	return dst, clipped
}

// Clip limits each channel of x to ±FullScale without quantising, into
// dst (dst may be x; nil allocates): the ADC's saturation alone, which
// the noise-free analysis applies to one echo at a time. It returns dst
// and the number of samples clipped.
func (a ADC) Clip(dst, x []complex128) ([]complex128, int) {
	if dst == nil {
		dst = make([]complex128, len(x))
	}
	if len(dst) != len(x) {
		panic("dsp: ADC destination length mismatch")
	}
	fsc := a.FullScale
	n := 0
	for i, v := range x {
		re, im := real(v), imag(v)
		c := false
		if re > fsc || re < -fsc {
			re, c = math.Copysign(fsc, re), true
		}
		if im > fsc || im < -fsc {
			im, c = math.Copysign(fsc, im), true
		}
		if c {
			n++
		}
		dst[i] = complex(re, im)
	}
	return dst, n
}

// IQImbalance is the receiver's quadrature error: the Q channel has gain
// g = 10^(GainDB/20) relative to I and its local oscillator is PhaseDeg
// degrees off quadrature, so y = I + j·g·(Q·cos φ − I·sin φ) for
// x = I + jQ. Equivalently y = μ·x + ν·conj(x) with μ = (1 + g·e^(−jφ))/2
// and ν = (1 − g·e^(+jφ))/2: a tone at f keeps |μ|² of its power and gets
// an image at −f with |ν|².
type IQImbalance struct {
	GainDB   float64 // dB, Q re I
	PhaseDeg float64 // degrees off quadrature
}

// Coefficients returns μ and ν.
func (q IQImbalance) Coefficients() (mu, nu complex128) {
	g := math.Pow(10, q.GainDB/20)
	s, c := math.Sincos(q.PhaseDeg * math.Pi / 180)
	mu = complex((1+g*c)/2, g*s/2)
	nu = complex((1-g*c)/2, -g*s/2)
	return mu, nu
}

// ImageRejectionDB returns |μ|²/|ν|² in dB, which equals
// (1 + 2g·cos φ + g²)/(1 − 2g·cos φ + g²); +Inf for a perfect receiver.
func (q IQImbalance) ImageRejectionDB() float64 {
	mu, nu := q.Coefficients()
	a, b := real(mu)*real(mu)+imag(mu)*imag(mu), real(nu)*real(nu)+imag(nu)*imag(nu)
	if b == 0 {
		return math.Inf(1)
	}
	return DB(a / b)
}

// Apply writes μ·x + ν·conj(x) into dst (dst may be x; nil allocates).
func (q IQImbalance) Apply(dst, x []complex128) []complex128 {
	if dst == nil {
		dst = make([]complex128, len(x))
	}
	if len(dst) != len(x) {
		panic("dsp: IQImbalance destination length mismatch")
	}
	mu, nu := q.Coefficients()
	for i, v := range x {
		dst[i] = mu*v + nu*complex(real(v), -imag(v))
	}
	return dst
}

// RadarHorizon returns the distance (m) at which a ray from an antenna h1
// metres above a smooth sphere of radius ae (m) grazes the surface on its
// way to a point h2 metres above it: √(2·ae·h1 + h1²) + √(2·ae·h2 + h2²),
// the sum of each height's distance to the horizon. On the 4/3 Earth
// (ae = 4/3 · 6371 km, standard refraction) this is about
// 4.12·(√h1 + √h2) km with heights in metres: 22.2 km for 10 m and 5 m.
func RadarHorizon(h1, h2, ae float64) float64 {
	return math.Sqrt(2*ae*h1+h1*h1) + math.Sqrt(2*ae*h2+h2*h2)
}

// STCGain returns the power gain (≤ 1) of a sensitivity time control
// with law R^exponent between start and stop (m, 0 < start < stop):
// (R/stop)^exponent for start ≤ R ≤ stop, (start/stop)^exponent nearer,
// 1 beyond stop. With exponent 4 it offsets the R⁻⁴ of the radar
// equation: a point target's echo power is constant from start to stop.
func STCGain(r, start, stop, exponent float64) float64 {
	switch {
	case r >= stop:
		return 1
	case r <= start:
		return math.Pow(start/stop, exponent)
	}
	return math.Pow(r/stop, exponent)
}
