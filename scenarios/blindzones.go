package scenarios

import (
	"fmt"
	"html"
	"io"
	"math"
	"slices"
	"strings"

	"github.com/pulsewright/pulsewright/dsp"
)

// BlindZoneSpec is a PRF schedule and the range × range-rate region to map
// for blind zones: where a target is eclipsed by a transmit pulse or sits
// at a blind speed, in each coherent processing interval (CPI), and
// whether M of the N CPIs still see it.
type BlindZoneSpec struct {
	PRIs   []float64 // s, one per CPI
	Pulses []int     // pulses per CPI (one value: the same for all)
	// Staggers holds each CPI's staggered PRIs (s; nil or an empty entry
	// for a uniform CPI, whose PRI is PRIs[k]; PRIs[k] is then not used):
	// nil when no CPI is staggered.
	Staggers  [][]float64
	PulseS    float64 // transmitted pulse width τ, s
	CarrierHz float64 // carrier, Hz (λ = c/f)
	M         int     // CPIs that must see a target (M-of-N); 0: all

	RangeMinM, RangeMaxM float64 // mapped ranges, m
	RateMaxMPS           float64 // mapped range rates −max … +max, m/s
	RangeCells           int     // map columns
	RateCells            int     // map rows

	// EclipseFraction: a target is eclipsed in a CPI when at least this
	// fraction of its echo overlaps a transmit pulse (0.5: half the
	// energy, 3 dB, lost; common practice, no source). 0 means 0.5.
	EclipseFraction float64
}

// maxCPIs bounds the schedule: a map cell records its CPIs in a bit mask.
const maxCPIs = 32

// Validate checks every field and returns a *ValidationError naming each
// bad one with its value and valid range.
func (s *BlindZoneSpec) Validate() error {
	var l errList
	if len(s.PRIs) == 0 || len(s.PRIs) > maxCPIs {
		l.add("pri", "%d PRIs given; give 1 … %d", len(s.PRIs), maxCPIs)
	}
	for i, p := range s.PRIs {
		if !(p >= 1e-6 && p <= 1) {
			l.add(fmt.Sprintf("pri[%d]", i), "%g is outside the valid range 1e-06 … 1 s", p)
		} else if !(s.PulseS < p/2) && s.PulseS > 0 {
			l.add(fmt.Sprintf("pri[%d]", i), "%g s must be above twice the pulse width %g s", p, s.PulseS)
		}
	}
	if s.Staggers != nil && len(s.Staggers) != len(s.PRIs) {
		l.add("stagger", "%d staggers given for %d CPIs; give one per CPI (empty for a uniform one)", len(s.Staggers), len(s.PRIs))
	}
	for k, pat := range s.Staggers {
		if len(pat) == 0 {
			continue
		}
		if len(pat) < MinStagger || len(pat) > MaxStagger {
			l.add(fmt.Sprintf("stagger[%d]", k), "%d PRIs; give %d … %d", len(pat), MinStagger, MaxStagger)
			continue
		}
		inRange := true
		for i, p := range pat {
			if !(p >= 1e-6 && p <= 1) {
				l.add(fmt.Sprintf("stagger[%d][%d]", k, i), "%g is outside the valid range 1e-06 … 1 s", p)
				inRange = false
			} else if !(s.PulseS < p/2) && s.PulseS > 0 {
				l.add(fmt.Sprintf("stagger[%d][%d]", k, i), "%g s must be above twice the pulse width %g s", p, s.PulseS)
			}
		}
		if inRange && dsp.NewSchedule(pat...).Delta == 0 {
			l.add(fmt.Sprintf("stagger[%d]", k), "%v: the PRIs have no common step (each a whole multiple of it, at most 10000 times)", pat)
		}
	}
	if len(s.Pulses) != 1 && len(s.Pulses) != len(s.PRIs) {
		l.add("pulses", "%d counts given for %d PRIs; give one count or one per PRI", len(s.Pulses), len(s.PRIs))
	}
	for i, n := range s.Pulses {
		if n < 1 || n > 1024 {
			l.add(fmt.Sprintf("pulses[%d]", i), "%d is outside the valid range 1 … 1024", n)
		}
	}
	if !(s.PulseS >= 1e-9 && s.PulseS <= 0.01) {
		l.add("tau", "%g is outside the valid range 1e-09 … 0.01 s", s.PulseS)
	}
	if !(s.CarrierHz >= 1e6 && s.CarrierHz <= 3e11) {
		l.add("carrier", "%g is outside the valid range 1e+06 … 3e+11 Hz", s.CarrierHz)
	}
	if s.M < 0 || s.M > len(s.PRIs) {
		l.add("m", "%d is outside the valid range 0 … %d (0: all CPIs)", s.M, len(s.PRIs))
	}
	if !(s.RangeMinM >= 0 && s.RangeMinM < s.RangeMaxM && s.RangeMaxM <= 1e8) {
		l.add("range", "%g:%g is not an interval within 0 … 1e+08 m with min < max", s.RangeMinM, s.RangeMaxM)
	}
	if !(s.RateMaxMPS > 0 && s.RateMaxMPS <= 1e4) {
		l.add("rate", "%g is outside the valid range (0, 10000] m/s", s.RateMaxMPS)
	}
	if s.RangeCells < 2 || s.RangeCells > 2000 {
		l.add("cells.range", "%d range cells is outside the valid range 2 … 2000", s.RangeCells)
	}
	if s.RateCells < 2 || s.RateCells > 1000 {
		l.add("cells.rate", "%d range-rate cells is outside the valid range 2 … 1000", s.RateCells)
	}
	if !(s.EclipseFraction >= 0 && s.EclipseFraction <= 1) {
		l.add("eclipse", "%g is outside the valid range 0 … 1", s.EclipseFraction)
	}
	return l.err()
}

