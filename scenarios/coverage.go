package scenarios

import (
	"context"
	"fmt"
	"math"

	"github.com/pulsewright/pulsewright/dsp"
)

// Pd curves of one target (docs/detection-probability.md §9): Pd against
// the SNR its test sees, for the scene's detector and the target's
// fluctuation and integration, and Pd against range, the target moved
// through the receive window with its RCS kept.

// MaxCurvePoints bounds the points of a Pd curve.
const MaxCurvePoints = 2000

// maxCurveRangeM is the largest range of a curve: a target's largest.
const maxCurveRangeM = 1e8

// SNRPoint is one point of Pd against SNR.
type SNRPoint struct {
	SNRDB float64 `json:"snr_db"`
	Pd    float64 `json:"pd"`
}

// RangePoint is the target moved to RangeM: the status, tested SNR, Pd in
// the scene and Pd alone the evaluation gives there. Figures that do not
// apply (outside the window, no Pd series) are left out.
type RangePoint struct {
	RangeM  float64  `json:"range_m"`
	Status  string   `json:"status"`
	SNRDB   *float64 `json:"snr_db,omitempty"` // the SNR its test sees at its cell, dB
	Pd      *float64 `json:"pd,omitempty"`
	PdAlone *float64 `json:"pd_alone,omitempty"`
}

// Coverage holds the Pd curves of one target.
type Coverage struct {
	Scenario   string   `json:"scenario"`
	Target     string   `json:"target"`
	RangeM     float64  `json:"range_m"`          // its range in the scenario
	SNRDB      *float64 `json:"snr_db,omitempty"` // the SNR its test sees there, dB
	Pd         *float64 `json:"pd,omitempty"`
	PdAlone    *float64 `json:"pd_alone,omitempty"`
	Pfa        float64  `json:"pfa"`
	PdRequired float64  `json:"pd_required"`
	// SNRRequiredDB is the SNR its test needs for pd_required against
	// noise alone.
	SNRRequiredDB *float64 `json:"snr_required_db,omitempty"`
	// DetectionRangeM is the range at which its SNR falls to
	// snr_required_db by the R⁴ law from its present range and SNR
	// (report field detection_range_m).
	DetectionRangeM *float64 `json:"detection_range_m,omitempty"`
	// CoverageM is the farthest range of the range curve at which pd_alone
	// falls through pd_required (interpolated between points); left out
	// when it does not fall through it inside the curve's span.
	CoverageM *float64     `json:"coverage_m,omitempty"`
	BySNR     []SNRPoint   `json:"by_snr,omitempty"`
	ByRange   []RangePoint `json:"by_range"`
}

// DetectionRange returns the range (m) at which a target at rangeM whose
// test sees snrDB reaches requiredDB by the R⁴ law (radar equation,
// every other factor kept): rangeM·10^((snrDB − requiredDB)/40). With
// 17.02 dB at 5 km and the 13.18 dB a steady target needs for Pd 0.9 at
// Pfa 1e-6 it is 6.24 km.
func DetectionRange(rangeM, snrDB, requiredDB float64) float64 {
	return rangeM * math.Pow(10, (snrDB-requiredDB)/40)
}

// detectionRangeOf sets out.DetectionRangeM of a point target with
// verdict v whose report has snr_required_db. An eclipsed echo is taken
// at its unblanked peak: the eclipsing loss holds only at this range
// (it vanishes beyond the blind range), so carrying it along the R⁴ law
// would give a range where the target is neither eclipsed that much nor
// seen (the long-pulse demo's drone: 3.1 km with its 46 dB loss kept).
func detectionRangeOf(g *tgt, v verdict, out *TargetReport) {
	peak := max(v.peak, v.unblanked)
	if g.t.Kind != TargetPoint || out.SNRRequiredDB == nil || !(peak > 0) || !(g.t.RangeM > 0) {
		return
	}
	if dr := DetectionRange(g.t.RangeM, dsp.DB(peak), *out.SNRRequiredDB); dr > 0 && !math.IsInf(dr, 0) && !math.IsNaN(dr) {
		out.DetectionRangeM = &dr
	}
}

