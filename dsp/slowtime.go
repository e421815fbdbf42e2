package dsp

import (
	"math"

	"gonum.org/v1/gonum/dsp/fourier"
)

// MTI canceller kinds, as binomial tap sets in slow time.
var (
	MTINone       = []float64{1}
	MTITwoPulse   = []float64{1, -1}    // y_p = x_p − x_{p−1}
	MTIThreePulse = []float64{1, -2, 1} // y_p = x_p − 2x_{p−1} + x_{p−2}
)

// MTIResponse returns the power response of an MTI canceller with taps h
// at the normalised Doppler frequency fdT = f_d·PRI (cycles per pulse),
// divided by its noise gain Σh², so that white noise keeps unit power:
//
//	|H(fdT)|² / Σh²,  H(fdT) = Σ_i h_i·e^{−j2π·fdT·i}.
//
// For the two-pulse canceller this is 2·sin²(π·fdT); for the three-pulse,
// (16/6)·sin⁴(π·fdT) (Richards 2014, §5.2.2).
func MTIResponse(h []float64, fdT float64) float64 {
	var s complex128
	var g float64
	for i, v := range h {
		s += complex(v, 0) * expj(-2*math.Pi*fdT*float64(i))
		g += v * v
	}
	return (real(s)*real(s) + imag(s)*imag(s)) / g
}

// SlowTimePlan turns the compressed samples of one range cell over a
// coherent processing interval of N pulses into a Doppler spectrum: an
// MTI canceller (taps h), then a window across the M = N−len(h)+1
// cancelled pulses, then an M-point DFT. Output bin d (0 … M−1) is
// centred on the Doppler frequency (d − ⌊M/2⌋)/M · PRF (negative
// frequencies first, zero at bin ⌊M/2⌋). The output is scaled so that
// white noise of unit power per pulse has unit power in every bin. The
// plan is not safe for concurrent use.
type SlowTimePlan struct {
	n, m  int
	taps  []float64
	w     []float64
	scale float64
	fft   *fourier.CmplxFFT // used when M has a prime factor above 5
	fast  *fftPlan
	buf   []complex128
	work  []complex128
}

// smooth235 reports whether n has no prime factor above 5.
func smooth235(n int) bool {
	for _, p := range []int{2, 3, 5} {
		for n%p == 0 {
			n /= p
		}
	}
	return n == 1
}

// NewSlowTimePlan prepares slow-time processing of n pulses with MTI taps
// h (MTINone for none) and window w (nil for none). It panics if fewer
// than len(h) pulses are given.
func NewSlowTimePlan(n int, h []float64, w Window) *SlowTimePlan {
	m := n - len(h) + 1
	if m < 1 {
		panic("dsp: slow-time plan needs at least as many pulses as MTI taps")
	}
	p := &SlowTimePlan{n: n, m: m, taps: append([]float64(nil), h...), w: make([]float64, m)}
	if w == nil {
		w = Rectangular{}
	}
	w.Coefficients(p.w)
	var hg, wg float64
	for _, v := range h {
		hg += v * v
	}
	for _, v := range p.w {
		wg += v * v
	}
	p.scale = 1 / math.Sqrt(hg*wg)
	if smooth235(m) {
		p.fast = newFFTPlan(m)
		p.work = make([]complex128, m)
	} else {
		p.fft = fourier.NewCmplxFFT(m)
	}
	p.buf = make([]complex128, m)
	return p
}

// Pulses returns N; Bins returns M.
func (p *SlowTimePlan) Pulses() int { return p.n }

// Bins returns the number of Doppler bins M.
func (p *SlowTimePlan) Bins() int { return p.m }

// BinFrequency returns the normalised Doppler frequency (cycles per pulse,
// in [−½, ½)) of bin d.
func (p *SlowTimePlan) BinFrequency(d int) float64 {
	return float64(d-p.m/2) / float64(p.m)
}

