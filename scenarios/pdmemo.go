package scenarios

import (
	"encoding/binary"
	"math"
	"slices"
	"sync"

	"github.com/pulsewright/pulsewright/dsp"
)

// Memoised detection probabilities. A target's Pd (pdTest.pd) and the SNR
// its detector needs for the required Pd (pdTest.requiredSNR) are pure
// functions of the test's inputs: the dsp detector (Pfa, pulses,
// integration, Swerling case, CFAR cells and rank), the tested SNR, the
// raise of the threshold, for correlated CA-CFAR cells their
// eigenvalues and multiplier, and for a greatest-of, smallest-of or
// censored CFAR its variant, cell counts and multiplier. They are about half of an evaluation, and
// while a user drags one target almost all of them are the same as in the
// previous frame (the required SNR does not even depend on the target).
// An Engine keeps one memo across its evaluations, keyed by exactly those
// inputs, so the results are bit for bit those computed afresh.

// pdMemoGen is the number of entries of one generation: the memo keeps
// the current generation and the previous one, so it holds at most twice
// this many results and an entry used in the last generation survives.
const pdMemoGen = 2048

// pdKey is everything a pdTest's result depends on.
type pdKey struct {
	det    dsp.Detector
	snr    float64 // the tested SNR (linear); 0 for requiredSNR
	arg    float64 // pd: the raise r of the threshold; requiredSNR: the Pd
	alpha  float64
	ev     int32 // the interned eigenvalues (evIDs), −1 for none
	beyond bool
	req    bool // a requiredSNR result, not a pd one
	// the variant CFAR and its cell counts (pdTest.variant)
	variant dsp.CFARVariant
	n1, n2  int
	chi4    int32 // the interned pulse weights of a Swerling 4 target on a map (pdTest.chi4w), −1 for none
}

// pdVal is a memoised result.
type pdVal struct {
	v   float64
	ok  bool
	err error
}

// pdMemo holds memoised Pd results. Its methods may be called from
// several goroutines. A nil *pdMemo computes every result afresh.
type pdMemo struct {
	mu       sync.Mutex
	cur, old map[pdKey]pdVal
	// evIDs interns eigenvalue vectors by their exact bits; reset with
	// the generations (a new id is never confused with an old one: ids
	// grow until the reset empties both the generations and the table).
	evIDs  map[string]int32
	evNext int32
	keyBuf []byte
	// cf2s are the range–Doppler detectors of the last evaluations (the
	// pulse train's and each CPI's of a schedule), newest first, with
	// the multipliers they have solved: solving them is a third of a
	// pulse train's evaluation, and a drag changes none of them.
	cf2s []*dsp.CFAR2D
	// cf1s are the single-pulse detectors of the last evaluations (the
	// scenario's and those of the changed scenarios its suggestions
	// verify), newest first, each as a set of detectors with the same
	// settings: [0] judges on the evaluation's goroutine, [1] beside it
	// and [2] analyses the clutter (judgeAll). Solving their multipliers
	// (for correlated cells an eigendecomposition per pattern of
	// training cells) was a fifth of a frame on a demo with clutter, and
	// a drag changes none of them.
	cf1s [][cfSet]*dsp.CFAR
	// plans, convs, levels and profiles (reuse.go): idle local
	// compression plans, kept density convolutions, range–Doppler
	// clutter levels and pulse trains' threshold series.
	plans    []keptPlan
	convs    []*keptConv
	levels   []*keptLevels
	profiles []*keptProfile
	// spareLevels are clutter analyses dropped from levels that no
	// analysis reads any more: their buffers hold the next one's
	// (reuse.go).
	spareLevels []*keptLevels
	// covs are the noise covariances of the last uniform trains' slow-time
	// plans (reuse.go), newest first.
	covs []keptCov
	// scratch are idle work buffers (takeScratch), the newest last.
	scratch [][]complex128
	// noise is the last single-pulse receive window's noise for
	// noiseSeed (windowNoise).
	noise     []complex128
	noiseSeed int64
}

