package scenarios

import (
	"fmt"
	"math"

	"github.com/pulsewright/pulsewright/dsp"
)

// StatusBelowHorizon is the status of a point target hidden by the
// Earth's curvature: beyond the radar horizon of the antenna's height
// and its own (docs/detection.md §13).
const StatusBelowHorizon = "below_horizon"

// maxHeightM bounds a target's height_m, m (as MaxAntennaHeightM the
// antenna's).
const maxHeightM = MaxAntennaHeightM

// horizon returns the radar horizon for a point target (m) and whether
// it applies (radar.antenna_height_m given).
func (m *model) horizon(t Target) (float64, bool) {
	h := m.s.Radar.AntennaHeightM
	if h <= 0 || t.Kind != TargetPoint {
		return 0, false
	}
	return dsp.RadarHorizon(h, t.HeightM, dsp.EffectiveEarthRadius), true
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

// Propagation is the path between the radar and the scene (added in
// format version 2, optional): rain over a stretch of range. Without it
// the path is free space. Docs: docs/scenario-format.md "propagation",
// docs/detection.md §13.
type Propagation struct {
	RainRateMMH      float64 `json:"rain_rate_mm_h,omitempty"`    // mm/h; 0: no rain
	RainStartM       float64 `json:"rain_start_m,omitempty"`      // m, near edge of the rain (default 0)
	RainStopM        float64 `json:"rain_stop_m,omitempty"`       // m, far edge (default: unbounded)
	RainPolarisation string  `json:"rain_polarisation,omitempty"` // horizontal (default) or vertical
	Multipath        string  `json:"multipath,omitempty"`         // none (default) or flat_sea
	// Gaseous attenuation (gas.go): none (default) or itu_p676, and the
	// air it is computed for.
	Gas             string  `json:"gas,omitempty"`
	AirTemperatureC float64 `json:"air_temperature_c,omitempty"` // °C (default 15)
	AirPressureHPa  float64 `json:"air_pressure_hpa,omitempty"`  // hPa, total (default 1013.25)
	WaterVapourGM3  float64 `json:"water_vapour_g_m3,omitempty"` // g/m³ (default 7.5)
}

var (
	propagationFields = []string{"rain_rate_mm_h", "rain_start_m", "rain_stop_m", "rain_polarisation", "multipath", "gas", "air_temperature_c", "air_pressure_hpa", "water_vapour_g_m3"}
	polarisations     = []string{"horizontal", "vertical"}
	multipaths        = []string{"none", "flat_sea"}
)

func (o *object) decodePropagation(p *Propagation) {
	o.float("rain_rate_mm_h", &p.RainRateMMH)
	o.float("rain_start_m", &p.RainStartM)
	p.RainStopM = maxRainStopM
	o.float("rain_stop_m", &p.RainStopM)
	p.RainPolarisation = "horizontal"
	if o.str("rain_polarisation", &p.RainPolarisation) {
		o.oneOf("rain_polarisation", p.RainPolarisation, polarisations)
	}
	if !o.has("rain_rate_mm_h") {
		for _, f := range []string{"rain_start_m", "rain_stop_m", "rain_polarisation"} {
			if o.has(f) {
				o.errs.add(o.sub(f), "given without rain_rate_mm_h: set the rain rate (above 0, at most 300 mm/h) too, or leave the rain out")
			}
		}
	}
	p.Multipath = "none"
	if o.str("multipath", &p.Multipath) {
		o.oneOf("multipath", p.Multipath, multipaths)
	}
	o.decodeGas(p)
	o.finish(propagationFields...)
}

// maxRainStopM is rain_stop_m's default and largest value: the limit of
// target ranges.
const maxRainStopM = 1e8

func (s *Scenario) validatePropagation(c checker) {
	p := s.Propagation
	if p.Multipath == "flat_sea" && s.Radar.AntennaHeightM == 0 && !c.errs.has("radar.antenna_height_m") {
		c.errs.add("propagation.multipath", "flat_sea needs radar.antenna_height_m (above 0, at most 100000 m): the reflected ray's path comes from the antenna's and the targets' heights")
	}
	s.validateGas(c)
	if p.RainRateMMH == 0 && !c.errs.has("propagation.rain_rate_mm_h") {
		return
	}
	if c.above("propagation.rain_rate_mm_h", p.RainRateMMH, 0, 300) && !c.errs.has("radar.carrier_hz") {
		if _, _, ok := dsp.RainCoefficients(s.Radar.CarrierHz/1e9, false); !ok {
			lo, hi := dsp.RainTableGHz()
			c.errs.add("propagation.rain_rate_mm_h", "the rain coefficients (ITU-R P.838-2 Table 1) cover %g … %g GHz; radar.carrier_hz is %g GHz", lo, hi, s.Radar.CarrierHz/1e9)
		}
	}
	if c.between("propagation.rain_start_m", p.RainStartM, 0, maxRainStopM) {
		c.above("propagation.rain_stop_m", p.RainStopM, p.RainStartM, maxRainStopM)
	}
}

func canonicalPropagation(p Propagation) ordered {
	var o ordered
	if p.RainRateMMH != 0 {
		o = append(o, member{"rain_rate_mm_h", p.RainRateMMH})
		o.put("rain_start_m", p.RainStartM, 0.0)
		o.put("rain_stop_m", p.RainStopM, maxRainStopM)
		o.put("rain_polarisation", p.RainPolarisation, "horizontal")
	}
	o.put("multipath", p.Multipath, "none")
	return append(o, canonicalGas(p)...)
}

// multipathDB returns a point target's two-way multipath gain over a flat
// sea, dB (40·log10 F; negative is a loss), and false when the option is
// off. F = 0 (a null, or a target on the surface) gives −Inf.
func (m *model) multipathDB(t Target) (float64, bool) {
	if m.s.Propagation.Multipath != "flat_sea" || t.Kind != TargetPoint || m.s.Radar.AntennaHeightM <= 0 || t.RangeM <= 0 {
		return 0, false
	}
	f := dsp.FlatSeaFactor(m.s.Radar.AntennaHeightM, t.HeightM, t.RangeM, m.lambda)
	return 40 * math.Log10(f), true
}

func (m *model) multipathWords(g *tgt) string {
	if !g.multipath {
		return ""
	}
	if math.IsInf(g.multipathDB, -1) || g.multipathDB < dbFloor {
		return fmt.Sprintf(" Multipath over the flat sea cancels its echo: the sea's reflection arrives in antiphase with the direct ray (antenna %.0f m, target %.0f m high).", m.s.Radar.AntennaHeightM, g.t.HeightM)
	}
	if math.Abs(g.multipathDB) < 0.05 {
		return ""
	}
	what := "gains"
	if g.multipathDB < 0 {
		what = "loses"
	}
	return fmt.Sprintf(" Multipath over the flat sea: its echo %s %.1f dB (two-way pattern-propagation factor F⁴, antenna %.0f m, target %.0f m high).", what, math.Abs(g.multipathDB), m.s.Radar.AntennaHeightM, g.t.HeightM)
}

// rainLossDB returns the two-way rain attenuation (dB) of an echo from
// range r (m): 2·γ·(the part of 0 … r inside the rain), γ = k·R^α dB/km.
func (m *model) rainLossDB(r float64) float64 { return m.rainLoss(r, m.rainGamma()) }

// rainGamma returns the rain's specific attenuation γ, dB/km (0 without
// rain).
func (m *model) rainGamma() float64 {
	p := m.s.Propagation
	if p.RainRateMMH <= 0 {
		return 0
	}
	k, a, ok := dsp.RainCoefficients(m.s.Radar.CarrierHz/1e9, p.RainPolarisation == "vertical")
	if !ok {
		return 0
	}
	return dsp.RainAttenuation(k, a, p.RainRateMMH)
}

// rainLoss is rainLossDB with γ (dB/km) given.
func (m *model) rainLoss(r, gamma float64) float64 {
	if gamma == 0 {
		return 0
	}
	p := m.s.Propagation
	return 2 * gamma * math.Max(0, math.Min(r, p.RainStopM)-p.RainStartM) / 1000
}

func (m *model) rainWords(g *tgt) string {
	if g.rainLossDB < 0.05 {
		return ""
	}
	p := m.s.Propagation
	k, a, _ := dsp.RainCoefficients(m.s.Radar.CarrierHz/1e9, p.RainPolarisation == "vertical")
	return fmt.Sprintf(" Rain of %g mm/h attenuates its echo by %.1f dB two-way (%.3f dB/km at %s, ITU-R P.838-2).", p.RainRateMMH, g.rainLossDB, dsp.RainAttenuation(k, a, p.RainRateMMH), hz(m.s.Radar.CarrierHz))
}
