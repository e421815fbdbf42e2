package scenarios

import (
	"math"
	"slices"

	"github.com/pulsewright/pulsewright/dsp"
)

// Work an Engine keeps across evaluations besides the detection
// probabilities (pdmemo.go): while a user drags one target, the other
// targets' and the clutter's work is the same as in the previous frame,
// and the changed scenarios that the suggestions verify are the same in
// every frame but for the dragged target. Each kept result is keyed by
// the exact values it is computed from (compared bit for bit, not by
// pointer), so what is reused is what a fresh evaluation computes; the
// stores are bounded in count and bytes, and a nil *pdMemo (an Engine's
// uncached mode, the Monte Carlo trials) keeps nothing.

// planKept is the number of local compression plans a memo keeps idle.
const planKept = 8

// keptPlan is an idle compression plan of a reference for buffers of n
// samples.
type keptPlan struct {
	ref []complex128 // a copy of the reference
	n   int
	c   *dsp.Correlator
}

// takePlan returns a plan correlating with ref for n samples: a kept one
// whose reference equals ref bit for bit, which the caller then owns
// until it puts it back (a plan keeps scratch buffers: one user at a
// time), or a new one.
func (p *pdMemo) takePlan(ref []complex128, n int) *dsp.Correlator {
	if p != nil {
		p.mu.Lock()
		for i, k := range p.plans {
			if k.n == n && sameBits(k.ref, ref) {
				p.plans = append(p.plans[:i], p.plans[i+1:]...)
				p.mu.Unlock()
				return k.c
			}
		}
		p.mu.Unlock()
	}
	return dsp.NewCorrelator(ref, n)
}

// putPlan keeps an idle plan c of ref for n samples (the newest first;
// the oldest beyond planKept is dropped).
func (p *pdMemo) putPlan(ref []complex128, n int, c *dsp.Correlator) {
	if p == nil || c == nil {
		return
	}
	p.mu.Lock()
	defer p.mu.Unlock()
	if len(p.plans) < planKept {
		p.plans = append(p.plans, keptPlan{})
	}
	copy(p.plans[1:], p.plans)
	p.plans[0] = keptPlan{ref: slices.Clone(ref), n: n, c: c}
}

// convKept and convKeptBytes bound the kept density convolutions.
const (
	convKept      = 8
	convKeptBytes = 32 << 20
)

// keptConv is one convolveFFT result: its inputs (copies) and the values
// it added to dst[a … a+len(add)).
type keptConv struct {
	q, kern []float64
	shift   int // qlo − off − dlo: output t lands on dst[t+shift]
	dstLen  int
	a       int
	add     []float64
}

func (k *keptConv) bytes() int { return 8 * (len(k.q) + len(k.kern) + len(k.add)) }

// conv returns the kept convolution of these inputs, or nil.
func (p *pdMemo) conv(q, kern []float64, shift, dstLen int) *keptConv {
	if p == nil {
		return nil
	}
	p.mu.Lock()
	defer p.mu.Unlock()
	for i, k := range p.convs {
		if k.shift == shift && k.dstLen == dstLen && sameFloatBits(k.kern, kern) && sameFloatBits(k.q, q) {
			copy(p.convs[1:i+1], p.convs[:i])
			p.convs[0] = k
			return k
		}
	}
	return nil
}

// keepConv keeps a convolution, the newest first, dropping the oldest
// beyond convKept entries or convKeptBytes.
func (p *pdMemo) keepConv(k *keptConv) {
	if p == nil || k.bytes() > convKeptBytes/2 {
		return
	}
	p.mu.Lock()
	defer p.mu.Unlock()
	p.convs = append(p.convs, nil)
	copy(p.convs[1:], p.convs)
	p.convs[0] = k
	total := 0
	for i, c := range p.convs {
		total += c.bytes()
		if i >= convKept || total > convKeptBytes {
			clear(p.convs[i:])
			p.convs = p.convs[:i]
			break
		}
	}
}