// cfSet is the number of detectors of the same settings one evaluation
// uses at once (judgeAll).
const cfSet = 3

// cf1Kept is the number of single-pulse detector settings a memo keeps.
const cf1Kept = 8

// cfar1 returns detector i (0 … cfSet−1) of the set kept for the
// settings of c (sameCFAR: every field that sets a multiplier, the noise
// correlation value for value), with the multipliers it has solved;
// without such a set it starts one (c itself as detector 0, detectors of
// c's settings as the others). Detectors of one set are used by
// different goroutines of one evaluation; one evaluation runs at a time
// (an Engine is not safe for concurrent use). A nil memo returns c for
// 0 and a new detector of c's settings otherwise.
func (p *pdMemo) cfar1(c *dsp.CFAR, i int) *dsp.CFAR {
	if c == nil {
		return nil
	}
	if p == nil {
		if i == 0 {
			return c
		}
		return sameDetector(c)
	}
	p.mu.Lock()
	defer p.mu.Unlock()
	for n, set := range p.cf1s {
		if sameCFAR(set[0], c) {
			copy(p.cf1s[1:n+1], p.cf1s[:n])
			if set[i] == nil {
				set[i] = sameDetector(c)
			}
			p.cf1s[0] = set
			return set[i]
		}
	}
	var set [cfSet]*dsp.CFAR
	set[0] = c
	if i != 0 {
		set[i] = sameDetector(c)
	}
	if len(p.cf1s) < cf1Kept {
		p.cf1s = append(p.cf1s, set)
	}
	copy(p.cf1s[1:], p.cf1s)
	p.cf1s[0] = set
	return set[i]
}

// sameCFAR says whether two single-pulse detectors have the same
// settings (those sameDetector copies) and noise correlation.
func sameCFAR(a, b *dsp.CFAR) bool {
	return a.PFA == b.PFA && a.Guard == b.Guard && a.Train == b.Train && a.Rank == b.Rank &&
		a.Variant == b.Variant && a.Censor == b.Censor && a.Pulses == b.Pulses &&
		(a.Rho == nil) == (b.Rho == nil) && sameBits(a.Rho, b.Rho)
}

// sameBits says whether two vectors hold the same values bit for bit.
func sameBits(a, b []complex128) bool {
	if len(a) != len(b) {
		return false
	}
	for i, v := range a {
		w := b[i]
		if math.Float64bits(real(v)) != math.Float64bits(real(w)) || math.Float64bits(imag(v)) != math.Float64bits(imag(w)) {
			return false
		}
	}
	return true
}

// cf2Kept is the number of range–Doppler detectors a memo keeps.
const cf2Kept = 8

// cfar2 returns the detector kept from an earlier evaluation that is
// the same as c (its settings, and the noise correlations in range and
// Doppler equal value for value), with the multipliers it has solved, or
// keeps c and returns it. The detector it returns is used by one
// evaluation at a time (an Engine is not safe for concurrent use).
func (p *pdMemo) cfar2(c *dsp.CFAR2D) *dsp.CFAR2D {
	if p == nil || c == nil {
		return c
	}
	p.mu.Lock()
	defer p.mu.Unlock()
	for i, k := range p.cf2s {
		if sameCFAR2D(k, c) {
			copy(p.cf2s[1:i+1], p.cf2s[:i])
			p.cf2s[0] = k
			return k
		}
	}
	if len(p.cf2s) < cf2Kept {
		p.cf2s = append(p.cf2s, nil)
	}
	copy(p.cf2s[1:], p.cf2s)
	p.cf2s[0] = c
	return c
}