// BlindZoneMap is the computed map. Cell (i, j) is range rate Rates[i],
// range Ranges[j] (cell centres); a cell is marked eclipsed or blind in a
// CPI when any part of it is.
type BlindZoneMap struct {
	Spec     BlindZoneSpec
	Ranges   []float64  // m
	Rates    []float64  // m/s, positive receding
	Eclipsed [][]uint32 // [rate][range] bit i set: eclipsed in CPI i
	Blind    [][]uint32 // bit i set: at a blind speed in CPI i
	M        int        // effective M

	UnambiguousRangeM float64 // combined, omitted when +Inf (incommensurate)
	FirstBlindMPS     float64 // first speed blind in every CPI; 0 when none
}

// Seen returns the number of CPIs that see the cell.
func (b *BlindZoneMap) Seen(i, j int) int {
	n := len(b.Spec.PRIs)
	lost := b.Eclipsed[i][j] | b.Blind[i][j]
	c := 0
	for k := range n {
		if lost&(1<<k) == 0 {
			c++
		}
	}
	return c
}

// EclipsedFraction returns the fraction of a target's echo, τ long, that
// overlaps transmit pulses when it arrives rangeM away with PRI pri:
// with t = (2R/c) mod PRI, the overlap with the pulse at 0 is max(0, τ − t)
// and with the next, at PRI, max(0, t + τ − PRI).
func EclipsedFraction(rangeM, pri, tau float64) float64 {
	t := dsp.Wrap(2*rangeM/C, pri)
	o := math.Max(0, tau-t) + math.Max(0, t+tau-pri)
	return math.Min(o/tau, 1)
}

// AtBlindSpeed reports whether a target with range rate v (m/s) falls in
// the zero-Doppler bin of an N-pulse CPI with PRI pri: its Doppler
// f_d = 2v/λ, folded by the PRF, lies within ±PRF/(2N) of zero, where a
// clutter notch or MTI removes it. A single pulse (N = 1) has no Doppler
// processing and is never blind.
func AtBlindSpeed(v, pri, lambda float64, pulses int) bool {
	if pulses <= 1 {
		return false
	}
	x := dsp.WrapCentred(2*v/lambda*pri, 1)
	return math.Abs(x) < 1/(2*float64(pulses))
}