// sameFloatBits says whether two vectors hold the same values bit for
// bit.
func sameFloatBits(a, b []float64) bool {
	if len(a) != len(b) {
		return false
	}
	for i, v := range a {
		if math.Float64bits(v) != math.Float64bits(b[i]) {
			return false
		}
	}
	return true
}

// levelsKept and levelsKeptCells bound the kept range–Doppler clutter
// levels, in maps and in cells of all of them together (17 bytes a
// cell): a map of more cells is analysed without keeping its levels.
const (
	levelsKept      = 8
	levelsKeptCells = 1 << 20
)

// keptLevels is the clutter analysis of one range–Doppler map
// (analyseClutter): the scene power of every cell and the detector's
// level where it was computed. A level at cell (k, d) is a function of
// the detector's settings, the bins' noise, which range cells are
// processed and the scene power of the columns k−hr … k+hr (hr: the
// detector's guard and training half-width), so a later analysis with
// the same settings, noise and processed cells reuses it where none of
// those columns changed.
type keptLevels struct {
	cf2       *dsp.CFAR2D
	n, nb     int
	noise     []float64
	processed []bool
	pow       []float64 // pow[k·nb+d]
	level     []float64
	has       []bool // level computed
	// resp and gain are the inputs of pow (scenePowerRow): each object's
	// response and power per bin, copies; nil when not recorded (a
	// stagger's echo groups).
	resp []response
	gain [][]float64
	// users counts the analyses reading this one as their previous map
	// (levelsFor to doneLevels); dropped: it left the memo's levels, and
	// its buffers become a spare when the last user is done.
	users   int
	dropped bool
}

// levelsSpare bounds the spare clutter analyses a memo keeps: their cells
// count towards levelsKeptCells with those of the kept ones.
const levelsSpare = 2

// newLevels returns an analysis of a map of n range cells by nb bins for
// these settings, with pow, level and has of n·nb cells and has all
// false: a spare one's buffers when one is large enough, new ones
// otherwise.
func (p *pdMemo) newLevels(cf2 *dsp.CFAR2D, n, nb int, noise []float64, processed []bool) *keptLevels {
	var l *keptLevels
	if p != nil {
		p.mu.Lock()
		for i, s := range p.spareLevels {
			if cap(s.pow) >= n*nb {
				l = s
				p.spareLevels = slices.Delete(p.spareLevels, i, i+1)
				break
			}
		}
		p.mu.Unlock()
	}
	if l == nil {
		return &keptLevels{cf2: cf2, n: n, nb: nb, noise: slices.Clone(noise), processed: slices.Clone(processed),
			pow: make([]float64, n*nb), level: make([]float64, n*nb), has: make([]bool, n*nb)}
	}
	*l = keptLevels{cf2: cf2, n: n, nb: nb, noise: append(l.noise[:0], noise...), processed: append(l.processed[:0], processed...),
		pow: l.pow[:n*nb], level: l.level[:n*nb], has: l.has[:n*nb]}
	clear(l.has) // pow is written whole by its user, level where has is set
	return l
}

// spare keeps the buffers of an analysis that left the levels and has no
// user, within levelsSpare and, with the kept ones, levelsKeptCells.
// The caller holds p.mu.
func (p *pdMemo) spare(l *keptLevels) {
	cells := cap(l.pow)
	for _, o := range p.levels {
		cells += o.n * o.nb
	}
	for _, o := range p.spareLevels {
		cells += cap(o.pow)
	}
	if len(p.spareLevels) < levelsSpare && cells <= levelsKeptCells {
		p.spareLevels = append(p.spareLevels, l)
	}
}

// doneLevels ends a use of l as a previous map (levelsFor).
func (p *pdMemo) doneLevels(l *keptLevels) {
	if p == nil || l == nil {
		return
	}
	p.mu.Lock()
	defer p.mu.Unlock()
	l.users--
	if l.users == 0 && l.dropped {
		p.spare(l)
	}
}

