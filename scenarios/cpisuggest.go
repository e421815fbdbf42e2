package scenarios

import (
	"context"
	"fmt"
	"math"

	"github.com/pulsewright/pulsewright/dsp"
)

// Suggestions of a PRF change or an extra CPI for a target that one PRI
// loses: at a blind speed, folded from beyond the unambiguous range, or
// eclipsed by a later transmit pulse. Each is verified by evaluating the
// changed scenario, as suggestFix verifies its changes.

// scheduleBudget bounds the changed scenarios evaluated per report for
// these suggestions: each costs a scene per CPI.
func scheduleBudget(m *model) int {
	if m.s.Radar.Schedule != nil || m.s.NonCoherent() || m.n*m.s.Radar.Pulses > 1<<21 || len(m.s.Targets) > 16 {
		return 0
	}
	return 4
}

// scheduleCause says why one PRI loses target j ("" when it is not a
// matter of the PRI): "blind" (its Doppler folds onto zero), "folded"
// (its echo comes from beyond the unambiguous range) or "eclipsed" (its
// echo arrives under a later transmit pulse).
func (sc *scene) scheduleCause(j int, tr *TargetReport) string {
	g := sc.targets[j]
	if g.t.Kind != TargetPoint || tr.Status == StatusDetected {
		return ""
	}
	switch {
	case tr.BlindSpeed != nil && *tr.BlindSpeed:
		return "blind"
	case g.folds > 0 && tr.Status != StatusEclipsed:
		return "folded" // a status of its own or out of the window, by format version
	case tr.Status == StatusEclipsed && g.rangeM > C*sc.m.tau/2:
		return "eclipsed"
	}
	return ""
}

// niceSeconds rounds a PRI to three significant digits.
func niceSeconds(v float64) float64 {
	e := math.Pow(10, math.Floor(math.Log10(v))-2)
	return math.Round(v/e) * e
}

// suggestSchedule returns a verified sentence proposing an extra CPI or a
// PRF change that recovers target j, or "".
func suggestSchedule(ctx context.Context, base *model, sc *scene, j int, cause string, budget *int) string {
	s := base.s
	g := sc.targets[j]
	pri, pulses := s.Radar.PRIS, s.Radar.Pulses
	tau := base.tau
	defaultStop := s.Radar.WindowStopM == C*pri/2
	// PRIs to try: near the present one, where the target's Doppler or
	// range folds differently. A blind target needs its Doppler at least
	// two bins from a multiple of the new PRF.
	var tries []float64
	for _, f := range []float64{1.1, 0.9, 1.2, 0.8, 1.3, 0.7} {
		p := niceSeconds(pri * f)
		if p <= 2*tau || p > 1 {
			continue
		}
		if cause == "blind" && math.Abs(dsp.Fold(g.fd*p)) < 2/float64(max(pulses, 1)) {
			continue
		}
		tries = append(tries, p)
	}
	for _, p := range tries {
		if *budget <= 0 || ctx.Err() != nil {
			return ""
		}
		// An extra CPI: one of two for a blind or eclipsed target, both
		// for a folded one (its range is unfolded from the two).
		t := s.clone()
		m := 1
		if cause == "folded" {
			m = 2
		}
		t.Radar.Schedule = &Schedule{CPIs: []CPI{{PRIS: p, Pulses: pulses}}, M: m}
		if t.Validate() != nil {
			continue
		}
		*budget--
		rep, err := evalSchedule(ctx, t, base)
		if err != nil {
			return ""
		}
		st := rep.Targets[j]
		if !st.Detected {
			continue
		}
		add := fmt.Sprintf("Adding a second CPI at PRI %s (%s), detecting %d-of-2, would detect it", sec(p), plural(pulses, "pulse"), m)
		if st.Pd != nil {
			add += " (Pd " + PdText(*st.Pd) + ")"
		}
		switch cause {
		case "folded":
			gate := C / (2 * base.fs)
			if !st.RangeResolved || math.Abs(*st.RangeM-g.rangeM) > gate+math.Abs(g.t.RangeRateMPS)+base.resolution() {
				continue
			}
			return fmt.Sprintf("%s and unfold its range: %s (CPI 1) and %s (CPI 2) resolve to %s, within a combined unambiguous range of %s.",
				add, km(*rep.CPIs[0].Targets[j].ApparentRangeM), km(*rep.CPIs[1].Targets[j].ApparentRangeM), km(*st.RangeM), km(*rep.UnambiguousRangeM))
		case "blind":
			v := rep.CPIs[1].Targets[j].ApparentRangeRateMPS
			if v != nil {
				return fmt.Sprintf("%s: there its Doppler folds to %.1f m/s, clear of zero.", add, *v)
			}
		}
		return add + "."
	}
	// A PRF change alone: a PRI long enough to hold the folded target, or
	// one of the PRIs above for a blind or eclipsed one. A staggered CPI
	// keeps its pattern: no single PRI replaces it here.
	if s.Radar.Staggered() {
		return ""
	}
	if cause == "folded" {
		p := niceSeconds(1.05 * 2 * g.rangeM / C)
		tries = []float64{p}
	}
	for _, p := range tries {
		if *budget <= 0 || ctx.Err() != nil {
			return ""
		}
		t := s.clone()
		t.Radar.PRIS = p
		if defaultStop {
			t.Radar.WindowStopM = C * p / 2
		}
		if t.Validate() != nil {
			continue
		}
		*budget--
		m, err := newModel(t, base)
		if err != nil {
			continue
		}
		tsc, err := newScene(ctx, m)
		if err != nil {
			return ""
		}
		var v verdict
		if tsc.train != nil {
			v, _ = tsc.train.judge(j, tsc.train.cfar())
		} else {
			v = tsc.judge(j, m.detector())
		}
		if v.status == StatusDetected && v.margin() != nil {
			return fmt.Sprintf("A PRI of %s instead of %s (unambiguous range %s, blind speed %.1f m/s) would detect it with %.1f dB margin.",
				sec(p), sec(pri), km(C*p/2), dsp.BlindSpeed(p, base.lambda), *v.margin())
		}
	}
	return ""
}

// plural returns "1 pulse", "32 pulses".
func plural(n int, word string) string {
	if n == 1 {
		return "1 " + word
	}
	return fmt.Sprintf("%d %ss", n, word)
}
