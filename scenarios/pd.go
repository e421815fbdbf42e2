package scenarios

import (
	"fmt"
	"math"
	"math/cmplx"
	"strconv"

	"github.com/pulsewright/pulsewright/dsp"
	"gonum.org/v1/gonum/mathext"
)

// Probability of detection of a point target in the scene
// (docs/detection-probability.md §6). The tested SNR is the target's own
// noise-free power at its peak cell over the noise there (verdict.peak):
// the single-pulse SNR after every stated loss, straddle included, or on
// a range–Doppler map the integrated SNR of a coherent train.

// pdTest is the dsp detector that models one target's test, and the SNR
// (linear, at the tested cell) it is fed.
type pdTest struct {
	det dsp.Detector
	snr float64
	// ev, when set, are the eigenvalues of the covariance of the
	// correlated CA-CFAR training cells (unit diagonal), and alpha the
	// multiplier on their mean that holds Pfa; the cell under test is
	// independent of them (docs/detection-probability.md §7).
	ev    []float64
	alpha float64
	// beyond is set for a steady target behind a CFAR whose multiplier
	// dsp's series does not accept: Pd is then pdBeyond's average.
	beyond bool
	// variant, when not CellAveraging, is a greatest-of, smallest-of or
	// censored CFAR (single pulse): Pd is dsp.VariantPd with alpha the
	// multiplier on the half-mean (GO, SO; n1 leading and n2 lagging
	// cells) or on the kept mean (censored; n1 cells, n2 censored).
	variant dsp.CFARVariant
	n1, n2  int
	// chi4, when set, is the law of a Swerling 4 target's test in its
	// Doppler bin of a range–Doppler map (dsp.TrainChi4), chi4w the pulse
	// weights it was built from (the memo's key); det.Swerling is then
	// Swerling4 with one test, the one-pulse law used only where the
	// target shares its cell with other echoes (pdInCell).
	chi4  *dsp.TrainChi4
	chi4w []float64
	// memo keeps pd's and requiredSNR's results across evaluations
	// (pdmemo.go); nil computes them afresh.
	memo *pdMemo
}

// pdTestFor returns the test of a target of fluctuation fluct whose
// verdict is v, or false when no form applies: distributed targets, no
// peak, no training cell; a Swerling 4 target on a staggered train's map
// or behind a censored CFAR on a map. On a map a Swerling 2 target's test
// is exponential at the tested SNR (its echo, independent complex
// Gaussian from pulse to pulse, is complex Gaussian in every bin), a
// Swerling 4 target's is dsp.TrainChi4 for its bin's pulse weights
// (docs/detection-probability.md §2, §7).
func (m *model) pdTestFor(g *tgt, v verdict, train bool) (pdTest, bool) {
	if g.t.Kind != TargetPoint || v.peakK < 0 || !(v.peak > 0) || math.IsInf(v.peak, 0) {
		return pdTest{}, false
	}
	sw := swerling(g.t.Fluctuation)
	if train && sw == dsp.Swerling4 && (v.chi4 == nil || m.s.Receiver.Detector.Kind == DetectorCens) {
		return pdTest{}, false
	}
	d := m.s.Receiver.Detector
	det := dsp.Detector{Pfa: d.PFA, Pulses: 1, Integration: dsp.Coherent, Swerling: sw}
	if n := m.nciPulses(); n > 1 {
		// Non-coherent integration (docs/detection.md §17): the sum of n
		// square-law pulses at the gate, Swerling 1 and 3 constant over
		// them, 2 and 4 independent from pulse to pulse; v.peak is the
		// SNR of one pulse there.
		det.Pulses, det.Integration = n, dsp.NonCoherent
	}
	switch d.Kind {
	case DetectorFixed:
	case DetectorCA:
		det.CFARCells = v.cells
	case DetectorOS:
		det.CFARCells = v.cells
		if v.cells > 0 {
			if train {
				// The rank the map's detector uses at the cell (dsp.CFAR2D):
				// scaled to the whole 2-D region, then to the cells kept
				// (docs/detection.md §9).
				n2 := c2DCells(&dsp.CFAR2D{GuardR: d.GuardCells, TrainR: d.TrainingCells, GuardD: d.DopplerGuardCells, TrainD: d.DopplerTrainingCells})
				r2 := 1 + int(math.Round(float64(d.Rank-1)/float64(d.TrainingCells)*float64(n2)))
				det.OSRank = int(math.Round(float64(r2) * float64(v.cells) / float64(n2)))
			} else {
				det.OSRank = int(math.Round(float64(d.Rank) * float64(v.cells) / float64(d.TrainingCells)))
			}
			det.OSRank = min(max(det.OSRank, 1), v.cells)
		}
	case DetectorGO, DetectorSO, DetectorCens:
		if v.cells == 0 {
			return pdTest{}, false
		}
		if train {
			return m.variantTestMap(det, v)
		}
		return m.variantTest(det, v)
	default:
		return pdTest{}, false
	}
	if d.Kind != DetectorFixed && v.cells == 0 {
		return pdTest{}, false
	}
	t := pdTest{det: det, snr: v.peak, memo: m.memo}
	if train && sw == dsp.Swerling4 {
		t.chi4, t.chi4w = v.chi4, v.chi4w
		if det.Validate() != nil {
			return pdTest{}, false
		}
		return t, true
	}
	if det.Validate() != nil {
		// Too few training cells for the series: a steady target's Pd
		// is still the average of pdavg.go.
		if sw != dsp.SwerlingNone || det.CFARCells == 0 || det.Swerling != dsp.SwerlingNone || det.Pulses > 1 {
			return pdTest{}, false
		}
		t.beyond = true
		return t, true
	}
	if d.Kind == DetectorCA && !train && det.Pulses == 1 {
		t.ev, t.alpha = m.correlatedCells(v.peakK)
	}
	return t, true
}