// levelsFor returns the kept analysis of a map with these settings whose
// scene power pow (pow[k·nb+d]) differs from it in the fewest columns, or
// nil. (One evaluation analyses several maps of the same settings: the
// scenario's and each CPI's of a schedule.) The caller reads the kept
// analysis until it calls doneLevels.
func (p *pdMemo) levelsFor(cf2 *dsp.CFAR2D, n, nb int, noise []float64, processed []bool, pow []float64) *keptLevels {
	if p == nil {
		return nil
	}
	p.mu.Lock()
	defer p.mu.Unlock()
	var best *keptLevels
	fewest := n + 1
	for _, l := range p.levels {
		if l.n != n || l.nb != nb || !sameCFAR2D(l.cf2, cf2) || !sameFloatBits(l.noise, noise) || !slices.Equal(l.processed, processed) {
			continue
		}
		c := 0
		for k := 0; k < n && c < fewest; k++ {
			if !sameFloatBits(l.pow[k*nb:(k+1)*nb], pow[k*nb:(k+1)*nb]) {
				c++
			}
		}
		if c < fewest {
			best, fewest = l, c
			if c == 0 {
				break // the same map
			}
		}
	}
	if best != nil {
		best.users++
	}
	return best
}

// levelsByInputs returns the kept analysis with these settings whose
// objects' responses and gains (resp, gain: the inputs of scenePowerRow)
// differ from these in the fewest range cells, or nil; diff (n cells)
// marks where they differ: the kept scene power of every other cell is
// this scene's bit for bit. Only an analysis with every gain the same bit
// for bit qualifies. The caller reads it until it calls doneLevels.
func (p *pdMemo) levelsByInputs(cf2 *dsp.CFAR2D, n, nb int, noise []float64, processed []bool, resp []response, gain [][]float64, diff []bool) *keptLevels {
	if p == nil {
		return nil
	}
	mark := make([]bool, n)
	p.mu.Lock()
	defer p.mu.Unlock()
	var best *keptLevels
	fewest := n + 1
outer:
	for _, l := range p.levels {
		if l.resp == nil || len(l.resp) != len(resp) || l.n != n || l.nb != nb || !sameCFAR2D(l.cf2, cf2) || !sameFloatBits(l.noise, noise) || !slices.Equal(l.processed, processed) {
			continue
		}
		for i := range gain {
			if !sameFloatBits(l.gain[i], gain[i]) {
				continue outer
			}
		}
		clear(mark)
		c := 0
		for i := range resp {
			a, b := &l.resp[i], &resp[i]
			if a.lo == b.lo && sameFloatBits(a.pow, b.pow) {
				continue
			}
			lo := max(min(a.lo, b.lo), 0)
			hi := min(max(a.lo+len(a.pow), b.lo+len(b.pow)), n)
			for k := lo; k < hi; k++ {
				if !mark[k] && math.Float64bits(a.at(k)) != math.Float64bits(b.at(k)) {
					mark[k] = true
					c++
				}
			}
		}
		if c < fewest {
			best, fewest = l, c
			copy(diff, mark)
			if c == 0 {
				break
			}
		}
	}
	if best != nil {
		best.users++
	}
	return best
}

