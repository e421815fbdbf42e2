package scenarios

import (
	"fmt"
	"math"

	"github.com/pulsewright/pulsewright/dsp"
)

// StatusBelowHorizon is the status of a point target hidden by the
// Earth's curvature: beyond the radar horizon of the antenna's height
// and its own (docs/detection.md §11).
const StatusBelowHorizon = "below_horizon"

// earthRadius43 is the radius of the 4/3 Earth, m: standard atmospheric
// refraction bends rays as if the Earth's radius (6371 km, mean) were 4/3
// larger (common practice; the 4/3-Earth model of radar texts, e.g.
// Skolnik, Introduction to Radar Systems, from memory).
const earthRadius43 = 4.0 / 3.0 * 6371e3

// maxHeightM bounds radar.antenna_height_m and a target's height_m, m.
const maxHeightM = 1e5

// horizon returns the radar horizon for a point target (m) and whether
// it applies (radar.antenna_height_m given).
func (m *model) horizon(t Target) (float64, bool) {
	h := m.s.Radar.AntennaHeightM
	if h <= 0 || t.Kind != TargetPoint {
		return 0, false
	}
	return dsp.RadarHorizon(h, t.HeightM, earthRadius43), true
}

// beyondHorizon reports whether a point target lies beyond the horizon.
func (m *model) beyondHorizon(t Target) bool {
	d, ok := m.horizon(t)
	return ok && t.RangeM > d
}

func (sc *scene) horizonReason(g *tgt) string {
	m := sc.m
	d, _ := m.horizon(g.t)
	return fmt.Sprintf("Below the radar horizon: at %s it lies beyond the %s horizon of an antenna %.0f m high and a target %.0f m high (4/3 Earth, √(2·a_e·h₁) + √(2·a_e·h₂)), so the Earth's curvature hides it and no echo returns.",
		km(g.t.RangeM), km(d), m.s.Radar.AntennaHeightM, math.Max(g.t.HeightM, 0))
}
