package scenarios

import (
	"math"

	"github.com/pulsewright/pulsewright/dsp"
)

// Echoes sharing a target's tested cell (docs/detection-probability.md
// §7). Where the rest of the scene puts power into the target's cell
// below the threshold the detector sets there, that power is not a floor
// the target must clear: it adds to the target's echo, with a carrier
// phase that changes from look to look (a range change of half a
// wavelength turns it through 2π). The report's Pd is the probability
// that the cell crosses the threshold with every echo's phase uniform and
// independent (dsp.PdInCell); the Monte Carlo trials with --random-phase
// draw exactly that, and the trials without it see the one phase that the
// scene's ranges give.

// echoLaw returns the law of an echo's amplitude in a cell for
// dsp.PdInCell: a point target's fluctuation; a distributed return
// (extended, volume, clutter) is the sum of many scatterers, complex
// Gaussian (Swerling 1).
func echoLaw(g *tgt) int {
	if g.t.Kind != TargetPoint {
		return dsp.Swerling1
	}
	return swerling(g.t.Fluctuation)
}

// extraLaw returns the law of an impairment's power in a cell: a DC
// offset and an I/Q image are deterministic copies (steady phasors); a
// phase-noise skirt and quantisation noise are noise-like (Gaussian).
func extraLaw(e *extra) int {
	switch e.cause {
	case causeDC, causeImage:
		return dsp.SwerlingNone
	}
	return dsp.Swerling1
}

// cellEchoes lists what the rest of the scene puts into target j's tested
// cell: each other target's power there (target(i)), each other owner's
// impairment (extra(i)), and whatever else the cell holds (total − the
// parts, e.g. clutter) as a Gaussian.
func (sc *scene) cellEchoes(j int, total float64, target func(i int) float64, extraAt func(i int) float64) []dsp.CellEcho {
	var out []dsp.CellEcho
	sum := 0.0
	for i, g := range sc.targets {
		if i == j {
			continue
		}
		if p := target(i); p > 0 {
			out = append(out, dsp.CellEcho{Power: p, Swerling: echoLaw(g)})
			sum += p
		}
	}
	for i := range sc.extras {
		e := &sc.extras[i]
		if e.owner == j {
			continue
		}
		if p := extraAt(i); p > 0 {
			out = append(out, dsp.CellEcho{Power: p, Swerling: extraLaw(e)})
			sum += p
		}
	}
	if rest := total - sum; rest > 1e-9*total && rest > 0 {
		out = append(out, dsp.CellEcho{Power: rest, Swerling: dsp.Swerling1})
	}
	return out
}

// pdInCell returns the Pd of test t whose cell also holds the echoes
// others, against r times the detector's nominal threshold (the CFAR's
// raise by the scene's power in its training cells).
func (t pdTest) pdInCell(others []dsp.CellEcho, r float64) (float64, bool) {
	echoes := make([]dsp.CellEcho, 0, len(others)+1)
	echoes = append(echoes, dsp.CellEcho{Power: t.snr, Swerling: t.det.Swerling})
	echoes = append(echoes, others...)
	steady := t
	steady.det.Swerling = dsp.SwerlingNone
	steady.chi4, steady.chi4w = nil, nil // the target's own law is in echoes (one-pulse Swerling 4 on a map: an approximation)
	// The table's points go through the memo (pdmemo.go): a few to a
	// few hundred per call, most of them the same in the next frame of
	// a drag that moves another target.
	p, err := dsp.PdInCellInterp(echoes, func(x, s float64) (float64, bool) {
		return steady.withSNR(x).pd(r * s)
	})
	if err != nil {
		return 0, false
	}
	return p, true
}

// inCellApplies reports whether the rest of the scene's power in the
// target's cell is below the detector's level there (so it adds to the
// target's echo rather than deciding the cell by itself).
func (v *verdict) inCellApplies() bool {
	return len(v.inCell) > 0 && v.cell > 0 && v.cell < v.sceneLevel && !math.IsInf(v.sceneLevel, 1)
}