// variantTest returns the test of a target behind the scene's greatest-of,
// smallest-of or censored CFAR (docs/detection-probability.md §7): the
// training cells the plan uses at the target's peak gate (independent by
// construction, on the ordered statistic's lattice), split into the
// leading and lagging halves, or counted with the censoring scaled to
// them as the plan does, and the multiplier that holds Pfa for exactly
// those cells (dsp.VariantPd: every fluctuation).
func (m *model) variantTest(det dsp.Detector, v verdict) (pdTest, bool) {
	d := m.s.Receiver.Detector
	cf := m.detector()
	offs := cf.Cells(nil, v.peakK, m.n, m.processed)
	t := pdTest{det: det, snr: v.peak, memo: m.memo, variant: cfarVariant(d.Kind)}
	t.det.CFARCells = len(offs)
	switch t.variant {
	case dsp.GreatestOf, dsp.SmallestOf:
		for _, o := range offs {
			if o < 0 {
				t.n1++
			} else {
				t.n2++
			}
		}
		if t.variant == dsp.GreatestOf {
			t.alpha = dsp.GOMultiplier(d.PFA, t.n1, t.n2)
		} else {
			t.alpha = dsp.SOMultiplier(d.PFA, t.n1, t.n2)
		}
	case dsp.Censored:
		n := len(offs)
		c := 0
		if d.TrainingCells > 0 {
			c = min(max(int(math.Round(float64(d.CensoredCells)*float64(n)/float64(d.TrainingCells))), 0), n-1)
		}
		t.n1, t.n2 = n, c
		t.alpha = dsp.CensoredMultiplier(d.PFA, n, c)
	}
	return t, true
}

