package scenarios

import (
	"context"
	"fmt"
	"math"
	"slices"

	"github.com/pulsewright/pulsewright/dsp"
)

// detectorName names the detector for a reason sentence.
func detectorName(d Detector) string {
	switch d.Kind {
	case DetectorCA:
		return "CA-CFAR"
	case DetectorOS:
		return "OS-CFAR"
	case DetectorGO:
		return "GO-CFAR"
	case DetectorSO:
		return "SO-CFAR"
	case DetectorCens:
		return "censored CA-CFAR"
	}
	return "fixed"
}

// reason writes the one-sentence explanation of a verdict, with the
// numbers that decide it.
func (sc *scene) reason(g *tgt, v verdict, tr TargetReport, cf *dsp.CFAR) string {
	m := sc.m
	r := m.s.Radar
	det := detectorName(m.s.Receiver.Detector)
	req := m.s.Receiver.Detector.PdRequired
	switch v.status {
	case StatusBelowHorizon:
		return sc.horizonReason(g)
	case StatusDetected:
		if v.rule == rulePd {
			return fmt.Sprintf("Detected: %s; its peak, %.1f dB above noise, clears the %s threshold by %.1f dB.", sc.pdWords(g, v, tr, true), dsp.DB(v.peak), det, dsp.DB(v.peak/v.threshold)) + inCellWords(v) + sc.lossWords(g)
		}
		return fmt.Sprintf("Detected: its peak, %.1f dB above noise, clears the %s threshold by %.1f dB (%s).", dsp.DB(v.peak), det, dsp.DB(v.peak/v.threshold), noPdWords(g, m.s)) + sc.lossWords(g)
	case StatusFolded:
		out := fmt.Sprintf("Folded: it lies beyond the unambiguous range of %s, so the echo from %s arrives after the next pulse and shows at an apparent %s, inside the window, where it looks like a target at that range.", km(m.unambM), km(g.rangeM), km(g.apparent))
		if v.hasPd && v.sceneOK {
			out += fmt.Sprintf(" That false target is seen with Pd %s.", PdText(v.pdScene))
		}
		return out
	case StatusOutOfWindow:
		if g.t.Kind == TargetPoint && g.folds > 0 {
			return fmt.Sprintf("Beyond the unambiguous range of %s: the echo from %s arrives after the next pulse and folds to an apparent %s, outside the receive window.", km(m.unambM), km(g.rangeM), km(g.apparent))
		}
		if g.t.Kind != TargetPoint && g.t.RangeStartM >= m.unambM {
			return fmt.Sprintf("Beyond the unambiguous range of %s: its echoes fold back by %d PRI(s) and appear nearer than they are.", km(m.unambM), g.folds)
		}
		return fmt.Sprintf("Outside the receive window %s–%s: at %s its peak is not recorded.", km(r.WindowStartM), km(r.WindowStopM), km(g.rangeM))
	case StatusEclipsed:
		blind := C * m.tau / 2
		if g.t.Kind != TargetPoint {
			return fmt.Sprintf("Eclipsed: it lies inside the %s blind range of the %s pulse; the receiver is blanked while transmitting, so its range gates are not processed.", km(blind), sec(m.tau))
		}
		which := sc.whichPulse(g)
		if g.received <= 0 {
			return fmt.Sprintf("Eclipsed: at %s its whole echo arrives while %s is transmitted; the receiver is blanked then, so none of it is heard.", km(g.apparent), which)
		}
		if v.peakK < 0 || v.peak <= 0 {
			return fmt.Sprintf("Eclipsed: at %s, inside the %s blind range of the %s pulse, none of its response reaches a processed range gate (the receiver is blanked while transmitting); %.0f %% of its echo is heard.", km(g.apparent), km(blind), sec(m.tau), 100*g.received)
		}
		l, _ := g.eclipseLossDB(sc.m.processed)
		if v.rule == rulePd && v.sceneOK {
			return fmt.Sprintf("Eclipsed: only %.0f %% of its echo is heard, the rest arrives while %s is transmitted; the %.1f dB lost leaves it Pd %s, under the required %g, while without that loss it would reach Pd %s against noise alone.", 100*g.received, which, l, PdText(v.pdScene), req, PdText(v.test.withSNR(v.unblanked).pdAt(1)))
		}
		if v.rule == rulePd {
			// The scene's threshold is beyond the Pd series: the peak
			// against the threshold decided (docs/detection.md §6), and
			// the Pd against noise alone is not what failed.
			return fmt.Sprintf("Eclipsed: only %.0f %% of its echo is heard, the rest arrives while %s is transmitted; the %.1f dB lost leaves its peak %.1f dB under the %s threshold the scene sets there (too high for its Pd to be computed), while without that loss it would reach Pd %s against noise alone.", 100*g.received, which, l, -dsp.DB(v.peak/v.threshold), det, PdText(v.test.withSNR(v.unblanked).pdAt(1)))
		}
		return fmt.Sprintf("Eclipsed: only %.0f %% of its echo is heard, the rest arrives while %s is transmitted; the %.1f dB lost leaves its peak on the processed range gates %.1f dB under the %s threshold, while without that loss it would clear the threshold against noise alone by %.1f dB.", 100*g.received, which, l, -dsp.DB(v.peak/v.threshold), det, dsp.DB(v.unblanked/v.noiseLevel))
	case StatusTooWeak:
		if g.rejected {
			return fmt.Sprintf("Too weak: its Doppler shift of %s lies outside the receiver's band of ±%s, which rejects its echo entirely.", hz(g.fd), hz(m.fs/2))
		}
		if v.cancelled {
			_, p0 := g.resp.peakIn(m.processed)
			return fmt.Sprintf("Too weak: the %s removes it. At zero Doppler its echo is the same on every pulse, and the canceller's response is zero there, as at every multiple of the PRF (the blind speeds), so none of it reaches the range–Doppler map; in a single pulse its peak is %.1f dB above noise.", cancellerWords(m.s.Receiver.MTI), dsp.DB(p0))
		}
		if math.IsInf(v.noiseLevel, 1) {
			return fmt.Sprintf("Too weak: its peak is %.1f dB above noise, but the %s has no training cells around it in this receive window, so it cannot detect there; widen the window or use fewer training cells.", dsp.DB(v.peak), det) + sc.lossWords(g)
		}
		if v.rule == rulePd {
			return fmt.Sprintf("Too weak: even against noise alone %s.", sc.pdWords(g, v, tr, false)) + inCellWords(v) + sc.lossWords(g)
		}
		return fmt.Sprintf("Too weak: its peak, %.1f dB above noise, is %.1f dB under the %s threshold of %.1f dB against noise alone (%s).", dsp.DB(v.peak), dsp.DB(v.noiseLevel/v.peak), det, dsp.DB(v.noiseLevel), noPdWords(g, m.s)) + sc.lossWords(g)
	}
	return sc.maskedReason(g, v, tr)
}

