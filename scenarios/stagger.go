package scenarios

import (
	"encoding/json"
	"fmt"
	"math"
	"slices"
	"strings"

	"github.com/pulsewright/pulsewright/dsp"
)

// A staggered PRI train (added in format version 2): radar.pri_stagger_s
// or a schedule CPI's pri_stagger_s lists the PRIs the CPI's pulses use in
// turn, pulse to pulse (docs/scenario-format.md, docs/detection.md §16).
// pri_s is then the shortest of them, which the receive window and the
// blanking follow.

// Stagger pattern lengths.
const (
	MinStagger = 2
	MaxStagger = 16
)

// pattern returns the PRIs the CPI's pulses use in turn: pri_stagger_s,
// or pri_s alone.
func (r Radar) pattern() []float64 {
	if len(r.PRIStaggerS) > 0 {
		return r.PRIStaggerS
	}
	return []float64{r.PRIS}
}

// blankPRI returns the PRI of the single-pulse scene's transmit blanking,
// s: pri_s, or a stagger's longest PRI, the sweep that hears most of an
// echo near the window's end (each sweep's own blanking weighs the map,
// docs/detection.md §16).
func (r Radar) blankPRI() float64 {
	if r.Staggered() {
		return slices.Max(r.PRIStaggerS)
	}
	return r.PRIS
}

// Staggered reports whether the radar's CPI has a PRI stagger.
func (r Radar) Staggered() bool { return len(r.PRIStaggerS) > 0 }

// slowPRI returns the slow-time unit of the CPI, s: the PRI, or the mean
// PRI of a stagger.
func (r Radar) slowPRI() float64 { return dsp.MeanPRI(r.pattern()) }

// pulseTime returns the transmit time of pulse p (any integer; pulses
// before 0 continue the pattern backwards), s from pulse 0.
func (r Radar) pulseTime(p int) float64 {
	pat := r.pattern()
	l := len(pat)
	cyc := 0.0
	for _, T := range pat {
		cyc += T
	}
	c := p / l
	i := p % l
	if i < 0 {
		i += l
		c--
	}
	t := float64(c) * cyc
	for k := range i {
		t += pat[k]
	}
	return t
}

// decodeStagger reads pri_stagger_s of o (the radar or a CPI) into dst
// and sets *pri to its shortest PRI; a pri_s given alongside (priGiven)
// must equal that.
func (o *object) decodeStagger(dst *[]float64, pri *float64, priGiven bool) {
	path := o.sub("pri_stagger_s")
	raw := o.get("pri_stagger_s")
	if raw == nil {
		return
	}
	if raw[0] != '[' {
		o.errs.add(path, "%s is not an array of PRIs in s", describe(raw))
		return
	}
	if n := countElements(raw); n < MinStagger || n > MaxStagger {
		o.errs.add(path, "%d PRIs; give %d … %d (the PRIs the pulses use in turn)", n, MinStagger, MaxStagger)
		return
	}
	var out []float64
	for i, v := range rawElements(raw) {
		var f float64
		if json.Unmarshal(v, &f) != nil {
			o.errs.add(fmt.Sprintf("%s[%d]", path, i), "%s is not a number", describe(v))
			o.errs.mark(path)
			return
		}
		out = append(out, f)
	}
	*dst = out
	short := slices.Min(out)
	if priGiven && *pri != short {
		o.errs.add(o.sub("pri_s"), "%g s is not the shortest PRI of pri_stagger_s (%g s): with a stagger, pri_s is that shortest PRI; leave it out", *pri, short)
		return
	}
	*pri = short
}

// validateStagger checks a CPI's stagger at path (…pri_stagger_s): each
// PRI within pri_s's limits (above the pulse width τ, at most 1 s), a
// pulse train of at least two pulses, and a receive window that ends
// before the next pulse in every sweep.
func (c checker) validateStagger(path string, pattern []float64, tau float64, pulses int, windowStopM float64, waveOK bool) {
	if len(pattern) == 0 || c.errs.has(path) {
		return
	}
	ok := true
	for i, T := range pattern {
		if waveOK {
			ok = c.above(fmt.Sprintf("%s[%d]", path, i), T, tau, 1) && ok
		} else {
			ok = c.above(fmt.Sprintf("%s[%d]", path, i), T, 0, 1) && ok
		}
	}
	if !ok {
		return
	}
	if dsp.NewSchedule(pattern...).Delta == 0 {
		c.errs.add(path, "%s: the PRIs have no common step Δ (each a whole multiple n·Δ, n ≤ 10000, within 10⁻⁹); put them on a clock grid", fmt.Sprint(pattern))
		return
	}
	if pulses < 2 {
		c.errs.add(path, "a stagger needs a pulse train; this CPI has %d pulse (give 2 … 1024 pulses)", pulses)
		return
	}
	if short := slices.Min(pattern); windowStopM > C*short/2*(1+1e-12) {
		c.errs.add(path, "the shortest PRI %g s ends the sweep at %.6g m, before window_stop_m %.6g m: with a stagger the receive window must end within c·PRI/2 of the shortest PRI", short, C*short/2, windowStopM)
	}
}

// staggerInLimits reports whether every PRI of a pattern lies within
// pri_s's limits: above tau, at most 1 s.
func staggerInLimits(pattern []float64, tau float64) bool {
	for _, T := range pattern {
		if !(T > tau && T <= 1) {
			return false
		}
	}
	return true
}

// staggerWords names a stagger: "100 µs / 125 µs".
func staggerWords(pattern []float64) string {
	w := make([]string, len(pattern))
	for i, T := range pattern {
		w[i] = sec(T)
	}
	return strings.Join(w, " / ")
}

// staggerBlindSpeed returns the first true blind speed λ/(2Δ) of a
// pattern (m/s), or 0 when the PRIs have no common grid.
func staggerBlindSpeed(pattern []float64, lambda float64) float64 {
	v := dsp.NewSchedule(pattern...).FirstBlindSpeed(lambda)
	if math.IsInf(v, 0) {
		return 0
	}
	return v
}