// variantTestMap returns the test of a target behind the scene's
// greatest-of, smallest-of or censored CFAR on a range–Doppler map: the
// 2-D training cells used at its peak cell, split into halves (leading:
// range offset < 0, or 0 and Doppler offset < 0) or censored as the map's
// detector does (verdict.halves, verdict.censor; docs/detection.md §5),
// taken as independent, and the multiplier that holds Pfa for exactly
// those cells.
func (m *model) variantTestMap(det dsp.Detector, v verdict) (pdTest, bool) {
	d := m.s.Receiver.Detector
	t := pdTest{det: det, snr: v.peak, memo: m.memo, variant: cfarVariant(d.Kind), chi4: v.chi4, chi4w: v.chi4w}
	t.det.CFARCells = v.cells
	switch t.variant {
	case dsp.GreatestOf:
		t.n1, t.n2 = v.halves[0], v.halves[1]
		t.alpha = dsp.GOMultiplier(d.PFA, t.n1, t.n2)
	case dsp.SmallestOf:
		t.n1, t.n2 = v.halves[0], v.halves[1]
		t.alpha = dsp.SOMultiplier(d.PFA, t.n1, t.n2)
	case dsp.Censored:
		if t.chi4 != nil {
			return pdTest{}, false
		}
		t.n1, t.n2 = v.cells, v.censor
		t.alpha = dsp.CensoredMultiplier(d.PFA, t.n1, t.n2)
	}
	if t.n1+t.n2 < 1 || t.det.Swerling != dsp.Swerling4 {
		t.chi4, t.chi4w = nil, nil
	}
	return t, t.n1+t.n2 >= 1
}

// thresholdCDF returns the CDF of the random threshold of t's CFAR at r
// times its nominal multiplier, in units of the cell's noise, with
// independent exponential training cells: CA-CFAR, M cells, α on the
// mean: P(M, M·x/(rα)); OS-CFAR, rank k of M: P(at least k cells below
// x/(rα)) = I_{1−e^(−x/(rα))}(k, M−k+1); greatest-of and smallest-of as
// dsp.VariantPd. nil for a censored CFAR (no such form here).
func (t pdTest) thresholdCDF(r float64) func(x float64) float64 {
	d := t.det
	m := float64(d.CFARCells)
	switch {
	case t.variant == dsp.GreatestOf || t.variant == dsp.SmallestOf:
		a := r * t.alpha
		return func(x float64) float64 {
			p := func(n int) float64 {
				if n == 0 {
					return 1
				}
				return mathext.GammaIncReg(float64(n), float64(n)*x/a)
			}
			p1, p2 := p(t.n1), p(t.n2)
			if t.n1 == 0 || t.n2 == 0 || t.variant == dsp.GreatestOf {
				return p1 * p2
			}
			return 1 - (1-p1)*(1-p2)
		}
	case t.variant != dsp.CellAveraging:
		return nil
	case d.OSRank > 0:
		a := r * dsp.OSMultiplier(d.Pfa, d.CFARCells, d.OSRank)
		k := float64(d.OSRank)
		return func(x float64) float64 {
			return mathext.RegIncBeta(k, m-k+1, -math.Expm1(-x/a))
		}
	}
	a := r * m * math.Expm1(-math.Log(d.Pfa)/m) // α on the mean
	return func(x float64) float64 { return mathext.GammaIncReg(m, m*x/a) }
}

// pdChi4 returns the Pd of a Swerling 4 target on a map (t.chi4) at SNR
// snr against r times the detector's nominal threshold.
func (t pdTest) pdChi4(snr, r float64) (float64, bool) {
	if t.det.CFARCells == 0 {
		return t.chi4.Survival(snr, -r*math.Log(t.det.Pfa)), true
	}
	if t.variant == dsp.CellAveraging && t.det.OSRank == 0 {
		m := float64(t.det.CFARCells)
		return t.chi4.PdCA(snr, t.det.CFARCells, r*m*math.Expm1(-math.Log(t.det.Pfa)/m)), true
	}
	cdf := t.thresholdCDF(r)
	if cdf == nil {
		return 0, false
	}
	return t.chi4.PdThreshold(snr, cdf), true
}

// pdVariant returns the Pd of a variant test at SNR snr against r times
// its nominal threshold.
func (t pdTest) pdVariant(snr, r float64) (float64, bool) {
	if t.chi4 != nil {
		return t.pdChi4(snr, r)
	}
	p, err := dsp.VariantPd(t.variant, t.det.Swerling, snr, r*t.alpha, t.n1, t.n2)
	if err != nil || math.IsNaN(p) {
		return 0, false
	}
	return p, true
}