// pdWords states a target's Pd against the required one, and its tested
// SNR against the SNR that needs: "Pd 0.962 against the required 0.9 ...".
// In the scene when scene is true (detected), else against noise alone.
func (sc *scene) pdWords(g *tgt, v verdict, tr TargetReport, scene bool) string {
	req := sc.m.s.Receiver.Detector.PdRequired
	pd := v.pdNoise
	if scene && v.sceneOK {
		pd = v.pdScene
	}
	verb := "reaches"
	if pd < req {
		verb = "falls short of"
	}
	out := fmt.Sprintf("its Pd of %s %s the required %g", PdText(pd), verb, req)
	if tr.SNRRequiredDB != nil && tr.MarginDB != nil {
		what := "over"
		if *tr.MarginDB < 0 {
			what = "under"
		}
		out += fmt.Sprintf(" (its %.1f dB SNR at the cell is %.1f dB %s the %.1f dB a %s target needs for that with the %s detector at Pfa %g)",
			dsp.DB(v.test.snr), math.Abs(*tr.MarginDB), what, *tr.SNRRequiredDB, fluctuationWords(g.t.Fluctuation), detectorName(sc.m.s.Receiver.Detector), sc.m.s.Receiver.Detector.PFA)
	}
	return out
}

// fluctuationWords names a fluctuation model for a sentence.
func fluctuationWords(f string) string {
	switch f {
	case "", FluctuationNone:
		return "steady"
	}
	return "Swerling " + f[len(f)-1:]
}

