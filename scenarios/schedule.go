package scenarios

import (
	"fmt"
)

// Schedule is a PRF schedule (added in format version 2): coherent
// processing intervals (CPIs) that follow the radar's own, each with its
// own PRI and pulse count, and the number of CPIs M of the N in all that
// must detect a target (M-of-N). The first CPI is always radar.pri_s ×
// radar.pulses; CPIs holds the second and later ones. A scenario without
// a schedule is one CPI, as before.
type Schedule struct {
	CPIs []CPI `json:"cpis"` // the CPIs after the radar's own, 1 … MaxCPIs−1
	M    int   `json:"m"`    // CPIs that must detect a target, 1 … N; default N
}

// CPI is one coherent processing interval of a schedule.
type CPI struct {
	PRIS   float64 `json:"pri_s"`  // pulse repetition interval, s (with a stagger: its shortest PRI)
	Pulses int     `json:"pulses"` // pulses in the CPI; default radar.pulses
	// PRIStaggerS lists the PRIs (s) the CPI's pulses use in turn
	// (added in format version 2); nil for a uniform train.
	PRIStaggerS []float64 `json:"pri_stagger_s,omitempty"`
}

// MaxCPIs bounds a schedule: N, the radar's own CPI included.
const MaxCPIs = 16

var (
	scheduleFields = []string{"cpis", "m"}
	cpiFields      = []string{"pri_s", "pri_stagger_s", "pulses"}
)

// N returns the number of CPIs, the radar's own included.
func (s *Schedule) N() int { return 1 + len(s.CPIs) }

func (s *Schedule) clone() *Schedule {
	if s == nil {
		return nil
	}
	t := *s
	t.CPIs = append([]CPI(nil), s.CPIs...)
	return &t
}

// decodeSchedule reads radar.schedule; pulses defaults to radar.pulses,
// so it is read after the radar's own fields.
func (o *object) decodeSchedule(r *Radar) {
	s := &Schedule{}
	v := o.get("cpis")
	switch {
	case v == nil:
		o.errs.add(o.sub("cpis"), "required: the CPIs after the radar's own (1 to %d objects with pri_s and pulses)", MaxCPIs-1)
	case v[0] != '[':
		o.errs.add(o.sub("cpis"), "%s is not an array", describe(v))
	default:
		if n := countElements(v); n < 1 || n > MaxCPIs-1 {
			o.errs.add(o.sub("cpis"), "%d entries; give 1 … %d (the radar's own CPI is the first of at most %d)", n, MaxCPIs-1, MaxCPIs)
			break
		}
		for i, raw := range rawElements(v) {
			c := CPI{Pulses: r.Pulses}
			if e, ok := newObject(fmt.Sprintf("%s[%d]", o.sub("cpis"), i), raw, o.errs); ok {
				if !e.has("pri_stagger_s") {
					e.require("pri_s", "the pulse repetition interval in s (or pri_stagger_s, the PRIs of a stagger)")
				}
				given := e.float("pri_s", &c.PRIS)
				e.decodeStagger(&c.PRIStaggerS, &c.PRIS, given)
				e.int("pulses", &c.Pulses)
				e.finish(cpiFields...)
			}
			s.CPIs = append(s.CPIs, c)
		}
	}
	s.M = s.N()
	o.int("m", &s.M)
	o.finish(scheduleFields...)
	r.Schedule = s
}

// validateSchedule checks radar.schedule against the waveform and the
// receive window, as validateRadar checks the radar's own CPI.
func (s *Scenario) validateSchedule(c checker, waveOK bool) {
	sc := s.Radar.Schedule
	if sc == nil || c.errs.has("radar.schedule") || c.errs.has("radar.schedule.cpis") {
		return
	}
	c.intBetween("radar.schedule.m", sc.M, 1, sc.N())
	sized := waveOK && !c.errs.has("radar.sample_rate_hz") && !c.errs.has("radar.window_stop_m") && !c.errs.has("radar.window_start_m")
	taps := map[string]int{MTITwoPulse: 2, MTIThreePulse: 3}[s.Receiver.MTI]
	for i, cpi := range sc.CPIs {
		p := fmt.Sprintf("radar.schedule.cpis[%d]", i)
		var priOK bool
		if len(cpi.PRIStaggerS) > 0 { // checked one by one in validateStagger
			priOK = waveOK && staggerInLimits(cpi.PRIStaggerS, s.Waveform.PulseWidth())
		} else {
			priOK = waveOK && c.above(p+".pri_s", cpi.PRIS, s.Waveform.PulseWidth(), 1)
		}
		n := 0
		if sized && priOK {
			// The CPI's own window (cpiScenario): its default stop follows its PRI.
			if n = s.cpiScenario(i + 1).WindowSamples(); n > MaxWindowSamples {
				c.errs.add(p+".pri_s", "%g s gives this CPI a receive window of %d samples (window_stop_m follows each CPI's PRI by default); the limit is %d", cpi.PRIS, n, MaxWindowSamples)
				n = 0
			}
		}
		if c.intBetween(p+".pulses", cpi.Pulses, 1, 1024) && !c.errs.has("radar.window_stop_m") {
			c.validateStagger(p+".pri_stagger_s", cpi.PRIStaggerS, s.Waveform.PulseWidth(), cpi.Pulses, s.cpiScenario(i+1).Radar.WindowStopM, waveOK)
		}
		if c.intBetween(p+".pulses", cpi.Pulses, 1, 1024) {
			switch {
			case n > 0 && n*cpi.Pulses > MaxCPISamples:
				c.errs.add(p+".pulses", "%d pulses × %d window samples exceed the limit of %d samples", cpi.Pulses, n, MaxCPISamples)
			case taps > 0 && cpi.Pulses < taps+1:
				c.errs.add(p+".pulses", "%d pulses; receiver.mti %s needs at least %d", cpi.Pulses, s.Receiver.MTI, taps+1)
			}
		}
	}
}

func canonicalSchedule(r Radar) ordered {
	sc := r.Schedule
	cpis := make([]ordered, len(sc.CPIs))
	for i, c := range sc.CPIs {
		if len(c.PRIStaggerS) > 0 {
			cpis[i] = ordered{{"pri_stagger_s", c.PRIStaggerS}}
		} else {
			cpis[i] = ordered{{"pri_s", c.PRIS}}
		}
		cpis[i].put("pulses", c.Pulses, r.Pulses)
	}
	o := ordered{{"cpis", cpis}}
	o.put("m", sc.M, sc.N())
	return o
}

// cpiScenario returns the scenario of CPI k (0: the radar's own) as a
// scenario of one CPI: its PRI and pulses in radar.pri_s and
// radar.pulses, no schedule. The receive window is the scenario's; when
// window_stop_m is its default c·pri_s/2, CPI k listens to its own
// c·PRI_k/2.
func (s *Scenario) cpiScenario(k int) *Scenario {
	t := s.clone()
	t.Radar.Schedule = nil
	if k == 0 {
		return t
	}
	c := s.Radar.Schedule.CPIs[k-1]
	if s.Radar.WindowStopM == C*s.Radar.PRIS/2 {
		t.Radar.WindowStopM = C * c.PRIS / 2
	}
	t.Radar.PRIS, t.Radar.Pulses, t.Radar.PRIStaggerS = c.PRIS, c.Pulses, c.PRIStaggerS
	return t
}