// correlatedCells returns the eigenvalues of the noise covariance of the
// CA-CFAR training cells used at gate k and the multiplier that holds Pfa
// for them, when those cells are correlated with one another but not with
// the cell under test (every training offset beyond the noise correlation);
// otherwise nil.
func (m *model) correlatedCells(k int) ([]float64, float64) {
	rho := m.noiseCorrelation()
	cf := m.detector()
	offs := cf.Cells(nil, k, m.n, m.processed)
	if len(offs) == 0 || len(rho) < 2 {
		return nil, 0
	}
	corr := false
	for i, a := range offs {
		if a > -len(rho) && a < len(rho) {
			return nil, 0 // the cell under test shares noise with a training cell
		}
		if i > 0 && a-offs[i-1] < len(rho) {
			corr = true
		}
	}
	if !corr {
		return nil, 0
	}
	lag := lagCorrelation(rho)
	ev := dsp.HermitianEigenvalues(len(offs), func(i, j int) complex128 { return lag(offs[j] - offs[i]) })
	if ev == nil {
		return nil, 0
	}
	for i, e := range ev {
		ev[i] = max(e, 0) // rounding below zero
	}
	return ev, dsp.CorrelatedCAMultiplier(m.s.Receiver.Detector.PFA, ev)
}

// pdCorrelated returns the Pd of t at SNR snr against r times the
// nominal threshold, for the correlated-cell case.
func (t pdTest) pdCorrelated(snr, r float64) float64 {
	return t.det.PdCorrelatedCA(snr, r*t.alpha, t.ev)
}

// requiredSNR returns the SNR (linear) at which t reaches pd against noise
// alone.
func (t pdTest) requiredSNR(pd float64) (float64, error) {
	return t.memo.requiredSNR(t, pd)
}

// requiredSNRFresh is requiredSNR computed without the memo.
func (t pdTest) requiredSNRFresh(pd float64) (float64, error) {
	if t.ev == nil && !t.beyond && t.variant == dsp.CellAveraging && t.chi4 == nil {
		return t.det.RequiredSNR(pd)
	}
	at := func(snr float64) float64 {
		if t.chi4 != nil && t.variant == dsp.CellAveraging {
			p, _ := t.pdChi4(snr, 1)
			return p
		}
		if t.variant != dsp.CellAveraging {
			p, _ := t.pdVariant(snr, 1)
			return p
		}
		if t.beyond {
			p, _ := t.pdBeyond(snr, 1)
			return p
		}
		return t.pdCorrelated(snr, 1)
	}
	lo, hi := -60.0, 200.0
	if at(dsp.FromDB(hi)) < pd {
		return 0, fmt.Errorf("Pd %g needs more than %g dB", pd, hi)
	}
	eps := 1e-9
	if t.beyond || t.variant != dsp.CellAveraging || (t.chi4 != nil && t.det.CFARCells > 0) {
		eps = 1e-5 // each step integrates: 35 steps
	}
	for hi-lo > eps {
		mid := (lo + hi) / 2
		if at(dsp.FromDB(mid)) < pd {
			lo = mid
		} else {
			hi = mid
		}
	}
	return dsp.FromDB((lo + hi) / 2), nil
}

// logPfaRaised returns the natural log of the false-alarm probability of
// t's detector when its threshold multiplier is r ≥ 1 times the nominal
// one, with independent exponential reference cells.
func (t pdTest) logPfaRaised(r float64) float64 {
	d := t.det
	m := float64(d.CFARCells)
	if d.Pulses > 1 && d.Integration == dsp.NonCoherent {
		// N pulses summed: Q(N, r·T) with a known noise level, and
		// I_{1/(1+r·c)}(M·N, N) behind a CA-CFAR whose multiplier on the
		// sum of its M cells is c (dsp.Detector.Threshold).
		n := float64(d.Pulses)
		if d.CFARCells == 0 {
			return math.Log(mathext.GammaIncRegComp(n, r*d.Threshold()))
		}
		c := d.Threshold() / m
		return math.Log(mathext.RegIncBeta(m*n, n, 1/(1+r*c)))
	}
	switch {
	case d.CFARCells == 0:
		return r * math.Log(d.Pfa) // exp(−r·T), T = −ln Pfa
	case d.OSRank > 0:
		a := dsp.OSMultiplier(d.Pfa, d.CFARCells, d.OSRank)
		return math.Log(dsp.OSPfa(r*a, d.CFARCells, d.OSRank))
	}
	c := math.Expm1(-math.Log(d.Pfa) / m) // multiplier on the reference sum
	return -m * math.Log1p(r*c)
}