// keepLevels keeps the analysis l, the newest first, dropping the
// oldest beyond levelsKept maps or levelsKeptCells cells: the maps of the
// last evaluation or two (a wheel's nudge and its way back find theirs).
func (p *pdMemo) keepLevels(l *keptLevels) {
	if p == nil {
		return
	}
	p.mu.Lock()
	defer p.mu.Unlock()
	p.levels = append(p.levels, nil)
	copy(p.levels[1:], p.levels)
	p.levels[0] = l
	cells := 0
	for i, o := range p.levels {
		cells += o.n * o.nb
		if i >= levelsKept || cells > levelsKeptCells {
			drop := slices.Clone(p.levels[i:])
			clear(p.levels[i:])
			p.levels = p.levels[:i]
			for _, o := range drop {
				if o.dropped = true; o.users == 0 {
					p.spare(o)
				}
			}
			break
		}
	}
	// The kept ones come first: spares beyond the cells left go.
	cells = 0
	for _, o := range p.levels {
		cells += o.n * o.nb
	}
	for i, o := range p.spareLevels {
		if cells += cap(o.pow); cells > levelsKeptCells {
			clear(p.spareLevels[i:])
			p.spareLevels = p.spareLevels[:i]
			break
		}
	}
}

// noiseKeptSamples bounds the kept receive-window noise.
const noiseKeptSamples = 1 << 20

// windowNoise returns the thermal noise of a single pulse's receive
// window of n samples for seed: the first n draws of dsp.ComplexNormal
// from the window's noise stream, the values windowPower adds. The noise
// depends on the seed and the length alone, so a memo keeps the last
// one (up to noiseKeptSamples samples); the caller does not change it.
func (p *pdMemo) windowNoise(seed int64, n int) []complex128 {
	if p != nil {
		p.mu.Lock()
		if p.noiseSeed == seed && len(p.noise) == n && p.noise != nil {
			v := p.noise
			p.mu.Unlock()
			return v
		}
		p.mu.Unlock()
	}
	v := make([]complex128, n)
	addNoise(v, seed, 0x4e01)
	if p != nil && n <= noiseKeptSamples {
		p.mu.Lock()
		p.noise, p.noiseSeed = v, seed
		p.mu.Unlock()
	}
	return v
}

// keptProfile is the threshold series of one range–Doppler map
// (train.series): the noise-free map (lin[d][k], float32 as the series
// hold it) and, per range cell k, the detector's level at the cell's
// strongest bin bin[k]. Like keptLevels, a later series with the same
// detector settings, bins' noise and processed cells reuses the level of
// cell k where its bin is the same and none of the columns k−hr … k+hr
// changed bit for bit.
type keptProfile struct {
	cf2       *dsp.CFAR2D
	n, nb     int
	noise     []float64
	processed []bool
	lin       []float32 // lin[k·nb+d]
	bin       []int     // −1: no level
	level     []float64
}

// profileFor returns the kept series of a map with these settings whose
// noise-free map (lin[k·nb+d]) differs from it in the fewest columns, or
// nil.
func (p *pdMemo) profileFor(cf2 *dsp.CFAR2D, n, nb int, noise []float64, processed []bool, lin []float32) *keptProfile {
	if p == nil {
		return nil
	}
	p.mu.Lock()
	defer p.mu.Unlock()
	var best *keptProfile
	fewest := n + 1
	for _, l := range p.profiles {
		if l.n != n || l.nb != nb || !sameCFAR2D(l.cf2, cf2) || !sameFloatBits(l.noise, noise) || !slices.Equal(l.processed, processed) {
			continue
		}
		c := 0
		for k := 0; k < n && c < fewest; k++ {
			if !sameFloat32Bits(l.lin[k*nb:(k+1)*nb], lin[k*nb:(k+1)*nb]) {
				c++
			}
		}
		if c < fewest {
			best, fewest = l, c
			if c == 0 {
				break
			}
		}
	}
	return best
}

// keepProfile keeps a series' levels, the newest first, within the
// bounds of the kept clutter levels (levelsKept maps, levelsKeptCells
// cells).
func (p *pdMemo) keepProfile(l *keptProfile) {
	if p == nil {
		return
	}
	p.mu.Lock()
	defer p.mu.Unlock()
	p.profiles = append(p.profiles, nil)
	copy(p.profiles[1:], p.profiles)
	p.profiles[0] = l
	cells := 0
	for i, o := range p.profiles {
		cells += o.n * o.nb
		if i >= levelsKept || cells > levelsKeptCells {
			clear(p.profiles[i:])
			p.profiles = p.profiles[:i]
			break
		}
	}
}

