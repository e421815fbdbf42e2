package scenarios

import (
	"math"

	"github.com/pulsewright/pulsewright/dsp"
)

// verdict is the status analysis of one target on the noise-free scene.
type verdict struct {
	status     string
	peakK      int     // window sample of the target's own peak, -1 if none
	peak       float64 // its own noise-free power there, re output noise
	noiseLevel float64 // detector threshold against noise alone
	sceneLevel float64 // detector threshold with the rest of the scene in its training cells
	cell       float64 // power the rest of the scene puts into the peak cell
	threshold  float64 // max(sceneLevel, cell)
	culprit    int     // index of the target that masks it, -1 if none
	cause      string  // what of the culprit masks it: "" for its response, else an impairment (causeSkirt, …); with culprit −1, the receiver's own
	byCell     bool    // masked by power at its very cell (sidelobe or mainlobe) rather than through the CFAR
	cells      int     // training cells used at the peak cell
	unblanked  float64 // the peak of its echo without blanking (same units as peak), 0 when not blanked
	alone      float64 // detector threshold with only the target itself in its training cells
	cancelled  bool    // a range–Doppler map with no power of it, its echo on processed gates: the MTI canceller removed it (zero Doppler)

	// On a range–Doppler map (train.judge): the variant CFARs' training
	// cells at the peak cell — leading (range offset < 0, or 0 and
	// Doppler offset < 0) and lagging counts, and the censoring scaled to
	// them as the map's detector scales it; and for a Swerling 4 target
	// the pulse weights of its peak bin and its law there (pdtrain.go).
	halves [2]int
	censor int
	chi4w  []float64
	chi4   *dsp.TrainChi4

	// Probabilities of detection (docs/detection.md §6), set by decide
	// when a closed form applies (hasPd).
	hasPd   bool
	test    pdTest  // the target's test at its peak cell
	pdNoise float64 // Pd against the detector's threshold with noise alone
	pdScene float64 // Pd against the scene's threshold at the cell; valid when sceneOK
	sceneOK bool
	raise   float64 // the scene's threshold over the noise-only one (≥ 1)

	// Echoes sharing the tested cell (pdcell.go): what the rest of the
	// scene puts into it, each with its law. Where that power lies below
	// the detector's level (inCellApplies), pdScene (= pdCross) is the Pd
	// of the sum over uniform phases, pdOwn the target's Pd against the
	// same level without them, and the status is decided on the smaller
	// of the two (echoes that make the cell cross more often are not
	// credited to the target); inCellUsed says so.
	inCell     []dsp.CellEcho
	pdOwn      float64
	pdCross    float64 // the probability that the cell crosses, echoes in it included
	inCellUsed bool
	rule       string // "pd" or "threshold": what decided a detected, masked, too_weak or eclipsed-by-loss status
}

// Rules that decide a status (TargetReport.DecidedOn).
const (
	rulePd        = "pd"
	ruleThreshold = "threshold"
)

// margin returns the peak over the threshold in dB (the report's
// threshold_margin_db), or nil when the target has no peak in the window.
func (v *verdict) margin() *float64 {
	if v.peakK < 0 || v.peak <= 0 || v.status == StatusEclipsed || v.status == StatusOutOfWindow || v.status == StatusFolded || math.IsInf(v.threshold, 1) {
		return nil
	}
	m := dsp.DB(v.peak / v.threshold)
	if math.IsInf(m, 0) || math.IsNaN(m) {
		return nil // no finite threshold (a detector without training cells): no margin to state
	}
	return &m
}

// cfarVariant maps a detector kind to dsp's averaging variant.
func cfarVariant(kind string) dsp.CFARVariant {
	switch kind {
	case DetectorGO:
		return dsp.GreatestOf
	case DetectorSO:
		return dsp.SmallestOf
	case DetectorCens:
		return dsp.Censored
	}
	return dsp.CellAveraging
}