// noPdWords says why the threshold rather than Pd decided a status.
func noPdWords(g *tgt, s *Scenario) string {
	d := s.Receiver.Detector
	train := s.Radar.Pulses > 1
	switch {
	case g.t.Kind != TargetPoint:
		return "an extended or volume return has no Pd here, so its noise-free peak against the threshold decides"
	case train && swerling(g.t.Fluctuation) == dsp.Swerling4 && d.Kind == DetectorCens:
		return "no Pd for a Swerling 4 target behind the " + detectorName(d) + " on a range–Doppler map here, so the noise-free peak against the threshold decides"
	case train && swerling(g.t.Fluctuation) == dsp.Swerling4 && len(s.Radar.PRIStaggerS) > 0:
		return "no Pd for a Swerling 4 target on a staggered train's map here, so the noise-free peak against the threshold decides"
	}
	return "no closed-form Pd applies here, so the noise-free peak against the threshold decides"
}

// maskedReason writes the reason of a masked target.
func (sc *scene) maskedReason(g *tgt, v verdict, tr TargetReport) string {
	m := sc.m
	det := detectorName(m.s.Receiver.Detector)
	id := g.t.ID
	// Masked.
	by := "the rest of the scene"
	var other *tgt
	if v.culprit >= 0 {
		other = sc.targets[v.culprit]
		by = other.t.ID
	}
	clear := dsp.DB(v.peak / v.noiseLevel)
	if v.cause != "" {
		return sc.impairmentReason(g, v, det) + sc.maskedPd(v, tr, false) + sc.lossWords(g)
	}
	clipped := ""
	if other != nil && other != g && other.overDB > 0 {
		clipped = fmt.Sprintf(" %s's echo is clipped by the ADC (%.1f dB over full scale), which raises its compressed sidelobes.", by, other.overDB)
	}
	if v.byCell {
		what := "range sidelobe"
		if other != nil && g.t.Kind == TargetPoint && other.t.Kind == TargetPoint {
			sep := math.Abs(other.apparent - g.apparent)
			if sep < m.resolution() {
				what = fmt.Sprintf("main lobe (only %.1f m apart, inside the %.1f m resolution)", sep, m.resolution())
			}
		} else if other != nil && other.t.Kind != TargetPoint && g.t.Kind == TargetPoint && g.apparent >= other.t.RangeStartM && g.apparent <= other.t.RangeStopM {
			what = "clutter in the same cell"
		}
		if v.inCellUsed {
			return fmt.Sprintf("Masked by %s: its %s puts %.1f dB (re noise) into %s's cell, %.1f dB under the %s threshold there; it adds to %s's echo with a carrier phase that changes from look to look (half a wavelength of range turns it through a full cycle), and averaged over that phase %s's Pd falls from %s to %s.",
				by, what, dsp.DB(v.cell), id, dsp.DB(v.sceneLevel/v.cell), det, id, id, PdText(v.pdOwn), PdText(v.pdScene)) + clipped + sc.maskedPd(v, tr, other == g) + sc.lossWords(g)
		}
		if v.cell >= v.peak {
			return fmt.Sprintf("Masked by %s: its %s puts %.1f dB more power into %s's cell than %s's own peak, which would clear the noise-only threshold by %.1f dB.",
				by, what, dsp.DB(v.cell/v.peak), id, id, clear) + clipped + sc.maskedPd(v, tr, other == g)
		}
		return fmt.Sprintf("Masked by %s: its %s puts power only %.1f dB under %s's own peak into %s's cell, which lifts the threshold there.",
			by, what, dsp.DB(v.peak/v.cell), id, id) + clipped + sc.maskedPd(v, tr, other == g)
	}
	cells := fmt.Sprintf("%d training cells", v.cells)
	if sc.train != nil && sc.train.cfar() != nil {
		cells = fmt.Sprintf("%d training cells around it on the range–Doppler map", v.cells)
	}
	if other == g && g.t.Kind != TargetPoint {
		return fmt.Sprintf("Masked by itself: its own return, spread over its extent, fills the %s's %s and lifts the threshold %s its strongest cell, which would clear the noise-only threshold by %.1f dB; a cell-averaging detector does not single out a return wider than its training window.",
			det, cells, lift(v), clear)
	}
	if other == g {
		return fmt.Sprintf("Masked by its own range sidelobes: its own response fills the %s's %s and lifts the threshold %s its peak, which would clear the noise-only threshold by %.1f dB.",
			det, cells, lift(v), clear) + sc.maskedPd(v, tr, true) + sc.lossWords(g)
	}
	return fmt.Sprintf("Masked by %s through the %s: its echo in the %s lifts the threshold %s %s's peak, which would clear the noise-only threshold by %.1f dB.",
		by, det, cells, lift(v), id, clear) + clipped + sc.maskedPd(v, tr, false) + inCellWords(v) + sc.lossWords(g)
}