// sameCFAR2D says whether two detectors have the same settings and noise
// correlations.
func sameCFAR2D(a, b *dsp.CFAR2D) bool {
	if a.PFA != b.PFA || a.GuardR != b.GuardR || a.TrainR != b.TrainR || a.GuardD != b.GuardD || a.TrainD != b.TrainD ||
		a.Rank != b.Rank || a.Variant != b.Variant || a.Censor != b.Censor ||
		!slices.Equal(a.RhoR, b.RhoR) || (a.RhoR == nil) != (b.RhoR == nil) ||
		len(a.DopplerCov) != len(b.DopplerCov) || (a.DopplerCov == nil) != (b.DopplerCov == nil) {
		return false
	}
	for i := range a.DopplerCov {
		if !slices.Equal(a.DopplerCov[i], b.DopplerCov[i]) {
			return false
		}
	}
	return true
}

// evID returns the interned id of ev (exact bits), −1 for nil.
func (p *pdMemo) evID(ev []float64) int32 {
	if ev == nil {
		return -1
	}
	p.keyBuf = p.keyBuf[:0]
	for _, e := range ev {
		p.keyBuf = binary.LittleEndian.AppendUint64(p.keyBuf, math.Float64bits(e))
	}
	if id, ok := p.evIDs[string(p.keyBuf)]; ok {
		return id
	}
	if p.evIDs == nil {
		p.evIDs = map[string]int32{}
	}
	id := p.evNext
	p.evNext++
	p.evIDs[string(p.keyBuf)] = id
	return id
}

// lookup returns the memoised result of k.
func (p *pdMemo) lookup(k pdKey) (pdVal, bool) {
	if v, ok := p.cur[k]; ok {
		return v, true
	}
	if v, ok := p.old[k]; ok {
		p.store(k, v) // used again: keep it in the current generation
		return v, true
	}
	return pdVal{}, false
}

// store records the result of k, starting a new generation when the
// current one is full.
func (p *pdMemo) store(k pdKey, v pdVal) {
	if len(p.cur) >= pdMemoGen {
		p.old, p.cur = p.cur, make(map[pdKey]pdVal, pdMemoGen)
		if len(p.evIDs) > pdMemoGen {
			// Ids of the eigenvalue table name keys of both generations:
			// drop all three together.
			p.old, p.evIDs = nil, nil
		}
	}
	if p.cur == nil {
		p.cur = make(map[pdKey]pdVal, 64)
	}
	p.cur[k] = v
}

// key returns t's key for arg; the caller holds p.mu.
func (p *pdMemo) key(t pdTest, snr, arg float64, req bool) pdKey {
	return pdKey{det: t.det, snr: snr, arg: arg, alpha: t.alpha, ev: p.evID(t.ev), beyond: t.beyond, req: req,
		variant: t.variant, n1: t.n1, n2: t.n2, chi4: p.evID(t.chi4w)}
}

// pd returns t.pd(r), memoised.
func (p *pdMemo) pd(t pdTest, r float64) (float64, bool) {
	if p == nil {
		return t.pdFresh(r)
	}
	p.mu.Lock()
	k := p.key(t, t.snr, r, false)
	v, ok := p.lookup(k)
	p.mu.Unlock()
	if ok {
		return v.v, v.ok
	}
	v.v, v.ok = t.pdFresh(r)
	p.mu.Lock()
	p.store(k, v)
	p.mu.Unlock()
	return v.v, v.ok
}

// requiredSNR returns t.requiredSNR(pd), memoised.
func (p *pdMemo) requiredSNR(t pdTest, pd float64) (float64, error) {
	if p == nil {
		return t.requiredSNRFresh(pd)
	}
	p.mu.Lock()
	k := p.key(t, 0, pd, true)
	v, ok := p.lookup(k)
	p.mu.Unlock()
	if ok {
		return v.v, v.err
	}
	v.v, v.err = t.requiredSNRFresh(pd)
	p.mu.Lock()
	p.store(k, v)
	p.mu.Unlock()
	return v.v, v.err
}