// Apply processes the n pulses x of one range cell into dst (Bins()
// values; nil allocates) and returns dst. It panics on wrong lengths.
func (p *SlowTimePlan) Apply(dst, x []complex128) []complex128 {
	if len(x) != p.n {
		panic("dsp: slow-time input length mismatch")
	}
	if dst == nil {
		dst = make([]complex128, p.m)
	}
	if len(dst) != p.m {
		panic("dsp: slow-time destination length mismatch")
	}
	l := len(p.taps)
	for q := range p.m {
		var s complex128
		for i, h := range p.taps {
			s += complex(h, 0) * x[q+l-1-i]
		}
		p.buf[q] = s * complex(p.w[q]*p.scale, 0)
	}
	if p.fast != nil {
		p.fast.transform(p.buf, p.work)
	} else {
		p.fft.Coefficients(p.buf, p.buf)
	}
	half := p.m / 2
	copy(dst[half:], p.buf[:p.m-half])
	copy(dst[:half], p.buf[p.m-half:])
	return dst
}

// ToneResponse fills dst (Bins() values; nil allocates) with the power
// in each bin of a unit-power tone at normalised Doppler frequency fdT
// (cycles per pulse), relative to the plan's noise power per bin. A tone
// that falls on a bin centre with no window and no MTI gives N there:
// the coherent integration gain.
func (p *SlowTimePlan) ToneResponse(dst []float64, fdT float64) []float64 {
	if dst == nil {
		dst = make([]float64, p.m)
	}
	x := make([]complex128, p.n)
	for i := range x {
		x[i] = expj(2 * math.Pi * fdT * float64(i))
	}
	y := p.Apply(nil, x)
	for d, v := range y {
		dst[d] = real(v)*real(v) + imag(v)*imag(v)
	}
	return dst
}

// Bin returns the bin nearest to normalised Doppler frequency fdT, after
// folding it into [−½, ½).
func (p *SlowTimePlan) Bin(fdT float64) int {
	f := fdT - math.Floor(fdT+0.5)
	d := int(math.Round(f*float64(p.m))) + p.m/2
	return ((d % p.m) + p.m) % p.m
}

// Fold returns fdT folded into [−½, ½).
func Fold(fdT float64) float64 { return fdT - math.Floor(fdT+0.5) }

// CFAR2D is a cell-averaging or ordered-statistic CFAR on a range–Doppler
// map: training cells fill a rectangle of ±(GuardR+TrainR/2) range cells
// and ±(GuardD+TrainD/2) Doppler bins around the cell under test, less the
// guard rectangle ±GuardR × ±GuardD. Range stops at the map's edges;
// Doppler wraps around (the spectrum is periodic).
type CFAR2D struct {
	PFA            float64
	GuardR, TrainR int // range guard cells each side, range training cells both sides together
	GuardD, TrainD int // Doppler guard bins each side, Doppler training bins both sides together
	Rank           int // ordered-statistic rank scaled to the cells present (see CFAR); 0 for cell averaging

	c CFAR
}

// Level returns the threshold at range cell k and Doppler bin d of a map
// with nr range cells and nd bins, whose power at (k, d) is p(k, d).
func (c *CFAR2D) Level(p func(k, d int) float64, k, d, nr, nd int) float64 {
	c.c.PFA, c.c.Rank, c.c.Train = c.PFA, c.Rank, max(c.cells(), 1)
	hr, hd := c.GuardR+c.TrainR/2, c.GuardD+c.TrainD/2
	hd = min(hd, (nd-1)/2)
	vals := c.c.scratch[:0]
	for dk := -hr; dk <= hr; dk++ {
		kk := k + dk
		if kk < 0 || kk >= nr {
			continue
		}
		for dd := -hd; dd <= hd; dd++ {
			if abs(dk) <= c.GuardR && abs(dd) <= c.GuardD {
				continue
			}
			vals = append(vals, p(kk, ((d+dd)%nd+nd)%nd))
		}
	}
	c.c.scratch = vals
	if len(vals) == 0 {
		return math.Inf(1)
	}
	if c.Rank == 0 {
		s := 0.0
		for _, v := range vals {
			s += v
		}
		return c.c.Multiplier(len(vals)) * s / float64(len(vals))
	}
	return c.c.Multiplier(len(vals)) * quickSelect(vals, c.c.rank(len(vals))-1)
}

// cells returns the number of training cells away from the map's edges.
func (c *CFAR2D) cells() int {
	return (2*(c.GuardR+c.TrainR/2)+1)*(2*(c.GuardD+c.TrainD/2)+1) - (2*c.GuardR+1)*(2*c.GuardD+1)
}

func abs(x int) int {
	if x < 0 {
		return -x
	}
	return x
}