// inCellWords says how the echoes in a target's cell, below the
// threshold, change its Pd (pdcell.go), or "" when they do not matter at
// the three decimals of the report.
func inCellWords(v verdict) string {
	if !v.inCellUsed || math.Abs(v.pdCross-v.pdOwn) < 0.0005 {
		return ""
	}
	if v.pdCross < v.pdOwn {
		return fmt.Sprintf(" The rest of the scene puts %.1f dB (re noise) into its cell, under the threshold; added with a carrier phase that changes from look to look, it lowers its Pd from %s to %s.",
			dsp.DB(v.cell), PdText(v.pdOwn), PdText(v.pdCross))
	}
	return fmt.Sprintf(" The rest of the scene puts %.1f dB (re noise) into its cell, under the threshold; added with a carrier phase that changes from look to look, it makes the cell cross with Pd %s, but the status credits the target only with its own %s.",
		dsp.DB(v.cell), PdText(v.pdCross), PdText(v.pdOwn))
}

// lift says where the scene's threshold sits against a masked target's
// peak: "4.2 dB above" or, when Pd rather than the threshold decides, "to
// 1.3 dB under".
func lift(v verdict) string {
	if v.threshold >= v.peak {
		return fmt.Sprintf("%.1f dB above", dsp.DB(v.threshold/v.peak))
	}
	return fmt.Sprintf("to %.1f dB under", dsp.DB(v.peak/v.threshold))
}

// maskedPd compares a masked target's Pd in the scene with its Pd alone
// (with the other targets removed), or against noise alone when it masks
// itself: the sentence that makes it masked rather than too weak.
func (sc *scene) maskedPd(v verdict, tr TargetReport, self bool) string {
	if v.rule != rulePd {
		return ""
	}
	req := sc.m.s.Receiver.Detector.PdRequired
	alone := fmt.Sprintf("%s with noise alone", PdText(v.pdNoise))
	if !self && tr.PdAlone != nil && *tr.PdAlone >= req {
		alone = fmt.Sprintf("%s alone", PdText(*tr.PdAlone))
	}
	if !v.sceneOK {
		// The raised threshold is beyond the series; its peak is under it.
		return fmt.Sprintf(" In the scene its Pd is too small for the series to reach (the threshold is raised that far), against %s; %g is required.", alone, req)
	}
	return fmt.Sprintf(" Its Pd is %s in the scene, against %s; %g is required.", PdText(v.pdScene), alone, req)
}

// whichPulse names the transmit pulse that eclipses a point target.
func (sc *scene) whichPulse(g *tgt) string {
	if g.apparent < C*sc.m.tau/2 {
		return "the pulse"
	}
	return "the next pulse"
}

// lossWords returns the sentences naming a target's stated physical
// losses (eclipsing, receiver band), or "".
func (sc *scene) lossWords(g *tgt) string {
	out := ""
	if l, ok := g.eclipseLossDB(sc.m.processed); ok {
		out += fmt.Sprintf(" Eclipsing costs %.1f dB: %.0f %% of its echo is heard, the rest arrives while %s is transmitted.", l, 100*g.received, sc.whichPulse(g))
	}
	if g.outOfBand && !g.rejected && g.t.Kind == TargetPoint {
		out += fmt.Sprintf(" Its Doppler shift of %s lies outside the receiver's band of ±%s: %.1f dB of its echo's energy is rejected.", hz(g.fd), hz(sc.m.fs/2), g.bandLossDB)
	}
	return out + sc.frontWords(g) + sc.m.rainWords(g) + sc.m.gasWords(g) + sc.m.multipathWords(g)
}

// resolution returns the mainlobe half-width between nulls as a range, m:
// targets closer than this are not resolved.
func (m *model) resolution() float64 {
	return C / (2 * m.s.Waveform.Bandwidth())
}

// suggestionBudget bounds the extra evaluations spent verifying changes,
// so a large scene stays interactive.
func suggestionBudget(m *model) int {
	work := m.n + len(m.s.Targets)*(len(m.pulse)+2*len(m.ref))
	switch {
	case work > 1<<19:
		return 0
	case work > 1<<16:
		return 2
	}
	return 5
}

// candidate is one change to try for a target that is not detected.
type candidate struct {
	text  string
	apply func(s *Scenario) bool // false when it does not apply
}

