package dsp

import (
	"math"
	"math/cmplx"
	"slices"

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
	// A staggered plan (NewStaggeredPlan): pulse times in mean PRIs and
	// the M×M filter matrix, row d for bin d.
	times []float64
	dft   []complex128
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
	if p.times != nil {
		p.applyStaggered(dst)
		return dst
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
// (cycles per pulse; per mean PRI for a staggered plan, the tone sampled
// at the true pulse times), relative to the plan's noise power per bin. A tone
// that falls on a bin centre with no window and no MTI gives N there:
// the coherent integration gain.
func (p *SlowTimePlan) ToneResponse(dst []float64, fdT float64) []float64 {
	if dst == nil {
		dst = make([]float64, p.m)
	}
	x := make([]complex128, p.n)
	for i := range x {
		x[i] = p.Tone(fdT, i)
	}
	y := p.Apply(nil, x)
	for d, v := range y {
		dst[d] = real(v)*real(v) + imag(v)*imag(v)
	}
	return dst
}

// ModulatedToneResponse is ToneResponse for a tone whose amplitude
// changes from pulse to pulse: pulse i carries a[i]·exp(j2π·fdT·i) (a of
// length Pulses(); nil is ToneResponse). A beam scanning past a point
// target modulates its echo so (ScanGains); the response then spreads
// over more bins and its peak falls by the coherent scan loss. It panics
// if a has the wrong length.
func (p *SlowTimePlan) ModulatedToneResponse(dst []float64, fdT float64, a []float64) []float64 {
	if a == nil {
		return p.ToneResponse(dst, fdT)
	}
	if len(a) != p.n {
		panic("dsp: slow-time modulation length mismatch")
	}
	if dst == nil {
		dst = make([]float64, p.m)
	}
	x := make([]complex128, p.n)
	for i := range x {
		x[i] = complex(a[i], 0) * p.Tone(fdT, i)
	}
	y := p.Apply(nil, x)
	for d, v := range y {
		dst[d] = real(v)*real(v) + imag(v)*imag(v)
	}
	return dst
}

// FlatResponse returns the mean power per bin of a return that
// decorrelates from pulse to pulse, pulse i of power s[i] (length
// Pulses()), relative to the plan's noise power per bin:
// Σ_q w_q²·Σ_i h_i²·s[q+L−1−i] / (Σw²·Σh²), 1 when every s[i] is 1. It
// panics if s has the wrong length.
func (p *SlowTimePlan) FlatResponse(s []float64) float64 {
	if len(s) != p.n {
		panic("dsp: slow-time power length mismatch")
	}
	l := len(p.taps)
	sum := 0.0
	for q := range p.m {
		v := 0.0
		for i, h := range p.taps {
			v += h * h * s[q+l-1-i]
		}
		sum += p.w[q] * p.w[q] * v
	}
	return sum * p.scale * p.scale
}

// FlatResponseBins fills dst (Bins() values; nil allocates) with the
// power in each bin of a return that decorrelates from pulse to pulse,
// pulse i of power s[i] (length Pulses()), relative to unit noise per
// pulse: Σ_i s[i]·|A_{d,i}|², A the plan's linear map (MTI, window, DFT
// or a stagger's filters, scaling), the diagonal of NoiseCovariance when
// every s[i] is 1. Its mean over the bins is FlatResponse(s) on a uniform
// train; behind an MTI canceller it follows the canceller's response
// (MTIResponse) smoothed by the window, as noise does. It panics if s has
// the wrong length.
func (p *SlowTimePlan) FlatResponseBins(dst, s []float64) []float64 {
	if len(s) != p.n {
		panic("dsp: slow-time power length mismatch")
	}
	if dst == nil {
		dst = make([]float64, p.m)
	}
	clear(dst)
	e := make([]complex128, p.n)
	y := make([]complex128, p.m)
	for q := range p.n {
		clear(e)
		e[q] = 1
		p.Apply(y, e)
		for d, v := range y {
			dst[d] += s[q] * (real(v)*real(v) + imag(v)*imag(v))
		}
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
// guard rectangle ±GuardR × ±GuardD. Range stops at the map's edges (and
// at invalid range cells, see LevelValid); Doppler wraps around (the
// spectrum is periodic).
//
// RhoR is the noise correlation between range cells by lag
// (NoiseCorrelation of the receive reference) and DopplerCov the
// covariance of the Doppler bins for white unit noise per pulse
// (SlowTimePlan.NoiseCovariance): the noise of cells (k1, d1) and (k2, d2)
// correlates as ρ(k2−k1)·C(d1, d2). Either nil treats that dimension's
// cells as independent. Cell averaging solves Pfa = 1/det(I + (α/N)·R)
// for the cells used, normalised by the variance of the cell under test;
// an ordered statistic trains on a lattice of cells spaced by the
// decorrelation spacing of each dimension (independent by construction).
type CFAR2D struct {
	PFA            float64
	GuardR, TrainR int // range guard cells each side, range training cells both sides together
	GuardD, TrainD int // Doppler guard bins each side, Doppler training bins both sides together
	Rank           int // ordered-statistic rank scaled to the cells present (see CFAR); 0 for cell averaging
	// Variant and Censor as in CFAR (Censor of the whole window's cells).
	// Greatest/smallest-of split the window into the cells nearer in
	// range (A < 0, or A = 0 and B < 0) and the others.
	Variant    CFARVariant
	Censor     int
	RhoR       []complex128
	DopplerCov [][]complex128

	c        CFAR
	vc       variantCache
	lead     []bool
	cells2   []Cell2
	pattern  map[string]float64
	key      []byte
	sr, sd   int
	circ     int // 0 unknown, 1 DopplerCov circulant, 2 not
	spacings bool
	// Cells keeps its last list while the range cells it may use (mask)
	// and the bin count are the same; gen counts the lists it has built,
	// and multiplier keeps its last value for list multGen.
	mask         []bool
	maskNd       int
	gen, multGen int
	multLast     float64
}

// Cell2 is a training cell of a CFAR2D: offsets A in range cells and B in
// Doppler bins from the cell under test.
type Cell2 struct{ A, B int }

// Level returns the threshold at range cell k and Doppler bin d of a map
// with nr range cells and nd bins, whose power at (k, d) is p(k, d).
func (c *CFAR2D) Level(p func(k, d int) float64, k, d, nr, nd int) float64 {
	return c.LevelValid(p, nil, k, d, nr, nd)
}

// Cells returns the training cells (range offset, Doppler offset) used at
// (k, d): inside the map, in valid range cells (valid == nil: all), on the
// ordered statistic's lattice. The slice is reused by the next call.
func (c *CFAR2D) Cells(valid func(k int) bool, k, d, nr, nd int) []Cell2 {
	c.spacing(nd)
	hr, hd := c.GuardR+c.TrainR/2, c.GuardD+c.TrainD/2
	hd = min(hd, (nd-1)/2)
	sr, sd := 1, 1
	if c.Rank != 0 || c.Variant != CellAveraging {
		sr, sd = c.sr, c.sd
	}
	// The list depends on k only through which range cells it may use:
	// the same mask, the same list.
	same := c.gen > 0 && c.maskNd == nd && len(c.mask) == 2*hr+1
	if !same {
		c.mask = slices.Grow(c.mask[:0], 2*hr+1)[:2*hr+1]
	}
	for dk := -hr; dk <= hr; dk++ {
		kk := k + dk
		use := !(kk < 0 || kk >= nr || valid != nil && !valid(kk) || dk%sr != 0)
		if same && c.mask[dk+hr] != use {
			same = false
		}
		c.mask[dk+hr] = use
	}
	if same {
		return c.cells2
	}
	c.maskNd = nd
	c.gen++
	cs := c.cells2[:0]
	for dk := -hr; dk <= hr; dk++ {
		if !c.mask[dk+hr] {
			continue
		}
		for dd := -hd; dd <= hd; dd++ {
			if abs(dk) <= c.GuardR && abs(dd) <= c.GuardD || dd%sd != 0 {
				continue
			}
			cs = append(cs, Cell2{dk, dd})
		}
	}
	c.cells2 = cs
	return cs
}

// LevelValid is Level with only valid range cells as training cells.
// It returns +Inf when no training cell is left.
func (c *CFAR2D) LevelValid(p func(k, d int) float64, valid func(k int) bool, k, d, nr, nd int) float64 {
	c.c.PFA, c.c.Rank, c.c.Train = c.PFA, c.Rank, max(c.cells(), 1)
	cs := c.Cells(valid, k, d, nr, nd)
	if len(cs) == 0 {
		return math.Inf(1)
	}
	vals := c.c.scratch[:0]
	for _, q := range cs {
		vals = append(vals, p(k+q.A, ((d+q.B)%nd+nd)%nd))
	}
	c.c.scratch = vals
	if c.Variant != CellAveraging {
		c.lead = c.lead[:0]
		for _, q := range cs {
			c.lead = append(c.lead, q.A < 0 || q.A == 0 && q.B < 0)
		}
		return c.vc.level(c.Variant, c.PFA, c.Censor, c.cells(), vals, c.lead)
	}
	if c.Rank == 0 {
		s := 0.0
		for _, v := range vals {
			s += v
		}
		return c.multiplier(cs, d, nd) * s / float64(len(vals))
	}
	return c.c.Multiplier(len(vals)) * quickSelect(vals, c.c.rank(len(vals))-1)
}

// dcorr returns the normalised Doppler noise correlation between bins
// d1 and d2 relative to the variance of bin d (the cell under test).
func (c *CFAR2D) dcorr(d, d1, d2, nd int) complex128 {
	if c.DopplerCov == nil {
		if d1 == d2 {
			return 1
		}
		return 0
	}
	w := func(x int) int { return ((x % nd) + nd) % nd }
	return c.DopplerCov[w(d1)][w(d2)] / complex(real(c.DopplerCov[w(d)][w(d)]), 0)
}

// multiplier returns the CA multiplier for the cells cs at bin d.
func (c *CFAR2D) multiplier(cs []Cell2, d, nd int) float64 {
	if c.RhoR == nil && c.DopplerCov == nil {
		return c.c.Multiplier(len(cs))
	}
	if c.circ == 0 {
		c.circ = 1
		if c.DopplerCov != nil {
		check:
			for i := range nd {
				for j := range nd {
					if cmplx.Abs(c.DopplerCov[i][j]-c.DopplerCov[0][((j-i)%nd+nd)%nd]) > 1e-9*real(c.DopplerCov[0][0]) {
						c.circ = 2
						break check
					}
				}
			}
		}
	}
	// The list of the last call, on a circulant (or absent) Doppler
	// covariance: the last multiplier.
	if c.circ == 1 && c.multGen == c.gen && c.gen > 0 {
		return c.multLast
	}
	c.key = c.key[:0]
	if c.circ == 2 {
		c.key = append(c.key, byte(d), byte(d>>8), 0xff)
	}
	for _, q := range cs {
		c.key = append(c.key, byte(q.A), byte(q.A>>8), byte(q.B))
	}
	if c.pattern == nil {
		c.pattern = make(map[string]float64)
	}
	if a, ok := c.pattern[string(c.key)]; ok {
		c.multGen, c.multLast = c.gen, a
		return a
	}
	// Index 0 is the cell under test, 1 … N the training cells.
	at := func(i int) Cell2 {
		if i == 0 {
			return Cell2{}
		}
		return cs[i-1]
	}
	a := correlatedCAWithCUT(c.PFA, len(cs), func(i, j int) complex128 {
		ci, cj := at(i), at(j)
		return lagCorrelation(c.RhoR, cj.A-ci.A) * c.dcorr(d, d+ci.B, d+cj.B, nd)
	})
	c.pattern[string(c.key)] = a
	c.multGen, c.multLast = c.gen, a
	return a
}

// spacing sets the ordered statistic's lattice spacings in range and
// Doppler (1 without correlation data).
func (c *CFAR2D) spacing(nd int) {
	if c.spacings {
		return
	}
	c.spacings, c.sr, c.sd = true, 1, 1
	if c.Rank == 0 && c.Variant == CellAveraging {
		return
	}
	if c.RhoR != nil {
		c.sr = DecorrelationSpacing(2*(c.GuardR+c.TrainR/2), func(m int) float64 { return cmplx.Abs(lagCorrelation(c.RhoR, m)) })
	}
	if c.DopplerCov != nil {
		c.sd = DecorrelationSpacing(min(2*(c.GuardD+c.TrainD/2), nd-1), func(m int) float64 {
			worst := 0.0
			for d := range nd {
				e := (d + m) % nd
				v := cmplx.Abs(c.DopplerCov[d][e]) / math.Sqrt(real(c.DopplerCov[d][d])*real(c.DopplerCov[e][e]))
				worst = max(worst, v)
			}
			return worst
		})
	}
}

// cells returns the number of training cells away from the map's edges.
func (c *CFAR2D) cells() int {
	return (2*(c.GuardR+c.TrainR/2)+1)*(2*(c.GuardD+c.TrainD/2)+1) - (2*c.GuardR+1)*(2*c.GuardD+1)
}

// NoiseCovariance returns the M×M covariance C[d1][d2] = E[Y_d1·conj(Y_d2)]
// of the plan's output bins for white complex noise of unit power per
// pulse, exactly: C = A·Aᴴ with A the plan's linear map (MTI, window,
// DFT, scaling), so that the diagonal is each bin's noise power.
func (p *SlowTimePlan) NoiseCovariance() [][]complex128 {
	a := make([][]complex128, p.n) // a[q] = response to a unit impulse on pulse q
	e := make([]complex128, p.n)
	for q := range p.n {
		clear(e)
		e[q] = 1
		a[q] = p.Apply(nil, e)
	}
	c := make([][]complex128, p.m)
	for i := range c {
		c[i] = make([]complex128, p.m)
		for j := range c[i] {
			var s complex128
			for q := range p.n {
				s += a[q][i] * cmplx.Conj(a[q][j])
			}
			c[i][j] = s
		}
	}
	return c
}

func abs(x int) int {
	if x < 0 {
		return -x
	}
	return x
}