// BlindZones computes the map of a valid spec.
func BlindZones(s BlindZoneSpec) (*BlindZoneMap, error) {
	if err := s.Validate(); err != nil {
		return nil, err
	}
	if s.EclipseFraction == 0 {
		s.EclipseFraction = 0.5
	}
	b := &BlindZoneMap{Spec: s, M: s.M}
	if b.M == 0 {
		b.M = len(s.PRIs)
	}
	lambda := C / s.CarrierHz
	sched := dsp.NewSchedule(s.allPRIs()...)
	// Ranges unfold over the uniform CPIs only (detection.md §16).
	var uniform []float64
	for k, p := range s.PRIs {
		if s.stagger(k) == nil {
			uniform = append(uniform, p)
		}
	}
	if len(uniform) > 0 {
		if r := dsp.NewSchedule(uniform...).UnambiguousRange(); !math.IsInf(r, 0) {
			b.UnambiguousRangeM = r
		}
	}
	if v := sched.FirstBlindSpeed(lambda); !math.IsInf(v, 0) {
		b.FirstBlindMPS = v
	}
	dr := (s.RangeMaxM - s.RangeMinM) / float64(s.RangeCells)
	for j := range s.RangeCells {
		b.Ranges = append(b.Ranges, s.RangeMinM+(float64(j)+0.5)*dr)
	}
	dv := 2 * s.RateMaxMPS / float64(s.RateCells)
	for i := range s.RateCells {
		b.Rates = append(b.Rates, -s.RateMaxMPS+(float64(i)+0.5)*dv)
	}
	pulses := func(k int) int {
		if len(s.Pulses) == 1 {
			return s.Pulses[0]
		}
		return s.Pulses[k]
	}
	// A cell is marked when any part of it is blind (conservative: a
	// blind zone narrower than a cell still shows). Eclipsed ranges of a
	// PRI are the intervals k·Ru ± (1 − f)·c·τ/2 (EclipsedFraction ≥ f);
	// blind range rates k·v_b ± v_b/(2N) (AtBlindSpeed).
	hit := func(a, b, period, half float64) bool {
		k := math.Ceil((a - half) / period)
		return k*period <= b+half
	}
	ecl := make([]uint32, s.RangeCells)
	w := (1 - s.EclipseFraction) * C * s.PulseS / 2
	for j, r := range b.Ranges {
		for k, p := range s.PRIs {
			if pat := s.stagger(k); pat != nil {
				if staggerEclipsedMax(r-dr/2, r+dr/2, pat, s.PulseS) >= s.EclipseFraction-1e-9 { // rounding of a peak
					ecl[j] |= 1 << k
				}
				continue
			}
			if hit(r-dr/2, r+dr/2, dsp.UnambiguousRange(p), w) {
				ecl[j] |= 1 << k
			}
		}
	}
	for _, v := range b.Rates {
		var bl uint32
		for k, p := range s.PRIs {
			vb := dsp.BlindSpeed(p, lambda)
			half := vb / (2 * float64(pulses(k)))
			if pat := s.stagger(k); pat != nil {
				// Blind at multiples of λ/(2Δ), within half a Doppler bin
				// of the mean PRI's filter bank (detection.md §16).
				vb = staggerBlindSpeed(pat, lambda)
				half = dsp.BlindSpeed(dsp.MeanPRI(pat), lambda) / (2 * float64(pulses(k)))
			}
			if pulses(k) > 1 && hit(v-dv/2, v+dv/2, vb, half) {
				bl |= 1 << k
			}
		}
		row, brow := make([]uint32, s.RangeCells), make([]uint32, s.RangeCells)
		copy(row, ecl)
		for j := range brow {
			brow[j] = bl
		}
		b.Eclipsed = append(b.Eclipsed, row)
		b.Blind = append(b.Blind, brow)
	}
	return b, nil
}

// stagger returns CPI k's staggered PRIs, or nil for a uniform CPI.
func (s *BlindZoneSpec) stagger(k int) []float64 {
	if k < len(s.Staggers) && len(s.Staggers[k]) > 0 {
		return s.Staggers[k]
	}
	return nil
}

// allPRIs returns every PRI of every CPI: the uniform CPIs' and each
// staggered CPI's pattern.
func (s *BlindZoneSpec) allPRIs() []float64 {
	var out []float64
	for k, p := range s.PRIs {
		if pat := s.stagger(k); pat != nil {
			out = append(out, pat...)
		} else {
			out = append(out, p)
		}
	}
	return out
}

// staggerEclipsedMax returns the largest fraction, over true ranges in
// [lo, hi] (m), of a staggered CPI's echo energy lost under transmit
// pulses: the mean over one pattern cycle of pulses p of the overlap of
// pulse p's echo, starting t_p + 2R/c, with every transmit pulse
// [t_q, t_q + τ), over τ (each pulse's own sweep, the pattern continuing
// both ways). Each overlap is a triangle in R peaked where the echo
// starts with a transmit pulse, so the largest mean lies at such a peak
// or at an end of the interval.
func staggerEclipsedMax(lo, hi float64, pattern []float64, tau float64) float64 {
	l := len(pattern)
	cyc := 0.0
	for _, T := range pattern {
		cyc += T
	}
	at := func(q int) float64 { // t_q for any integer q
		c, i := q/l, q%l
		if i < 0 {
			i += l
			c--
		}
		t := float64(c) * cyc
		for k := range i {
			t += pattern[k]
		}
		return t
	}
	frac := func(r float64) float64 {
		s := 0.0
		for p := range l {
			st := at(p) + 2*r/C
			// Transmit pulses that can overlap [st, st+τ): t_q in (st−τ, st+τ).
			q := p + l*int(math.Floor((st-tau-at(p))/cyc)) - l
			for ; at(q) < st+tau; q++ {
				if o := math.Min(at(q)+tau, st+tau) - math.Max(at(q), st); o > 0 {
					s += o
				}
			}
		}
		return math.Min(s/(float64(l)*tau), 1)
	}
	best := math.Max(frac(lo), frac(hi))
	for p := range l {
		// Peaks: t_p + 2R/c = t_q for R in [lo, hi].
		t0, t1 := at(p)+2*lo/C, at(p)+2*hi/C
		q := p + l*int(math.Floor((t0-at(p))/cyc)) - l
		for ; at(q) <= t1; q++ {
			if t := at(q); t >= t0 {
				best = math.Max(best, frac((t-at(p))*C/2))
			}
		}
	}
	return best
}