// suggestFix tries a few changes a radar engineer would try first and
// returns a sentence naming the first that makes target j detected, with
// its margin; "" when none does within the budget.
func suggestFix(ctx context.Context, base *model, j int, v verdict, budget *int) string {
	s := base.s
	for _, c := range candidates(s, j, v) {
		if *budget <= 0 || ctx.Err() != nil {
			return ""
		}
		t := s.clone()
		if !c.apply(t) || t.Validate() != nil {
			continue
		}
		*budget--
		m, err := newModel(t, base)
		if err != nil {
			continue
		}
		sc, err := newSceneFor(ctx, m, j)
		if err != nil {
			return ""
		}
		if w := sc.judge(j, m.detector()); w.status == StatusDetected {
			if w.rule == rulePd && w.sceneOK {
				return fmt.Sprintf("%s would detect it with Pd %s.", c.text, PdText(w.pdScene))
			}
			return fmt.Sprintf("%s would detect it with %.1f dB margin over the threshold.", c.text, *w.margin())
		}
	}
	return ""
}

func (s *Scenario) clone() *Scenario {
	t := *s
	t.Targets = append([]Target(nil), s.Targets...)
	t.Radar.Schedule = s.Radar.Schedule.clone()
	t.Radar.PRIStaggerS = slices.Clone(s.Radar.PRIStaggerS)
	t.Radar.Scan = s.Radar.Scan.clone()
	t.Waveform.PhasesDeg = append([]float64(nil), s.Waveform.PhasesDeg...)
	if s.Waveform.PhasesDeg == nil {
		t.Waveform.PhasesDeg = nil
	}
	return &t
}

func candidates(s *Scenario, j int, v verdict) []candidate {
	w := s.Waveform
	fm := w.Kind == KindLFM || w.Kind == KindNLFM || w.Kind == KindRect
	scale := func(k float64) func(*Scenario) bool {
		return func(t *Scenario) bool {
			if fm {
				t.Waveform.PulseWidthS *= k
				if t.Waveform.Kind == KindRect {
					t.Radar.SampleRateHz /= k
				}
			} else {
				t.Waveform.ChipS *= k
				t.Radar.SampleRateHz /= k
			}
			return true
		}
	}
	longer := func(k float64) string {
		if fm {
			return fmt.Sprintf("A %g× longer pulse (%s)", k, sec(w.PulseWidth()*k))
		}
		return fmt.Sprintf("A %g× longer chip (%s, pulse %s)", k, sec(w.ChipS*k), sec(w.PulseWidth()*k))
	}
	window := func(win Window) func(*Scenario) bool {
		return func(t *Scenario) bool {
			if t.Receiver.Filter != FilterMatched || t.Receiver.Window == win {
				return false
			}
			t.Receiver.Window = win
			return true
		}
	}
	switch v.status {
	case StatusEclipsed:
		return []candidate{
			{fmt.Sprintf("A pulse half as long (%s, blind range %s)", sec(w.PulseWidth()/2), km(C*w.PulseWidth()/4)), scale(0.5)},
			{fmt.Sprintf("A pulse a quarter as long (%s, blind range %s)", sec(w.PulseWidth()/4), km(C*w.PulseWidth()/8)), scale(0.25)},
		}
	case StatusTooWeak:
		c := []candidate{{longer(2), scale(2)}, {longer(4), scale(4)}, {longer(8), scale(8)}}
		if w.IsPhaseCode() || w.Kind == KindCostas {
			// A Doppler-tolerant pulse of the same length and band.
			c = append([]candidate{{fmt.Sprintf("An LFM of the same length and bandwidth (%s, %s), which tolerates Doppler,", sec(w.PulseWidth()), hz(w.Bandwidth())), func(t *Scenario) bool {
				t.Waveform = Waveform{Kind: KindLFM, PulseWidthS: w.PulseWidth(), BandwidthHz: w.Bandwidth(), Sweep: "up"}
				t.Receiver.Filter = FilterMatched
				return true
			}}}, c...)
		}
		return c
	}
	c := []candidate{
		{"A Taylor window (−35 dB, n̄ 5)", window(Window{Kind: WindowTaylor, SidelobeDB: -35, NBar: 5})},
		{"A Taylor window (−45 dB, n̄ 8)", window(Window{Kind: WindowTaylor, SidelobeDB: -45, NBar: 8})},
		{"A 4-term Blackman–Harris window", window(Window{Kind: WindowBlackmanHarris})},
	}
	if w.IsPhaseCode() && s.Receiver.Filter == FilterMatched {
		mismatched := func(kind string) func(*Scenario) bool {
			return func(t *Scenario) bool {
				t.Receiver.Filter = kind
				t.Receiver.FilterLengthFactor = 3
				t.Receiver.Window = Window{Kind: WindowNone}
				return true
			}
		}
		c = append([]candidate{
			{"A least-squares mismatched filter (3× the code length)", mismatched(FilterLeastSquares)},
			{"A minimax mismatched filter (3× the code length)", mismatched(FilterMinimax)},
		}, c...)
	}
	if w.Kind == KindLFM || w.Kind == KindNLFM {
		c = append(c, candidate{fmt.Sprintf("Twice the bandwidth (%s)", hz(2*w.BandwidthHz)), func(t *Scenario) bool {
			t.Waveform.BandwidthHz *= 2
			t.Radar.SampleRateHz *= 2
			return true
		}})
	}
	if v.byCell {
		return c
	}
	// Masked through the CFAR: when the culprit is distributed, change
	// the detector first; when it is a point target, its sidelobes fill
	// the training cells, so lower them first.
	d := s.Receiver.Detector
	cf := []candidate{
		{"An OS-CFAR detector (same cells, rank ¾)", func(t *Scenario) bool {
			if d.Kind != DetectorCA {
				return false
			}
			t.Receiver.Detector = Detector{Kind: DetectorOS, PFA: d.PFA, PdRequired: d.PdRequired, GuardCells: d.GuardCells, TrainingCells: d.TrainingCells, Rank: (3*d.TrainingCells + 3) / 4}
			return true
		}},
		fewerCells(d, 2), fewerCells(d, 4),
	}
	if v.culprit >= 0 && s.Targets[v.culprit].Kind != TargetPoint {
		if edge := clutterEdge(s.Targets[j], s.Targets[v.culprit]); edge != "" {
			// A target in front of (or behind) a clutter edge: the
			// smallest-of CFAR averages only the half away from the
			// clutter (Hansen & Sawyers 1980; Weiss 1982). It trains on
			// independent cells, so it may need a wider window to keep
			// enough of them.
			cf = append([]candidate{smallestOf(d, 1, edge), smallestOf(d, 2, edge), smallestOf(d, 4, edge), smallestOf(d, 8, edge), smallestOf(d, 16, edge)}, cf...)
		}
		return append(cf, c...)
	}
	return append(c, cf...)
}