// pdBelow is the Pd reported as 0: a target whose Pd against a raised
// threshold is below it even at the smallest false-alarm probability the
// series reaches.
const pdBelow = 1e-9

// pd returns t's Pd against a threshold r > 0 times the one
// the detector sets against noise alone (the scene's extra power in the
// training cells, or a neighbour's power at the cell; r < 1 where
// pdInCell rescales the test). The scaled threshold is the nominal one of
// a detector of another Pfa, so Pd is the
// exact series at that Pfa. ok is false when the series cannot reach the
// raised threshold and Pd is not below pdBelow there.
func (t pdTest) pd(r float64) (float64, bool) {
	return t.memo.pd(t, r)
}

// pdFresh is pd computed without the memo.
func (t pdTest) pdFresh(r float64) (float64, bool) {
	if !(r > 0) || math.IsInf(r, 1) {
		return 0, false
	}
	if t.variant != dsp.CellAveraging {
		return t.pdVariant(t.snr, r)
	}
	if t.chi4 != nil {
		return t.pdChi4(t.snr, r)
	}
	if t.beyond {
		return t.pdBeyond(t.snr, r)
	}
	if t.ev != nil {
		return t.pdCorrelated(t.snr, r), true
	}
	d := t.det
	if d.CFARCells == 0 && r != 1 && d.Pulses == 1 {
		return knownNoisePd(d.Swerling, t.snr, -r*math.Log(d.Pfa)), true
	}
	if d.CFARCells == 0 && d.Pulses > 1 && (d.Swerling == dsp.Swerling3 || d.Swerling == dsp.Swerling4) && float64(d.Pulses)*t.snr > strongEnergy {
		if T := r * d.Threshold(); T <= strongThreshold {
			return pdStrongFluct(d, t.snr, T), true
		}
		// A strong target under a threshold raised far into the tail:
		// both the series and the quadrature would take seconds; no Pd
		// (the threshold decides; docs/detection.md §17).
		return 0, false
	}
	if d.CFARCells == 0 && r != 1 {
		// N pulses integrated, a known level: at the raised threshold
		// itself, which no Pfa underflow limits; Swerling 1 and 2 in
		// closed form (the series is long for strong targets).
		if p, ok := knownNoisePdN(d.Swerling, d.Pulses, t.snr, r*d.Threshold()); ok {
			return p, true
		}
		return d.PdAtThreshold(t.snr, r*d.Threshold()), true
	}
	if d.CFARCells > 0 && r != 1 && d.Pulses > 1 && d.OSRank == 0 {
		// Behind a CA-CFAR: the series at the raised multiplier on the
		// reference sum (its cost grows with the multiplier: bounded).
		if c := r * d.Threshold() / float64(d.CFARCells); c <= maxRaisedSumMultiplier {
			return d.PdAtSumMultiplier(t.snr, c), true
		}
	}
	if r != 1 {
		lp := t.logPfaRaised(r)
		d.Pfa = math.Exp(lp)
		if lp < math.Log(1e-300) || d.Validate() != nil {
			// Beyond the series: a steady target's Pd by pdavg.go;
			// otherwise an upper bound at a reachable Pfa above the
			// true one.
			if p, ok := t.pdBeyond(t.snr, r); ok {
				return p, true
			}
			for _, p := range []float64{1e-300, 1e-200, 1e-100, 1e-50, 1e-30, 1e-20, 1e-15, 1e-12} {
				d.Pfa = p
				if p >= math.Exp(lp) && d.Validate() == nil {
					if d.Pd(t.snr) < pdBelow {
						return 0, true
					}
					break
				}
			}
			return 0, false
		}
	}
	return d.Pd(t.snr), true
}