// DetectedFraction returns the fraction of map cells seen in at least M
// CPIs.
func (b *BlindZoneMap) DetectedFraction() float64 {
	n, ok := 0, 0
	for i := range b.Rates {
		for j := range b.Ranges {
			n++
			if b.Seen(i, j) >= b.M {
				ok++
			}
		}
	}
	return float64(ok) / float64(n)
}

// summary writes the schedule's header lines, in u.
func (b *BlindZoneMap) summary(w io.Writer, prefix string, u Units) {
	s := b.Spec
	lambda := C / s.CarrierHz
	for k, p := range s.PRIs {
		n := s.Pulses[0]
		if len(s.Pulses) > 1 {
			n = s.Pulses[k]
		}
		if pat := s.stagger(k); pat != nil {
			fmt.Fprintf(w, "%sCPI %d: stagger %s, %d pulses, unambiguous range %s (shortest PRI), first blind speed %s (λ/(2Δ), Δ %s)\n", prefix, k+1, staggerWords(pat), n, u.distance(dsp.UnambiguousRange(slices.Min(pat))), u.Format(QSpeed, staggerBlindSpeed(pat, lambda), 1), sec(dsp.NewSchedule(pat...).Delta))
			continue
		}
		fmt.Fprintf(w, "%sCPI %d: PRI %s, %d pulses, unambiguous range %s, blind speed %s\n", prefix, k+1, sec(p), n, u.distance(dsp.UnambiguousRange(p)), u.Format(QSpeed, dsp.BlindSpeed(p, lambda), 1))
	}
	if b.UnambiguousRangeM > 0 {
		fmt.Fprintf(w, "%scombined unambiguous range %s\n", prefix, u.distance(b.UnambiguousRangeM))
	}
	if b.FirstBlindMPS > 0 {
		fmt.Fprintf(w, "%sfirst speed blind in every CPI %s\n", prefix, u.Format(QSpeed, b.FirstBlindMPS, 1))
	}
	fmt.Fprintf(w, "%s%d-of-%d sees %.1f %% of the map (eclipsed: %.0f %% or more of the echo under a transmit pulse; blind: in the zero-Doppler bin)\n",
		prefix, b.M, len(s.PRIs), 100*b.DetectedFraction(), 100*s.EclipseFraction)
}

// WriteText writes the map as characters: one row per range rate (top:
// most receding), one column per range cell, each the number of CPIs that
// see it (1–9, + for more); '.' when fewer than M see it (missed) and ' '
// when every CPI does; the engine's line last.
func (b *BlindZoneMap) WriteText(w io.Writer) error {
	return b.WriteTextIn(w, SIUnits())
}

// WriteTextIn is WriteText with ranges, speeds and range rates in u.
func (b *BlindZoneMap) WriteTextIn(w io.Writer, u Units) error {
	var sb strings.Builder
	b.summary(&sb, "", u)
	fmt.Fprintf(&sb, "\nrows: range rate %s … %s %s (top: receding); columns: range %s … %s\n",
		u.Number(QRate, b.Rates[len(b.Rates)-1], 0), u.Number(QRate, b.Rates[0], 0), u.Label(QRate), u.distance(b.Spec.RangeMinM), u.distance(b.Spec.RangeMaxM))
	fmt.Fprintf(&sb, "cell: number of CPIs that see it; blank: all %d; '.': fewer than %d (missed)\n\n", len(b.Spec.PRIs), b.M)
	for i := len(b.Rates) - 1; i >= 0; i-- {
		fmt.Fprintf(&sb, "%8s |", u.Number(QRate, b.Rates[i], 1))
		for j := range b.Ranges {
			sb.WriteByte(b.glyph(i, j))
		}
		sb.WriteString("|\n")
	}
	fmt.Fprintf(&sb, "\n%s\n", RunningEngine())
	_, err := io.WriteString(w, sb.String())
	return err
}

