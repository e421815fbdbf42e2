package scenarios

import (
	"bytes"
	"encoding/json"
)

// member is one field of an ordered JSON object.
type member struct {
	key string
	val any
}

// ordered is a JSON object that keeps its members in order.
type ordered []member

func (o ordered) MarshalJSON() ([]byte, error) {
	var b bytes.Buffer
	b.WriteByte('{')
	for i, m := range o {
		if i > 0 {
			b.WriteByte(',')
		}
		k, _ := json.Marshal(m.key)
		b.Write(k)
		b.WriteByte(':')
		v, err := json.Marshal(m.val)
		if err != nil {
			return nil, err
		}
		b.Write(v)
	}
	b.WriteByte('}')
	return b.Bytes(), nil
}

// put appends key: val unless val equals def.
func (o *ordered) put(key string, val, def any) {
	if val == def {
		return
	}
	*o = append(*o, member{key, val})
}

// Canonical returns the canonical JSON of a valid scenario: fields in the
// order of the format document, default values omitted, no insignificant
// white space. Two scenarios that decode equal have the same canonical
// form, and Decode(Canonical(s)) equals s.
func Canonical(s *Scenario) ([]byte, error) {
	return json.Marshal(s.canonical())
}

func (s *Scenario) canonical() ordered {
	o := ordered{{"version", s.Version}}
	o.put("name", s.Name, "")
	o.put("notes", s.Notes, "")
	o.put("seed", s.Seed, int64(1))
	if r := s.canonicalRadar(); len(r) > 0 {
		o = append(o, member{"radar", r})
	}
	o = append(o, member{"waveform", canonicalWaveform(s.Waveform)})
	if r := canonicalReceiver(s.Receiver); len(r) > 0 {
		o = append(o, member{"receiver", r})
	}
	if len(s.Targets) > 0 {
		ts := make([]ordered, len(s.Targets))
		for i, t := range s.Targets {
			ts[i] = canonicalTarget(t)
		}
		o = append(o, member{"targets", ts})
	}
	if f := canonicalFrontEnd(s.FrontEnd); len(f) > 0 {
		o = append(o, member{"front_end", f})
	}
	if p := canonicalPropagation(s.Propagation); len(p) > 0 {
		o = append(o, member{"propagation", p})
	}
	if len(s.View) > 0 {
		o = append(o, member{"view", s.View})
	}
	return o
}

func (s *Scenario) canonicalRadar() ordered {
	r, d := s.Radar, defaultRadar()
	var o ordered
	o.put("carrier_hz", r.CarrierHz, d.CarrierHz)
	o.put("peak_power_w", r.PeakPowerW, d.PeakPowerW)
	o.put("antenna_gain_dbi", r.AntennaGainDBi, d.AntennaGainDBi)
	o.put("noise_figure_db", r.NoiseFigureDB, d.NoiseFigureDB)
	o.put("system_loss_db", r.SystemLossDB, d.SystemLossDB)
	o.put("sample_rate_hz", r.SampleRateHz, 2*s.Waveform.Bandwidth())
	if r.Staggered() {
		o = append(o, member{"pri_stagger_s", r.PRIStaggerS}) // pri_s: its shortest PRI
	} else {
		o.put("pri_s", r.PRIS, d.PRIS)
	}
	o.put("pulses", r.Pulses, d.Pulses)
	o.put("window_start_m", r.WindowStartM, d.WindowStartM)
	o.put("window_stop_m", r.WindowStopM, C*r.PRIS/2)
	o.put("beamwidth_az_deg", r.BeamwidthAzDeg, d.BeamwidthAzDeg)
	o.put("beamwidth_el_deg", r.BeamwidthElDeg, d.BeamwidthElDeg)
	o.put("antenna_height_m", r.AntennaHeightM, 0.0)
	if r.Schedule != nil {
		o = append(o, member{"schedule", canonicalSchedule(r)})
	}
	if r.Scan != nil {
		o = append(o, member{"scan", canonicalScan(r.Scan)})
	}
	return o
}