// detector returns the CFAR plan of the scenario, or nil for a fixed
// threshold. The plan knows the noise correlation between gates, so its
// multipliers hold the false-alarm probability at any oversampling; it is
// kept for the model's lifetime, with the multipliers it has solved.
func (m *model) detector() *dsp.CFAR {
	d := m.s.Receiver.Detector
	if d.Kind == DetectorFixed {
		return nil
	}
	if m.cfar == nil {
		m.cfar = &dsp.CFAR{PFA: d.PFA, Guard: d.GuardCells, Train: d.TrainingCells, Rho: m.noiseCorrelation(),
			Variant: cfarVariant(d.Kind), Censor: d.CensoredCells, Pulses: m.nciPulses()}
		if d.Kind == DetectorOS {
			m.cfar.Rank = d.Rank
		}
		// A detector of the same settings kept from an earlier
		// evaluation (a suggestion's changed scenario) keeps the
		// multipliers it has solved.
		m.cfar = m.memo.cfar1(m.cfar, 0)
	}
	return m.cfar
}

// level returns the detector's threshold at gate k when the training cells
// hold 1 (noise) plus extra(i) at gate i; only processed gates train.
func (sc *scene) level(cf *dsp.CFAR, k int, extra func(i int) float64) float64 {
	if cf == nil {
		return sc.m.fixedLevel()
	}
	lo1, _, _, hi2 := cf.TrainingCells(k, sc.m.n)
	lo1, hi2 = min(lo1, k), max(hi2, k+1)
	loc := make([]float64, hi2-lo1)
	for i := range loc {
		loc[i] = 1 + extra(lo1+i)
	}
	return cf.LevelValid(loc, sc.m.processed[lo1:hi2], k-lo1)
}

// judge decides the status of target j on the noise-free scene, as
// docs/detection.md §6 defines it.
func (sc *scene) judge(j int, cf *dsp.CFAR) verdict {
	g := sc.targets[j]
	v := verdict{culprit: -1}
	v.peakK, v.peak = g.resp.peakIn(sc.m.processed)
	v.unblanked = g.unblankedPeak
	others := func(i int) float64 { return math.Max(sc.total[i]-sc.ownAt(j, i), 0) }
	if v.peakK >= 0 {
		v.noiseLevel = sc.level(cf, v.peakK, func(int) float64 { return 0 })
		if cf != nil {
			v.cells = len(cf.Cells(nil, v.peakK, sc.m.n, sc.m.processed))
		}
		v.sceneLevel = sc.level(cf, v.peakK, func(i int) float64 { return sc.total[i] })
		v.alone = sc.level(cf, v.peakK, g.resp.at)
		v.cell = others(v.peakK)
		v.threshold = math.Max(v.sceneLevel, v.cell)
		v.inCell = sc.cellEchoes(j, v.cell, func(i int) float64 { return sc.targets[i].resp.at(v.peakK) },
			func(i int) float64 { return sc.extras[i].resp.at(v.peakK) })
	}
	if sc.decide(g, &v, false) == StatusMasked {
		v.culprit, v.cause = sc.culprit(j, v, cf)
	}
	return v
}

// decide sets the status of a verdict whose peak and thresholds are
// measured, in the order of docs/detection.md §6, and returns it. This is
// the one place where statuses are decided, for single pulses and (train)
// range–Doppler maps alike.
//
// Window and blanking come first (out_of_window, folded, wholly
// eclipsed). Then, where a closed form gives the target's Pd (a point
// target behind a fixed, CA, OS, GO or SO detector, or a censored one for
// Swerling 1/2; v.hasPd), the status is
// decided on Pd at detector.pd_required: detected when Pd in the scene
// reaches it; eclipsed when blanking cost it and the unblanked echo would
// reach it against noise alone; too_weak when even against noise alone
// it does not; masked otherwise. Elsewhere the noise-free peak against
// the threshold decides, as in format version 1.
func (sc *scene) decide(g *tgt, v *verdict, train bool) string {
	v.status = sc.windowStatus(g, v)
	if v.status == StatusFolded && v.peakK >= 0 && v.peak > 0 {
		sc.probabilities(g, v, train) // how often its ghost is seen
	}
	if v.status != "" {
		return v.status
	}
	req := sc.m.s.Receiver.Detector.PdRequired
	sc.probabilities(g, v, train)
	if v.hasPd {
		v.rule = rulePd
		detected := v.peak >= v.threshold // beyond the series: the threshold decides
		if v.sceneOK {
			detected = v.pdStatus() >= req
		}
		switch {
		case detected:
			v.status = StatusDetected
		case g.blankTouched && v.unblanked > 0 && v.test.withSNR(v.unblanked).pdAt(1) >= req:
			v.status = StatusEclipsed // the eclipsing loss decides
		case v.pdNoise < req:
			v.status = StatusTooWeak
		default:
			v.status = StatusMasked
			// By its cell when the neighbours' power there decides: above
			// the detector's level, or below it but adding to the echo
			// lowers a Pd that the raised level alone would leave.
			v.byCell = v.cell >= v.sceneLevel || (v.inCellUsed && v.pdOwn >= req && v.pdCross < req)
		}
		return v.status
	}
	v.rule = ruleThreshold
	v.status = thresholdStatus(g, v)
	if v.status == StatusMasked {
		v.byCell = v.cell >= v.sceneLevel
	}
	return v.status
}

