package scenarios

import (
	"math"
	"math/cmplx"

	"github.com/pulsewright/pulsewright/dsp"
)

// The waveform's figures in continuous time (docs/figures.md): they
// describe the pulse and its filter, not the scenario's sample rate. They
// are computed on an internal grid chosen by the waveform and the filter,
// once per waveform and receiver, and kept across frames by the Engine.

// Internal grids (docs/figures.md §4).
const (
	heldPerChip    = 8   // held grid: at least 8 samples per chip
	heldMinSamples = 256 // … and at least 256 samples per pulse
	fmPerBandwidth = 8   // interpolated grid: at least 8 samples per 1/B
	fmMinSamples   = 64  // … and at least 64 per pulse
	// fmMinSamplesFine is the interpolated grid's minimum for every window
	// but Chebyshev (whose symmetric n-point window keeps n as above).
	fmMinSamplesFine = 512
	fmMaxSamples     = 1 << 21 // … but at most 2²¹ (B·τ > 2¹⁸: still ≥ 2 per 1/B, as fs ≥ B and τ·fs ≤ 2²⁰)
	straddleSteps    = 64      // fractional delays per sample of the straddle loss
	// fmDopplerPerBandwidth is the grid of FM Doppler responses, samples per 1/B.
	fmDopplerPerBandwidth = 4
)

// contFigures is what the continuous-time evaluation of a waveform and its
// filter gives: the figures, the response plot and the grid the Doppler
// response is computed on.
type contFigures struct {
	m            *model // the model that computed them (for a custom filter's taps)
	fig          dsp.ChiFigures
	chi          *dsp.Chi
	plot         *Response    // computed on first use
	x, h         []complex128 // pulse and filter on the Doppler grid
	rate         float64      // Doppler grid rate, Hz
	held         bool         // x and h are held sequences
	dop          map[float64]dopFigure
	dopPlan      *dsp.DopplerPlan
	straddleMax  float64 // dB
	straddleMean float64 // dB
	straddleDone bool    // straddleMax and straddleMean are computed
}

// chipValues returns the chip values and chip length of a rect-chip pulse
// (a phase code, or a rect pulse as one chip), or nil.
func chipValues(w dsp.Waveform) ([]complex128, float64) {
	switch v := w.(type) {
	case dsp.Rect:
		return []complex128{1}, v.Width
	case dsp.PhaseCoded:
		a := make([]complex128, len(v.Phases))
		for i, p := range v.Phases {
			a[i] = cmplx.Rect(1, p)
		}
		return a, v.Chip
	case *dsp.Sampled: // imported samples held over 1/rate are constant pieces too
		if x, piece, ok := v.Held(); ok {
			return x, piece
		}
	}
	return nil, 0
}

// weighted returns x weighted by the continuous window at the midpoints
// of its samples (dsp.WindowMidpoints); a nil window returns x.
func weighted(x []complex128, win dsp.Window) []complex128 {
	if win == nil {
		return x
	}
	w := dsp.WindowMidpoints(make([]float64, len(x)), win)
	h := make([]complex128, len(x))
	for i, v := range x {
		h[i] = v * complex(w[i], 0)
	}
	return h
}

// repeatChips holds each value over k samples.
func repeatChips(a []complex128, k int) []complex128 {
	x := make([]complex128, 0, len(a)*k)
	for _, v := range a {
		for range k {
			x = append(x, v)
		}
	}
	return x
}

// continuous computes (once per model and its reuses) the continuous-time
// figures of the waveform and its filter.
func (m *model) continuous() *contFigures {
	if m.cont != nil {
		return m.cont
	}
	c := &contFigures{m: m}
	var chi *dsp.Chi
	win := dspWindow(m.s.Receiver.Window)
	mismatched := m.taps != nil
	if m.s.Receiver.Filter == FilterCustom {
		c.customFilter()
		chi = c.chi
	} else if a, chip := chipValues(m.wave); a != nil {
		k := max(heldPerChip, (heldMinSamples+len(a)-1)/len(a))
		c.held, c.rate = true, float64(k)/chip
		c.x = repeatChips(a, k)
		switch {
		case mismatched: // the taps, one per chip, held
			chi = dsp.HeldChi(a, m.taps, chip)
			c.h = repeatChips(m.taps, k)
		case win == nil: // exact on the chip grid
			chi = dsp.HeldChi(a, a, chip)
			c.h = c.x
		default:
			c.h = weighted(c.x, win)
			chi = dsp.HeldChi(c.x, c.h, chip/float64(k))
		}
	} else {
		// n samples at the midpoints t = (i + ½)·τ/n.
		B, tau := m.wave.Bandwidth(), m.wave.Duration()
		minN := float64(fmMinSamples)
		if m.s.Receiver.Window.Kind != WindowChebyshev {
			// A short pulse's response has rect edges, which
			// band-limited interpolation blurs: sample it finer.
			// (Chebyshev keeps n, which defines its n-point window.)
			minN = fmMinSamplesFine
		}
		n := int(math.Min(math.Ceil(math.Max(fmPerBandwidth*B*tau, minN)-1e-9), fmMaxSamples))
		rate := float64(n) / tau
		x := dsp.Sample(make([]complex128, n), m.wave, rate, 0.5/rate)
		chi = dsp.SampledChi(x, weighted(x, win), rate, B)
		// The Doppler response is band-limited interpolated near its peak;
		// 4 samples per 1/B serve it as well at a quarter of the cost.
		nd := int(math.Min(math.Ceil(math.Max(fmDopplerPerBandwidth*B*tau, minN/2)-1e-9), fmMaxSamples))
		c.rate = float64(nd) / tau
		c.x = dsp.Sample(make([]complex128, nd), m.wave, c.rate, 0.5/c.rate)
		c.h = weighted(c.x, win)
	}
	c.fig, c.chi = chi.Figures(), chi
	m.cont = c
	return c
}

