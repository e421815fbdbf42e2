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
	byCell     bool    // masked by power at its very cell (sidelobe or mainlobe) rather than through the CFAR
}

// margin returns the peak over the threshold in dB, or nil when the target
// has no peak in the window.
func (v *verdict) margin() *float64 {
	if v.peakK < 0 || v.peak <= 0 || v.status == StatusEclipsed || v.status == StatusOutOfWindow && v.threshold == 0 {
		return nil
	}
	m := dsp.DB(v.peak / v.threshold)
	if math.IsInf(m, 0) || math.IsNaN(m) {
		return nil // no finite threshold (a detector without training cells): no margin to state
	}
	return &m
}

// detector returns the CFAR plan of the scenario, or nil for a fixed
// threshold.
func (m *model) detector() *dsp.CFAR {
	d := m.s.Receiver.Detector
	switch d.Kind {
	case DetectorCA:
		return &dsp.CFAR{PFA: d.PFA, Guard: d.GuardCells, Train: d.TrainingCells}
	case DetectorOS:
		return &dsp.CFAR{PFA: d.PFA, Guard: d.GuardCells, Train: d.TrainingCells, Rank: d.Rank}
	}
	return nil
}

// level returns the detector's threshold at window sample k when the
// training cells hold 1 (noise) plus extra(i) at sample i.
func (sc *scene) level(cf *dsp.CFAR, k int, extra func(i int) float64) float64 {
	if cf == nil {
		return dsp.FixedMultiplier(sc.m.s.Receiver.Detector.PFA)
	}
	lo1, _, _, hi2 := cf.TrainingCells(k, sc.m.n)
	loc := make([]float64, hi2-lo1)
	for i := range loc {
		loc[i] = 1 + extra(lo1+i)
	}
	return cf.Level(loc, k-lo1)
}

// judge decides the status of target j on the noise-free scene, as the
// report format defines it.
func (sc *scene) judge(j int, cf *dsp.CFAR) verdict {
	g := sc.targets[j]
	v := verdict{culprit: -1}
	v.peakK, v.peak = g.resp.peak()
	others := func(i int) float64 { return math.Max(sc.total[i]-g.resp.at(i), 0) }
	if v.peakK >= 0 {
		v.noiseLevel = sc.level(cf, v.peakK, func(int) float64 { return 0 })
		v.sceneLevel = sc.level(cf, v.peakK, others)
		v.cell = others(v.peakK)
		v.threshold = math.Max(v.sceneLevel, v.cell)
	}
	if sc.decide(g, &v) == StatusMasked {
		v.culprit = sc.culprit(j, v, cf)
	}
	return v
}

// decide sets the status of a verdict whose peak and thresholds are
// measured, as the report format orders the cases, and returns it.
func (sc *scene) decide(g *tgt, v *verdict) string {
	switch {
	case sc.outOfWindow(g):
		v.status = StatusOutOfWindow
	case sc.inBlind(g):
		v.status = StatusEclipsed
	case v.peakK < 0 || v.peak <= 0:
		v.status = StatusOutOfWindow
	case v.peak >= v.threshold:
		v.status = StatusDetected
	case v.peak < v.noiseLevel:
		v.status = StatusBelowNoise
	default:
		v.status = StatusMasked
		v.byCell = v.cell >= v.sceneLevel
	}
	return v.status
}

// outOfWindow reports whether a target's echo folds from beyond the
// unambiguous range or peaks outside the receive window.
func (sc *scene) outOfWindow(g *tgt) bool {
	r := sc.m.s.Radar
	if g.t.Kind == TargetPoint {
		return g.folds > 0 || g.apparent < r.WindowStartM || g.apparent > r.WindowStopM
	}
	return g.t.RangeStartM >= sc.m.unambM || g.t.RangeStopM < r.WindowStartM || g.t.RangeStartM > r.WindowStopM
}

// inBlind reports whether a target lies in the blind range c·τ/2, where
// range gates are not processed because the receiver is blanked while the
// pulse is transmitted: a point target's range, or the whole extent of a
// distributed one.
func (sc *scene) inBlind(g *tgt) bool {
	blind := C * sc.m.tau / 2
	if g.t.Kind == TargetPoint {
		return g.apparent < blind
	}
	return g.t.RangeStopM <= blind
}

// culprit returns the index of the target that contributes most to what
// masks target j: the power at its peak cell, or in its training cells.
func (sc *scene) culprit(j int, v verdict, cf *dsp.CFAR) int {
	best, bi := 0.0, -1
	for i, g := range sc.targets {
		if i == j {
			continue
		}
		var c float64
		if v.byCell || cf == nil {
			c = g.resp.at(v.peakK)
		} else {
			lo1, hi1, lo2, hi2 := cf.TrainingCells(v.peakK, sc.m.n)
			for k := lo1; k < hi1; k++ {
				c += g.resp.at(k)
			}
			for k := lo2; k < hi2; k++ {
				c += g.resp.at(k)
			}
		}
		if c > best {
			best, bi = c, i
		}
	}
	return bi
}