// pdStatus is the Pd the status is decided on: Pd in the scene, or with
// echoes in the cell the smaller of the cell's crossing probability and
// the target's own Pd without them.
func (v *verdict) pdStatus() float64 {
	if v.inCellUsed {
		return math.Min(v.pdCross, v.pdOwn)
	}
	return v.pdScene
}

// windowStatus returns the status that the receive window and blanking
// decide before any detector does (out_of_window, folded, too_weak for
// an echo the MTI canceller removes, eclipsed wholly, too_weak for an
// echo the receiver's band rejects), or "".
func (sc *scene) windowStatus(g *tgt, v *verdict) string {
	switch {
	case g.hidden:
		return StatusBelowHorizon // beyond the radar horizon (horizon.go)
	case sc.outOfWindow(g):
		return StatusOutOfWindow
	case g.t.Kind == TargetPoint && g.folds > 0:
		return StatusFolded // its apparent range is inside the window
	case v.cancelled && (v.peakK < 0 || v.peak <= 0):
		return StatusTooWeak // the MTI canceller removes it: a blind speed, zero Doppler itself
	case g.t.Kind == TargetPoint && g.blankTouched && (g.received <= 0 || v.peakK < 0 || v.peak <= 0):
		return StatusEclipsed // wholly eclipsed
	case g.t.Kind != TargetPoint && sc.inBlind(g):
		return StatusEclipsed
	case g.rejected:
		return StatusTooWeak // wholly outside the receiver's band
	case v.peakK < 0 || v.peak <= 0:
		return StatusOutOfWindow
	}
	return ""
}

// thresholdStatus is the rule of format version 1, for a verdict that
// windowStatus left undecided: the noise-free peak against the threshold
// at its cell (v1's below_noise is too_weak).
func thresholdStatus(g *tgt, v *verdict) string {
	switch {
	case v.peak >= v.threshold:
		return StatusDetected
	case g.blankTouched && v.unblanked >= v.noiseLevel:
		return StatusEclipsed // the eclipsing loss decides
	case v.peak < v.noiseLevel:
		return StatusTooWeak
	}
	return StatusMasked
}

// probabilities sets the verdict's Pd figures when a closed form applies
// to the target's test (pdTestFor).
func (sc *scene) probabilities(g *tgt, v *verdict, train bool) {
	if g.rejected || !(v.noiseLevel > 0) || math.IsInf(v.noiseLevel, 1) {
		return
	}
	t, ok := sc.m.pdTestFor(g, *v, train)
	if !ok {
		return
	}
	pn, ok := t.pd(1)
	if !ok {
		return
	}
	v.hasPd, v.test, v.pdNoise = true, t, pn
	v.raise = math.Max(v.threshold/v.noiseLevel, 1)
	if v.inCellApplies() {
		// The neighbours' power in the cell adds to the echo (pdcell.go);
		// the threshold is the detector's level with the scene in its
		// training cells.
		own := pn
		if v.raise != 1 {
			own, ok = t.pd(v.raise)
		}
		if ok {
			if p, ok2 := t.pdInCell(v.inCell, v.raise); ok2 {
				v.pdScene, v.pdOwn, v.pdCross, v.sceneOK, v.inCellUsed = p, own, p, true, true
				return
			}
		}
	}
	if v.raise == 1 {
		v.pdScene, v.sceneOK = pn, true // the series is costly for strong targets: once
		return
	}
	v.pdScene, v.sceneOK = t.pd(v.raise)
}