// CoverageOf computes the Pd curves of target id of s (valid): Pd against
// SNR from snr_required_db − 15 dB to + 15 dB (at least covering its own
// SNR) in 0.25 dB steps, and Pd against range at about points ranges from
// fromM to toM (0, 0: the receive window). The ranges lie a whole number
// of range gates from the target's own, so every point sees the same
// range straddle and the curve shows the R⁴ law with the losses that
// change with range (eclipsing, the window's edges, the rest of the
// scene).
func CoverageOf(ctx context.Context, s *Scenario, id string, fromM, toM float64, points int) (*Coverage, error) {
	j := -1
	var ids []string
	for i, t := range s.Targets {
		ids = append(ids, t.ID)
		if t.ID == id {
			j = i
		}
	}
	if j < 0 {
		return nil, fmt.Errorf("target %q is not in the scenario (targets: %v): %w", id, ids, ErrInvalid)
	}
	if s.Targets[j].Kind != TargetPoint {
		return nil, fmt.Errorf("target %q is %s: Pd curves are for point targets: %w", id, s.Targets[j].Kind, ErrInvalid)
	}
	if points < 2 || points > MaxCurvePoints {
		return nil, fmt.Errorf("points %d: want 2 … %d: %w", points, MaxCurvePoints, ErrInvalid)
	}
	r := s.Radar
	window := fromM == 0 && toM == 0
	if window {
		fromM, toM = r.WindowStartM, r.WindowStopM
	}
	// A window may open at 0 m (the long-pulse demo's); the curve then
	// starts at its first range above 0 (points at or below 0 are left out
	// below). Ranges the user gives must be above 0.
	if !(fromM > 0 || window && fromM == 0) || !(toM > fromM) || math.IsInf(toM, 1) || toM > maxCurveRangeM {
		return nil, fmt.Errorf("ranges %g … %g m: want 0 < from < to ≤ %g m: %w", fromM, toM, maxCurveRangeM, ErrInvalid)
	}
	m, err := newModel(s, nil)
	if err != nil {
		return nil, err
	}
	sc, err := newScene(ctx, m)
	if err != nil {
		return nil, err
	}
	reps := sc.targetReports(ctx, m, false)
	if err := ctx.Err(); err != nil {
		return nil, err
	}
	d := s.Receiver.Detector
	c := &Coverage{Scenario: s.Name, Target: id, RangeM: s.Targets[j].RangeM, Pd: reps[j].Pd, PdAlone: reps[j].PdAlone,
		Pfa: d.PFA, PdRequired: d.PdRequired, SNRRequiredDB: reps[j].SNRRequiredDB, ByRange: []RangePoint{}}
	if t, ok := m.curveTest(sc, j); ok {
		own := dsp.DB(t.snr)
		c.SNRDB = &own
		if c.SNRRequiredDB != nil {
			req := *c.SNRRequiredDB
			c.DetectionRangeM = reps[j].DetectionRangeM // one definition: detectionRangeOf
			lo, hi := math.Floor(min(req-15, own-3)), math.Ceil(max(req+15, own+3))
			for x := lo; x <= hi+1e-9; x += 0.25 {
				t.snr = dsp.FromDB(x)
				if p, ok := t.pd(1); ok && p >= 0 && p <= 1 {
					c.BySNR = append(c.BySNR, SNRPoint{SNRDB: x, Pd: p})
				}
			}
		}
	}
	// Ranges a whole number of gates from the target's own.
	gate := C / (2 * m.fs)
	step := math.Max(math.Ceil((toM-fromM)/float64(points-1)/gate), 1) * gate
	r0 := c.RangeM
	k0, k1 := math.Ceil((fromM-r0)/step), math.Floor((toM-r0)/step)
	prev := m
	for k := k0; k <= k1; k++ {
		if err := ctx.Err(); err != nil {
			return nil, err
		}
		rk := r0 + k*step
		if rk <= 0 {
			continue
		}
		p, mk, err := rangePoint(ctx, s, j, rk, prev)
		if err != nil {
			return nil, err
		}
		prev = mk
		c.ByRange = append(c.ByRange, p)
	}
	c.CoverageM = crossing(c.ByRange, c.PdRequired)
	return c, nil
}

// curveTest returns the Pd test of target j at its cell in sc, noise
// alone.
func (m *model) curveTest(sc *scene, j int) (pdTest, bool) {
	if sc.train != nil {
		v, _ := sc.train.judge(j, sc.train.cfar())
		return m.pdTestFor(sc.targets[j], v, true)
	}
	return m.pdTestFor(sc.targets[j], sc.judge(j, m.detector()), false)
}

// rangePoint evaluates s with target j moved to rangeM. Single pulses
// compute only what judging it needs (newSceneFor); pulse trains the
// whole scene.
func rangePoint(ctx context.Context, s *Scenario, j int, rangeM float64, prev *model) (RangePoint, *model, error) {
	t := s.clone()
	t.Targets[j].RangeM = rangeM
	m, err := newModel(t, prev)
	if err != nil {
		return RangePoint{}, nil, err
	}
	focus := j
	if t.CoherentTrain() {
		focus = -1
	}
	sc, err := newSceneFor(ctx, m, focus)
	if err != nil {
		return RangePoint{}, nil, err
	}
	rep := sc.targetReports(ctx, m, false)[j]
	p := RangePoint{RangeM: rangeM, Status: rep.Status, Pd: rep.Pd, PdAlone: rep.PdAlone}
	if ts, ok := m.curveTest(sc, j); ok && ts.snr > 0 {
		db := dsp.DB(ts.snr)
		p.SNRDB = &db
	}
	return p, m, nil
}

// crossing returns the farthest range at which pd_alone falls from at
// least req to below it between neighbouring points (linear in range).
func crossing(pts []RangePoint, req float64) *float64 {
	for i := len(pts) - 2; i >= 0; i-- {
		a, b := pts[i], pts[i+1]
		if a.PdAlone == nil || b.PdAlone == nil {
			continue
		}
		pa, pb := *a.PdAlone, *b.PdAlone
		if pa >= req && pb < req {
			x := a.RangeM + (b.RangeM-a.RangeM)*(pa-req)/(pa-pb)
			return &x
		}
	}
	return nil
}
