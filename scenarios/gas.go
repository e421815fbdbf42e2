package scenarios

import (
	"fmt"

	"github.com/pulsewright/pulsewright/dsp"
)

// Gaseous attenuation on the path (propagation.gas, added in format
// version 2): oxygen and water vapour by the line-by-line model of
// Recommendation ITU-R P.676-13 Annex 1 (dsp.GasAttenuation) for the air
// at the radar, taken as uniform along a horizontal path (the terrestrial
// path of the Recommendation, A = γ·r₀), both ways: an echo from range r
// loses 2·γ·r/1000 dB. Docs: docs/scenario-format.md "propagation",
// docs/detection.md §13.

// GasP676 is the value of propagation.gas that turns the model on.
const GasP676 = "itu_p676"

var gases = []string{"none", GasP676}

// The default air: 15 °C, 1013.25 hPa and 7.5 g/m³, the conditions of
// P.676's Figure 1 and of the ITU's validation examples for it.
const (
	defaultAirTemperatureC = 15.0
	defaultAirPressureHPa  = 1013.25
	defaultWaterVapourGM3  = 7.5
	zeroCelsiusK           = 273.15
)

// Limits of the air's inputs: bounds of this project (common practice,
// no source), wide enough for any surface weather.
const (
	minAirTemperatureC = -100.0
	maxAirTemperatureC = 60.0
	minAirPressureHPa  = 10.0
	maxAirPressureHPa  = 1100.0
	maxWaterVapourGM3  = 100.0
)

// defaultPropagation is free space: no rain, no multipath, no gas, with
// the defaults the optional fields take.
func defaultPropagation() Propagation {
	return Propagation{RainStopM: maxRainStopM, RainPolarisation: "horizontal", Multipath: "none",
		Gas: "none", AirTemperatureC: defaultAirTemperatureC, AirPressureHPa: defaultAirPressureHPa, WaterVapourGM3: defaultWaterVapourGM3}
}

var airFields = []string{"air_temperature_c", "air_pressure_hpa", "water_vapour_g_m3"}

func (o *object) decodeGas(p *Propagation) {
	if o.str("gas", &p.Gas) {
		o.oneOf("gas", p.Gas, gases)
	}
	o.float("air_temperature_c", &p.AirTemperatureC)
	o.float("air_pressure_hpa", &p.AirPressureHPa)
	o.float("water_vapour_g_m3", &p.WaterVapourGM3)
	if p.Gas != GasP676 {
		for _, f := range airFields {
			if o.has(f) {
				o.errs.add(o.sub(f), "given without gas: set gas to %s to attenuate the echoes by the air's oxygen and water vapour, or leave the air out", GasP676)
			}
		}
	}
}

func (s *Scenario) validateGas(c checker) {
	p := s.Propagation
	if p.Gas != GasP676 {
		return
	}
	const b = "propagation."
	okT := c.between(b+"air_temperature_c", p.AirTemperatureC, minAirTemperatureC, maxAirTemperatureC)
	okP := c.between(b+"air_pressure_hpa", p.AirPressureHPa, minAirPressureHPa, maxAirPressureHPa)
	if c.between(b+"water_vapour_g_m3", p.WaterVapourGM3, 0, maxWaterVapourGM3) && okT && okP {
		if e := dsp.WaterVapourPressure(p.WaterVapourGM3, p.AirTemperatureC+zeroCelsiusK); e >= p.AirPressureHPa {
			c.errs.add(b+"water_vapour_g_m3", "%g g/m³ at %g °C has a partial pressure of %.4g hPa (e = ρ·T/216.7), not below air_pressure_hpa %g: lower the water vapour or raise the pressure",
				p.WaterVapourGM3, p.AirTemperatureC, e, p.AirPressureHPa)
		}
	}
	if !c.errs.has("radar.carrier_hz") {
		lo, hi := dsp.GasTableGHz()
		if f := s.Radar.CarrierHz / 1e9; !(f >= lo && f <= hi) {
			c.errs.add(b+"gas", "the line-by-line model of ITU-R P.676-13 covers %g … %g GHz; radar.carrier_hz is %g GHz", lo, hi, f)
		}
	}
}

func canonicalGas(p Propagation) ordered {
	var o ordered
	if p.Gas != GasP676 {
		return o
	}
	o = append(o, member{"gas", p.Gas})
	o.put("air_temperature_c", p.AirTemperatureC, defaultAirTemperatureC)
	o.put("air_pressure_hpa", p.AirPressureHPa, defaultAirPressureHPa)
	o.put("water_vapour_g_m3", p.WaterVapourGM3, defaultWaterVapourGM3)
	return o
}

// gasGamma returns the specific attenuation γo + γw (dB/km) of the air at
// carrier frequency f (Hz), 0 without propagation.gas. The pressure given
// is the total; P.676 takes the dry-air pressure p = P − e.
func (p Propagation) gasGamma(f float64) float64 {
	if p.Gas != GasP676 {
		return 0
	}
	t := p.AirTemperatureC + zeroCelsiusK
	dry := p.AirPressureHPa - dsp.WaterVapourPressure(p.WaterVapourGM3, t)
	o, w := dsp.GasAttenuation(f/1e9, dry, p.WaterVapourGM3, t)
	return o + w
}

// gasLossDB returns the two-way gaseous attenuation (dB) of an echo from
// range r (m): 2·γ·r/1000.
func (m *model) gasLossDB(r float64) float64 {
	if m.gasDBkm == 0 || r <= 0 {
		return 0
	}
	return 2 * m.gasDBkm * r / 1000
}

func (m *model) gasWords(g *tgt) string {
	if g.gasLossDB < 0.05 {
		return ""
	}
	p := m.s.Propagation
	return fmt.Sprintf(" The atmosphere attenuates its echo by %.1f dB two-way: oxygen and water vapour, %.4f dB/km at %s (ITU-R P.676-13; air at %g °C, %g hPa, %g g/m³).",
		g.gasLossDB, m.gasDBkm, hz(m.s.Radar.CarrierHz), p.AirTemperatureC, p.AirPressureHPa, p.WaterVapourGM3)
}