// withSNR returns t for a target of SNR snr (linear) at the same cell.
func (t pdTest) withSNR(snr float64) pdTest {
	t.snr = snr
	return t
}

// pdAt is pd with 0 where the series cannot reach the raised threshold.
func (t pdTest) pdAt(r float64) float64 {
	p, ok := t.pd(r)
	if !ok {
		return 0
	}
	return p
}

// pdFigures sets pd, pd_alone, snr_required_db and margin_db of a point
// target with verdict v (its Pd test and Pd in the scene set by decide);
// alone is the threshold of its cell with the other targets removed (its
// own sidelobes kept).
func (m *model) pdFigures(v verdict, alone float64, out *TargetReport) {
	if !v.hasPd {
		return
	}
	t := v.test
	if p := v.pdScene; v.sceneOK && p >= 0 && p <= 1 {
		out.Pd = &p
	}
	switch ra := math.Max(alone/v.noiseLevel, 1); {
	case ra == v.raise && v.inCellUsed:
		p := v.pdOwn // the same level, without the echoes in its cell
		out.PdAlone = &p
	case ra == v.raise && v.sceneOK:
		p := v.pdScene // nothing else raises its threshold: the same test
		out.PdAlone = &p
	case ra == 1:
		p := v.pdNoise
		out.PdAlone = &p
	default:
		if p, ok := t.pd(ra); ok && p >= 0 && p <= 1 {
			out.PdAlone = &p
		}
	}
	if req, err := t.requiredSNR(m.s.Receiver.Detector.PdRequired); err == nil {
		rdb := dsp.DB(req)
		mdb := dsp.DB(t.snr) - rdb
		if !math.IsInf(rdb, 0) && !math.IsNaN(rdb) && !math.IsInf(mdb, 0) && !math.IsNaN(mdb) {
			out.SNRRequiredDB, out.MarginDB = &rdb, &mdb
		}
	}
}

// PdText formats a probability of detection for people: three decimals,
// "> 0.999" and "< 0.001" at the ends (never a rounded 1 or 0).
func PdText(p float64) string {
	switch {
	case p >= 0.9995:
		return "> 0.999"
	case p < 0.0005:
		return "< 0.001"
	}
	return strconv.FormatFloat(p, 'f', 3, 64)
}

// knownNoisePd returns the Pd of one square-law test of a target of SNR
// chi (linear) against the threshold T in units of the noise power, for
// any threshold (no Pfa to underflow): steady, Q_1(√(2χ), √(2T)) (Marcum);
// Swerling 1 and 2, exp(−T/(1+χ)); Swerling 3 and 4,
// exp(−T/(1+χ/2))·(1 + (χ/2)·T/(1+χ/2)²) (Richards, Fundamentals of Radar
// Signal Processing, 2nd ed., §6.3 and Table 6.1, one pulse).
func knownNoisePd(swerling int, chi, T float64) float64 {
	switch swerling {
	case dsp.Swerling1, dsp.Swerling2:
		return math.Exp(-T / (1 + chi))
	case dsp.Swerling3, dsp.Swerling4:
		x := chi / 2
		return math.Exp(-T/(1+x)) * (1 + x*T/((1+x)*(1+x)))
	}
	return dsp.MarcumQ(1, math.Sqrt(2*chi), math.Sqrt(2*T))
}

// maxRaisedSumMultiplier bounds the raised CA-CFAR multiplier on the
// reference sum for which pdFresh sums dsp's series directly (about
// 40·(1 + c) terms).
const maxRaisedSumMultiplier = 1e5