// clutterEdge returns which side of point target t the distributed
// culprit u lies wholly on ("behind" it, farther in range, or "in front
// of" it), or "" when t is inside it or t is itself distributed.
func clutterEdge(t, u Target) string {
	if t.Kind != TargetPoint {
		return ""
	}
	switch {
	case u.RangeStartM > t.RangeM:
		return "behind"
	case u.RangeStopM < t.RangeM:
		return "in front of"
	}
	return ""
}

// smallestOf returns the candidate of an SO-CFAR with k times the training
// cells (at most 512), the textbook detector for a target beside a
// clutter edge.
func smallestOf(d Detector, k int, edge string) candidate {
	n := min(d.TrainingCells*k, 512)
	n -= n % 2
	return candidate{fmt.Sprintf("An SO-CFAR detector with %d training cells (it averages only the half of them away from the clutter %s the target)", n, edge), func(t *Scenario) bool {
		if d.Kind == DetectorSO && n == d.TrainingCells || d.Kind == DetectorFixed {
			return false
		}
		t.Receiver.Detector = Detector{Kind: DetectorSO, PFA: d.PFA, PdRequired: d.PdRequired, GuardCells: d.GuardCells, TrainingCells: n,
			DopplerGuardCells: d.DopplerGuardCells, DopplerTrainingCells: d.DopplerTrainingCells}
		return true
	}}
}

// fewerCells returns the candidate of a CFAR with 1/k of the training
// cells, so that fewer of them reach an extended return.
func fewerCells(d Detector, k int) candidate {
	n := d.TrainingCells / k
	n -= n % 2
	return candidate{fmt.Sprintf("%d training cells instead of %d", n, d.TrainingCells), func(t *Scenario) bool {
		if n < 2 {
			return false
		}
		t.Receiver.Detector.TrainingCells = n
		if t.Receiver.Detector.Kind == DetectorOS {
			t.Receiver.Detector.Rank = (3*n + 3) / 4
		}
		return true
	}}
}