// sampling returns the straddle losses at the scenario's rate, computed
// on first use (the report needs them; a verified suggestion does not).
func (m *model) sampling() (maxDB, meanDB float64) {
	c := m.continuous()
	if !c.straddleDone {
		c.straddleMax, c.straddleMean = m.straddle(c.fig)
		c.straddleDone = true
	}
	return c.straddleMax, c.straddleMean
}

// customFilter sets the response of a custom filter, whose taps are
// known only at the scenario's rate fs: against a pulse of constant
// pieces a whole number of samples long (a code at an integer number of
// samples per chip, held imported samples) the taps are held over 1/fs
// and the response is exact between lags; otherwise the pulse and taps
// are read as band-limited samples at fs.
func (c *contFigures) customFilter() {
	m := c.m
	c.rate, c.h = m.fs, m.ref
	if a, chip := chipValues(m.wave); a != nil {
		if k := math.Round(chip * m.fs); k >= 1 && math.Abs(chip*m.fs-k) <= 1e-9*k {
			c.held, c.x = true, repeatChips(a, int(k))
			c.chi = dsp.HeldChi(c.x, c.h, 1/m.fs)
			return
		}
	}
	c.x = m.pulse
	c.chi = dsp.SampledChi(c.x, c.h, m.fs, m.wave.Bandwidth())
}

// doppler returns the peak loss (dB) and delay shift (s) of the
// continuous-time response at Doppler shift fd (docs/figures.md §5),
// cached per waveform and filter.
func (m *model) doppler(fd float64) dopFigure {
	if fd == 0 {
		return dopFigure{}
	}
	c := m.continuous()
	if c.dop == nil {
		c.dop = make(map[float64]dopFigure)
	}
	d, ok := c.dop[fd]
	if !ok {
		if c.dopPlan == nil {
			if c.held {
				c.dopPlan = dsp.NewHeldDopplerPlan(c.x, c.h, c.rate)
			} else {
				c.dopPlan = dsp.NewDopplerPlan(c.x, c.h, c.rate)
			}
		}
		d.lossDB, d.shift = c.dopPlan.Response(fd)
		c.dop[fd] = d
	}
	return d
}

// response returns the zero-Doppler response of the waveform alone.
func (m *model) response() Response {
	c := m.continuous()
	if c.plot == nil {
		per := max(1, min(16, (1<<18)/c.chi.Len()))
		c.plot = newResponsePlot(c.chi.Plot(per))
	}
	return *c.plot
}

// straddle returns the worst and mean loss (dB) of the best output sample
// of the sampled processing at the scenario's rate against the
// continuous-time peak SNR of the same filter, over fractional echo
// delays uniform in one sample (docs/figures.md §6).
func (m *model) straddle(f dsp.ChiFigures) (maxDB, meanDB float64) {
	if f.Peak == 0 || f.EnergyH == 0 {
		return 0, 0
	}
	snrC := f.Peak * f.Peak / f.EnergyH // noise density 1
	np, nr := len(m.pulse), len(m.ref)
	// The full correlation of each delayed echo (all lags, docs/figures.md
	// §6: the best output sample may be a sidelobe's when a narrow window
	// weights the centre of a code), by FFT; the best lags' values are then
	// recomputed as direct sums.
	in := make([]complex128, nr-1+np+1)
	corr := dsp.NewCorrelator(m.ref, len(in))
	y := make([]complex128, len(in))
	x := in[nr-1:] // lag: y[lag+nr-1] = Σ_i x[lag+i]·conj(ref[i])
	direct := func(lag int) float64 {
		var s complex128
		for i, r := range m.ref {
			if n := lag + i; n >= 0 && n < len(x) {
				s += x[n] * cmplx.Conj(r)
			}
		}
		return real(s)*real(s) + imag(s)*imag(s)
	}
	maxDB = math.Inf(-1)
	for j := range straddleSteps {
		clear(in)
		dsp.AddEcho(x, m.wave, m.fs, float64(j)/straddleSteps/m.fs, 1, 0)
		corr.Apply(y, in)
		kb := 0
		for i, v := range y {
			if real(v)*real(v)+imag(v)*imag(v) > real(y[kb])*real(y[kb])+imag(y[kb])*imag(y[kb]) {
				kb = i
			}
		}
		kb -= nr - 1
		best := 0.0
		for lag := kb - 1; lag <= kb+1; lag++ {
			best = math.Max(best, direct(lag))
		}
		snrS := best / (m.fs * m.noiseGain)
		loss := 10 * math.Log10(snrC/snrS)
		if snrS == 0 {
			loss = 300 // nothing of the echo is heard: cannot happen for a valid scenario
		}
		if math.Abs(loss) < 1e-9 {
			loss = 0 // rounding of an exact match: never print −0.00
		}
		maxDB = math.Max(maxDB, loss)
		meanDB += loss / straddleSteps
	}
	return maxDB, meanDB
}