// knownNoisePdN returns the Pd of n pulses integrated non-coherently
// against the threshold T on their sum (noise units per pulse) for a
// Swerling 1 or 2 target of per-pulse SNR chi, in closed form, and false
// for other models:
//
//	Swerling 2: Q(n, T/(1+χ)) (Richards, Fundamentals of Radar Signal
//	Processing, 2nd ed., eq. 6.107);
//	Swerling 1: 1 − P(n−1, T) + (1 + 1/(nχ))^(n−1)·P(n−1, T/(1 + 1/(nχ)))·e^(−T/(1+nχ))
//	(DiFranco & Rubin; Mahafza, Radar Systems Analysis and Design Using
//	MATLAB, eq. 2.79),
//
// with P and Q the lower and upper regularized incomplete gamma functions.
func knownNoisePdN(swerling, n int, chi, T float64) (float64, bool) {
	N := float64(n)
	switch swerling {
	case dsp.Swerling2:
		return mathext.GammaIncRegComp(N, T/(1+chi)), true
	case dsp.Swerling1:
		if n < 2 || !(chi > 0) {
			return 0, false
		}
		b := 1 + 1/(N*chi)
		p := 1 - mathext.GammaIncReg(N-1, T) + math.Pow(b, N-1)*mathext.GammaIncReg(N-1, T/b)*math.Exp(-T/(1+N*chi))
		return min(max(p, 0), 1), true
	}
	return 0, false
}

// strongEnergy is the mean target energy N·χ (noise units) above which
// pdStrongFluct replaces dsp's series for Swerling 3 and 4 targets over
// several pulses: the series' negative-binomial weights then spread over
// about N·χ terms.
const strongEnergy = 1e5

// strongThreshold bounds the threshold (noise units, on the sum) for
// which pdStrongFluct integrates: its steady series at λ near T costs
// about √T terms per point.
const strongThreshold = 1e4

// pdStrongFluct returns the Pd of n pulses (d.Pulses, known noise) of a
// Swerling 3 or 4 target of per-pulse SNR chi against the threshold T on
// their sum, as 1 − ∫ (1 − Pd_steady(λ)) g(λ) dλ over the gamma law g of
// its energy λ (shape K = 2 or 2n, mean n·χ; detection-probability.md
// §3): 1 − Pd_steady(λ) is negligible beyond λ = T + 40·(√T + 1) (the
// steady test's statistic has mean n + λ and standard deviation
// √(n + 2λ)), so the integral runs over [0, U] by Simpson's rule on 400
// panels with the steady Pd from dsp's series, whose Poisson weights are
// short there.
func pdStrongFluct(d dsp.Detector, chi, T float64) float64 {
	n := float64(d.Pulses)
	K := 2.0
	if d.Swerling == dsp.Swerling4 {
		K = 2 * n
	}
	theta := n * chi / K
	U := T + 40*(math.Sqrt(T)+1)
	steady := d
	steady.Swerling = dsp.SwerlingNone
	lg := func(l float64) float64 { // log of the gamma density
		if l <= 0 {
			return math.Inf(-1)
		}
		lgK, _ := math.Lgamma(K)
		return (K-1)*math.Log(l) - l/theta - K*math.Log(theta) - lgK
	}
	const panels = 400
	h := U / panels
	missed := dsp.Simpson(func(l float64) float64 {
		miss := 1 - steady.PdAtThreshold(l/n, T)
		if g := lg(l); !math.IsInf(g, -1) {
			return miss * math.Exp(g)
		}
		return 0
	}, 0, h, panels)
	// Beyond U every draw is detected: what lies below U and is missed.
	return min(max(1-missed, 0), 1)
}

// lagCorrelation returns the noise correlation at lag l (in samples, either
// sign) from rho, its values at lags 0, 1, … (dsp.NoiseCorrelation):
// conj(rho[−l]) below zero, 0 beyond the filter's length.
func lagCorrelation(rho []complex128) func(l int) complex128 {
	return func(l int) complex128 {
		switch {
		case l >= len(rho) || -l >= len(rho):
			return 0
		case l < 0:
			return cmplx.Conj(rho[-l])
		}
		return rho[l]
	}
}