func canonicalWaveform(w Waveform) ordered {
	o := ordered{{"kind", w.Kind}}
	for _, f := range waveformFields[w.Kind] {
		switch f {
		case "pulse_width_s":
			o.put(f, w.PulseWidthS, nil)
		case "bandwidth_hz":
			o.put(f, w.BandwidthHz, nil)
		case "sweep":
			o.put(f, w.Sweep, "up")
		case "design_sidelobe_db":
			o.put(f, w.DesignSidelobeDB, -40.0)
		case "length":
			o.put(f, w.Length, nil)
		case "degree":
			o.put(f, w.Degree, nil)
		case "root":
			o.put(f, w.Root, nil)
		case "chip_s":
			o.put(f, w.ChipS, nil)
		case "phases_deg":
			if w.Binary == "" {
				o.put(f, w.PhasesDeg, nil)
			}
		case "binary":
			o.put(f, w.Binary, "")
		case "sample_rate_hz":
			o.put(f, w.SampleRateHz, nil)
		case "interpolation":
			o.put(f, w.Interpolation, InterpBandLimited)
		case "i":
			o = canonicalIQ(o, w.Samples) // writes i, q or amplitude, phase_deg
		}
	}
	return o
}

func canonicalReceiver(r Receiver) ordered {
	d := defaultReceiver()
	var o ordered
	o.put("filter", r.Filter, d.Filter)
	o.put("filter_length_factor", r.FilterLengthFactor, d.FilterLengthFactor)
	if r.Taps != nil {
		o = append(o, member{"taps", canonicalIQ(nil, *r.Taps)})
	}
	if r.Window != d.Window {
		o = append(o, member{"window", canonicalWindow(r.Window)})
	}
	if r.Detector != d.Detector {
		det, dd := r.Detector, defaultDetector(r.Detector.Kind)
		od := ordered{{"kind", det.Kind}}
		od.put("pfa", det.PFA, dd.PFA)
		od.put("pd_required", det.PdRequired, dd.PdRequired)
		if det.Kind != DetectorFixed {
			od.put("guard_cells", det.GuardCells, dd.GuardCells)
			od.put("training_cells", det.TrainingCells, dd.TrainingCells)
		}
		if det.Kind == DetectorOS {
			od.put("rank", det.Rank, (3*det.TrainingCells+3)/4)
		}
		if det.Kind == DetectorCens {
			od.put("censored_cells", det.CensoredCells, defaultCensored(det.TrainingCells))
		}
		if det.Kind != DetectorFixed {
			od.put("doppler_guard_cells", det.DopplerGuardCells, dd.DopplerGuardCells)
			od.put("doppler_training_cells", det.DopplerTrainingCells, dd.DopplerTrainingCells)
		}
		o = append(o, member{"detector", od})
	}
	if r.DopplerWindow != d.DopplerWindow {
		o = append(o, member{"doppler_window", canonicalWindow(r.DopplerWindow)})
	}
	o.put("mti", r.MTI, d.MTI)
	o.put("integration", r.Integration, d.Integration)
	return o
}

func canonicalWindow(w Window) ordered {
	d := defaultWindow(w.Kind)
	o := ordered{{"kind", w.Kind}}
	for _, f := range windowFields[w.Kind] {
		switch f {
		case "sidelobe_db":
			o.put(f, w.SidelobeDB, d.SidelobeDB)
		case "nbar":
			o.put(f, w.NBar, d.NBar)
		case "beta":
			o.put(f, w.Beta, d.Beta)
		case "sigma":
			o.put(f, w.Sigma, d.Sigma)
		}
	}
	return o
}

func canonicalTarget(t Target) ordered {
	o := ordered{{"id", t.ID}, {"kind", t.Kind}}
	for _, f := range targetFields[t.Kind] {
		switch f {
		case "range_m":
			o.put(f, t.RangeM, nil)
		case "rcs_dbsm":
			o.put(f, t.RCSDBsm, nil)
		case "range_rate_mps":
			o.put(f, t.RangeRateMPS, 0.0)
		case "fluctuation":
			o.put(f, t.Fluctuation, FluctuationNone)
		case "height_m":
			o.put(f, t.HeightM, 0.0)
		case "range_start_m":
			o.put(f, t.RangeStartM, nil)
		case "range_stop_m":
			o.put(f, t.RangeStopM, nil)
		case "rcs_dbsm_per_m", "sigma0_db", "gamma_db", "sea_state":
			if t.levelField() == f {
				o.put(f, t.levelValue(), nil)
			}
		case "polarisation":
			if t.Level == LevelSeaState {
				o.put(f, t.Polarisation, "horizontal")
			}
		case "role":
			if t.Role == RoleTarget {
				o.put(f, t.Role, nil)
			}
		case "reflectivity_dbz":
			o.put(f, t.ReflectivityDBZ, nil)
		case "velocity_spread_mps":
			o.put(f, t.VelocitySpreadMPS, 0.0)
		}
	}
	return o
}