// v1Status is the status format version 1 gave this verdict, in version
// 1's names (v1Name): the threshold rule where a detector decides.
func (v *verdict) v1Status(g *tgt) string {
	if v.rule == "" {
		return v1Name(v.status)
	}
	return v1Name(thresholdStatus(g, v))
}

// outOfWindow reports whether a point target's echo peaks outside the
// receive window (at its apparent range, folded or not), or a distributed
// target lies beyond the unambiguous range or wholly outside the window.
func (sc *scene) outOfWindow(g *tgt) bool {
	r := sc.m.s.Radar
	if g.t.Kind == TargetPoint {
		return g.apparent < r.WindowStartM || g.apparent > r.WindowStopM // a folded echo inside it is folded
	}
	return g.t.RangeStartM >= sc.m.unambM || g.t.RangeStopM < r.WindowStartM || g.t.RangeStartM > r.WindowStopM
}

// inBlind reports whether a distributed target lies wholly in
// unprocessed gates (or nearer than the first gate's blind range).
func (sc *scene) inBlind(g *tgt) bool {
	if g.t.RangeStopM <= C*sc.m.tau/2 {
		return true
	}
	m := sc.m
	lo := max(int(math.Floor(m.sampleOf(g.t.RangeStartM))), 0)
	hi := min(int(math.Ceil(m.sampleOf(g.t.RangeStopM))), m.n-1)
	for k := lo; k <= hi; k++ {
		if m.processed[k] {
			return false
		}
	}
	return lo <= hi
}

// culprit returns the index of the target that contributes most to what
// masks target j (docs/detection.md §7): by cell, the power the others
// put at its peak cell; through the CFAR, the power each target, itself
// included, puts into the training cells actually used. Ties go to the
// first target; -1 when nothing contributes. An impairment's power
// (impair.go) competes on its own: when it contributes most, the result
// is its owner (-1 for the receiver) and its cause.
func (sc *scene) culprit(j int, v verdict, cf *dsp.CFAR) (int, string) {
	type source struct {
		owner int
		cause string
	}
	sum := map[source]float64{}
	var offs []int
	if !v.byCell && cf != nil {
		offs = cf.Cells(nil, v.peakK, sc.m.n, sc.m.processed)
	}
	measure := func(r *response) float64 {
		if v.byCell || cf == nil {
			return r.at(v.peakK)
		}
		c := 0.0
		for _, o := range offs {
			c += r.at(v.peakK + o)
		}
		return c
	}
	best, bi, cause := 0.0, -1, ""
	for i, g := range sc.targets {
		if i == j && (v.byCell || cf == nil) {
			continue
		}
		if c := measure(&g.resp); c > best {
			best, bi, cause = c, i, ""
		}
	}
	// Extras sum per owner and cause (a skirt's fast and slow parts).
	var order []source
	for i := range sc.extras {
		e := &sc.extras[i]
		if e.owner == j && (v.byCell || cf == nil) {
			continue
		}
		k := source{e.owner, e.cause}
		if _, ok := sum[k]; !ok {
			order = append(order, k)
		}
		sum[k] += measure(&e.resp)
	}
	for _, k := range order {
		if c := sum[k]; c > best {
			best, bi, cause = c, k.owner, k.cause
		}
	}
	return bi, cause
}

// nciPulses returns the number of pulses the scene integrates
// non-coherently before its detector (receiver.integration noncoherent;
// docs/detection.md §17), 1 otherwise. Its profile is then the mean over
// those pulses of each gate's square-law detected power (noise mean 1,
// as a single pulse's), and every level is on that mean.
func (m *model) nciPulses() int {
	if m.s.NonCoherent() {
		return m.s.Radar.Pulses
	}
	return 1
}

// fixedLevel returns the fixed threshold on the (integrated) profile in
// units of the noise power of one pulse: −ln Pfa for one pulse
// (dsp.FixedMultiplier); for N pulses integrated non-coherently T/N, with
// Q(N, T) = Pfa on their sum (dsp.GammaThreshold).
func (m *model) fixedLevel() float64 {
	pfa := m.s.Receiver.Detector.PFA
	if n := m.nciPulses(); n > 1 {
		return dsp.GammaThreshold(pfa, float64(n)) / float64(n)
	}
	return dsp.FixedMultiplier(pfa)
}