func (b *BlindZoneMap) glyph(i, j int) byte {
	n := b.Seen(i, j)
	switch {
	case n == len(b.Spec.PRIs):
		return ' '
	case n < b.M:
		return '.'
	case n > 9:
		return '+'
	}
	return byte('0' + n)
}

// WriteCSV writes the engine's comment line (CSVComment), then one row
// per cell: range_m, range_rate_mps, cpis_seen,
// eclipsed_in and blind_in (CPI numbers from 1, separated by spaces), and
// detected (M-of-N).
func (b *BlindZoneMap) WriteCSV(w io.Writer) error {
	var sb strings.Builder
	sb.WriteString(CSVComment())
	sb.WriteString("range_m,range_rate_mps,cpis_seen,eclipsed_in,blind_in,detected\n")
	list := func(m uint32) string {
		var p []string
		for k := range b.Spec.PRIs {
			if m&(1<<k) != 0 {
				p = append(p, fmt.Sprint(k+1))
			}
		}
		return strings.Join(p, " ")
	}
	for i, v := range b.Rates {
		for j, r := range b.Ranges {
			n := b.Seen(i, j)
			fmt.Fprintf(&sb, "%.6g,%.6g,%d,%s,%s,%t\n", r, v, n, list(b.Eclipsed[i][j]), list(b.Blind[i][j]), n >= b.M)
		}
	}
	_, err := io.WriteString(w, sb.String())
	return err
}

// WriteHTML writes a self-contained page: the schedule and the map as a
// grid of coloured cells (no script, no external resource), the engine in
// its footer.
func (b *BlindZoneMap) WriteHTML(w io.Writer) error {
	var sb strings.Builder
	n := len(b.Spec.PRIs)
	sb.WriteString("<!doctype html><html lang=\"en\"><head><meta charset=\"utf-8\"><title>Blind zones</title><style>" +
		"body{font:14px system-ui,sans-serif;margin:1.5em;color:#222}table{border-collapse:collapse}td{width:6px;height:6px;padding:0}" +
		".k td{width:auto;height:auto;padding:2px 8px}th{font-weight:normal;text-align:right;padding-right:6px;font-size:11px}</style></head><body>\n")
	sb.WriteString("<h1>Blind zones of a PRF schedule</h1>\n<pre>")
	var hdr strings.Builder
	b.summary(&hdr, "", SIUnits())
	sb.WriteString(html.EscapeString(hdr.String()))
	sb.WriteString("</pre>\n")
	colour := func(seen int) string {
		if seen < b.M {
			return "#b2182b" // missed
		}
		// Lighter with more CPIs seeing it.
		f := float64(seen-b.M+1) / float64(n-b.M+1)
		g := int(120 + 100*f)
		return fmt.Sprintf("rgb(%d,%d,%d)", 250-int(150*f), g+30, 250-int(150*f))
	}
	sb.WriteString("<table class=\"k\"><tr>")
	for seen := 0; seen <= n; seen++ {
		fmt.Fprintf(&sb, "<td style=\"background:%s\">%d</td>", colour(seen), seen)
	}
	fmt.Fprintf(&sb, "</tr></table><p>Colour: CPIs that see a target (red: fewer than %d, missed). Rows: range rate (top: receding), m/s; columns: range %s … %s.</p>\n<table>",
		b.M, html.EscapeString(km(b.Spec.RangeMinM)), html.EscapeString(km(b.Spec.RangeMaxM)))
	for i := len(b.Rates) - 1; i >= 0; i-- {
		fmt.Fprintf(&sb, "<tr><th>%.0f</th>", b.Rates[i])
		for j := range b.Ranges {
			s := b.Seen(i, j)
			fmt.Fprintf(&sb, "<td style=\"background:%s\" title=\"%.0f m, %.1f m/s: %d of %d CPIs\"></td>", colour(s), b.Ranges[j], b.Rates[i], s, n)
		}
		sb.WriteString("</tr>\n")
	}
	fmt.Fprintf(&sb, "</table>\n<footer>Made with Pulsewright: <span class=\"engine\">%s</span>.</footer>\n</body></html>\n", html.EscapeString(RunningEngine().String()))
	_, err := io.WriteString(w, sb.String())
	return err
}