// sameFloat32Bits says whether two vectors hold the same values bit for
// bit.
func sameFloat32Bits(a, b []float32) bool {
	if len(a) != len(b) {
		return false
	}
	for i, v := range a {
		if math.Float32bits(v) != math.Float32bits(b[i]) {
			return false
		}
	}
	return true
}

// covKept and covKeptBins bound the kept noise covariances: a plan of
// more bins (nb² complex values) is not kept.
const (
	covKept     = 4
	covKeptBins = 256
)

// keptCov is the noise covariance of a uniform train's slow-time plan
// (dsp.SlowTimePlan.NoiseCovariance), a function of the plan's inputs
// alone: the number of pulses, the MTI canceller and the Doppler window
// (newPlan). Its users only read it.
type keptCov struct {
	pulses int
	mti    string
	win    Window
	cov    [][]complex128
}

// sameWindow says whether two windows have the same settings bit for bit.
func sameWindow(a, b Window) bool {
	return a.Kind == b.Kind && a.NBar == b.NBar && math.Float64bits(a.SidelobeDB) == math.Float64bits(b.SidelobeDB) &&
		math.Float64bits(a.Beta) == math.Float64bits(b.Beta) && math.Float64bits(a.Sigma) == math.Float64bits(b.Sigma)
}

// noiseCov returns the kept covariance of a uniform train's plan of these
// inputs, or computes it with make and keeps it (the newest first, up to
// covKept plans of at most covKeptBins bins).
func (p *pdMemo) noiseCov(pulses int, mti string, win Window, make func() [][]complex128) [][]complex128 {
	if p == nil {
		return make()
	}
	p.mu.Lock()
	for _, k := range p.covs {
		if k.pulses == pulses && k.mti == mti && sameWindow(k.win, win) {
			p.mu.Unlock()
			return k.cov
		}
	}
	p.mu.Unlock()
	cov := make()
	if len(cov) > covKeptBins {
		return cov
	}
	p.mu.Lock()
	defer p.mu.Unlock()
	if len(p.covs) < covKept {
		p.covs = append(p.covs, keptCov{})
	}
	copy(p.covs[1:], p.covs)
	p.covs[0] = keptCov{pulses: pulses, mti: mti, win: win, cov: cov}
	return cov
}

// scratchKept and scratchKeptSamples bound the idle work buffers a memo
// keeps, in count and in complex samples of all of them together.
const (
	scratchKept        = 4
	scratchKeptSamples = 1 << 18
)

// takeScratch returns a work buffer of n samples whose contents are
// arbitrary (the caller writes every sample before it reads one): an idle
// one of the memo's, which the caller then owns until it puts it back, or
// a new one.
func (p *pdMemo) takeScratch(n int) []complex128 {
	if p != nil {
		p.mu.Lock()
		for i := len(p.scratch) - 1; i >= 0; i-- {
			if b := p.scratch[i]; cap(b) >= n {
				p.scratch = slices.Delete(p.scratch, i, i+1)
				p.mu.Unlock()
				return b[:n]
			}
		}
		p.mu.Unlock()
	}
	return make([]complex128, n)
}

// putScratch keeps an idle work buffer, dropping the oldest beyond
// scratchKept buffers or scratchKeptSamples samples.
func (p *pdMemo) putScratch(b []complex128) {
	if p == nil || cap(b) > scratchKeptSamples {
		return
	}
	p.mu.Lock()
	defer p.mu.Unlock()
	p.scratch = append(p.scratch, b)
	total := 0
	for i := len(p.scratch) - 1; i >= 0; i-- {
		total += cap(p.scratch[i])
		if len(p.scratch)-i > scratchKept || total > scratchKeptSamples {
			p.scratch = slices.Delete(p.scratch, 0, i+1)
			break
		}
	}
}
