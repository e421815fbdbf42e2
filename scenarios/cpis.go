package scenarios

import (
	"context"
	"fmt"
	"math"
	"slices"
	"sort"
	"strings"

	"github.com/pulsewright/pulsewright/dsp"
)

// ScheduleReport is the evaluation of every CPI of a PRF schedule and
// their combination (docs/report-format.md, "PRF schedules"; added in
// version 2). The report's targets and plots are those of the first CPI.
type ScheduleReport struct {
	N int `json:"n"` // CPIs
	M int `json:"m"` // CPIs that must detect a target
	// UnambiguousRangeM is the schedule's combined unambiguous range
	// c·lcm(PRI_i)/2, omitted when the PRIs have no common grid.
	UnambiguousRangeM *float64 `json:"unambiguous_range_m,omitempty"`
	// FirstBlindSpeedMPS is the first range rate blind in every CPI,
	// λ/(2Δ), omitted when a CPI has no Doppler processing or the PRIs no
	// common grid.
	FirstBlindSpeedMPS *float64         `json:"first_blind_speed_mps,omitempty"`
	CPIs               []CPIReport      `json:"cpis"`
	Targets            []ScheduleTarget `json:"targets"`
}

// CPIReport is one CPI of a schedule.
type CPIReport struct {
	PRIS   float64 `json:"pri_s"`
	Pulses int     `json:"pulses"`
	// PRIStaggerS: a staggered CPI's PRIs (pri_s is then the shortest),
	// and MeanPRIS their mean (added in version 2).
	PRIStaggerS       []float64   `json:"pri_stagger_s,omitempty"`
	MeanPRIS          *float64    `json:"mean_pri_s,omitempty"`
	UnambiguousRangeM float64     `json:"unambiguous_range_m"`
	BlindSpeedMPS     float64     `json:"blind_speed_mps"` // λ/(2·PRI); a stagger's λ/(2Δ)
	Targets           []CPITarget `json:"targets"`
	Warnings          []string    `json:"warnings"`
}

// CPITarget is one target as one CPI sees it. An echo folded from
// beyond the CPI's unambiguous range is judged where it appears.
type CPITarget struct {
	ID       string   `json:"id"`
	Status   string   `json:"status"`
	Detected bool     `json:"detected"`
	MarginDB *float64 `json:"margin_db,omitempty"`
	Pd       *float64 `json:"pd,omitempty"`
	// ApparentRangeM is the range gate where its echo peaks (point
	// targets inside the window): the folded range, moved by range–Doppler
	// coupling.
	ApparentRangeM       *float64 `json:"apparent_range_m,omitempty"`
	Folds                int      `json:"folds"`
	ApparentRangeRateMPS *float64 `json:"apparent_range_rate_mps,omitempty"` // CPIs of more than one pulse: the Doppler bin's range rate
	BlindSpeed           *bool    `json:"blind_speed,omitempty"`
	Reason               string   `json:"reason"`
	// cancelledBy names the MTI canceller that removes it in this CPI
	// ("two-pulse MTI canceller"; docs/detection.md §6 step 3), "" when
	// none does. Not in the report format: its reason says so.
	cancelledBy string
}

// CancelledBy returns the MTI canceller that removes t in its CPI, a
// zero-Doppler point target whose status is too_weak for that reason
// ("two-pulse MTI canceller"), or "" when no canceller removes it.
func (t CPITarget) CancelledBy() string { return t.cancelledBy }

// CPIStatusWords says in a few words how target t fares in its CPI, for a
// schedule's summary: "detected", "eclipsed", "at a blind speed",
// "cancelled by the two-pulse MTI canceller" (rather than "too weak": the
// canceller, not its SNR, loses it).
func CPIStatusWords(t CPITarget) string {
	switch {
	case t.cancelledBy != "":
		return "cancelled by the " + t.cancelledBy
	case !t.Detected && t.BlindSpeed != nil && *t.BlindSpeed:
		return "at a blind speed"
	}
	return strings.ReplaceAll(t.Status, "_", " ")
}

// cancellerWords names the MTI canceller of receiver.mti mti:
// "two-pulse MTI canceller".
func cancellerWords(mti string) string {
	if mti == MTIThreePulse {
		return "three-pulse MTI canceller"
	}
	return "two-pulse MTI canceller"
}

// ScheduleTarget is one target's combined verdict.
type ScheduleTarget struct {
	ID         string `json:"id"`
	DetectedIn int    `json:"detected_in"` // CPIs that detect it
	Detected   bool   `json:"detected"`    // detected_in ≥ m
	// Pd is the probability that at least m CPIs detect it, each CPI
	// with its own Pd and independent of the others; omitted when a CPI
	// has no Pd.
	Pd *float64 `json:"pd,omitempty"`
	// RangeResolved: the apparent ranges of the detecting CPIs unfold to
	// one range within the combined unambiguous range (RangeM).
	RangeResolved bool     `json:"range_resolved"`
	RangeM        *float64 `json:"range_m,omitempty"`
	// RangeUnambiguousM is the combined unambiguous range of the CPIs
	// that detect it (two or more): its range unfolds within [0, this).
	RangeUnambiguousM *float64 `json:"range_unambiguous_m,omitempty"`
	// RangeRateResolved: the apparent range rates unfold to one range
	// rate (RangeRateMPS).
	RangeRateResolved bool     `json:"range_rate_resolved"`
	RangeRateMPS      *float64 `json:"range_rate_mps,omitempty"`
	// RangeRateUnambiguousMPS: the range rates unfold within ± this, half
	// the first speed blind in every CPI of more than one pulse that
	// detects it (two or more), at most 10⁴ m/s.
	RangeRateUnambiguousMPS *float64 `json:"range_rate_unambiguous_mps,omitempty"`
	Reason                  string   `json:"reason"`
}

// ScheduleMaps fills in res.CPISeries, the range–Doppler series of every
// CPI of more than one pulse of a scenario with radar.schedule, res being
// Evaluate's result for s (the first CPI's series are res.Series). The
// maps cost a pulse-train simulation per CPI, so Evaluate leaves them to
// callers that show them. A scenario without a schedule leaves res as it
// is.
func ScheduleMaps(ctx context.Context, s *Scenario, res *Result) error {
	if s.Radar.Schedule == nil {
		return nil
	}
	out := make([]*Series, s.Radar.Schedule.N())
	if res.Series.RangeDoppler != nil {
		out[0] = &res.Series
	}
	var prev *model
	for k := 1; k < len(out); k++ {
		t := s.cpiScenario(k)
		if t.Radar.Pulses <= 1 {
			continue
		}
		m, err := newModel(t, prev)
		if err != nil {
			return fmt.Errorf("CPI %d: %w", k+1, err)
		}
		prev = m
		sc, err := newScene(ctx, m)
		if err != nil {
			return err
		}
		ser, err := sc.train.series(ctx)
		if err != nil {
			return err
		}
		out[k] = &ser
	}
	res.CPISeries = out
	return nil
}

// maxUnfoldRangeM bounds the unfolding of ranges for PRIs without a
// common grid: the format's largest target range.
const maxUnfoldRangeM = 1e8

// evalSchedule evaluates every CPI of a scenario with a schedule. base is
// the model of the first CPI (its pulse and reference are reused).
func evalSchedule(ctx context.Context, s *Scenario, base *model) (*ScheduleReport, error) {
	sched := s.Radar.Schedule
	n := sched.N()
	rep := &ScheduleReport{N: n, M: sched.M}
	lambda := s.Radar.Wavelength()
	pris := make([]float64, n)
	var gridPRIs, rangePRIs []float64 // every PRI of every CPI; the uniform CPIs' PRIs
	type seen struct {
		apparent, rate float64
		hasRate        bool
		rateTol        float64
	}
	obs := make([][]*seen, len(s.Targets))  // obs[j][k]: CPI k's measurement of target j, nil when not detected
	detected := make([]int, len(s.Targets)) // CPIs that detect target j
	pds := make([][]float64, len(s.Targets))
	pdOK := make([]bool, len(s.Targets))
	for j := range pdOK {
		obs[j] = make([]*seen, n)
		pdOK[j] = true
	}
	allDoppler := true
	for k := range n {
		if err := ctx.Err(); err != nil {
			return nil, err
		}
		t := s.cpiScenario(k)
		r := t.Radar
		pris[k] = r.PRIS
		gridPRIs = append(gridPRIs, r.pattern()...)
		if !r.Staggered() {
			rangePRIs = append(rangePRIs, r.PRIS)
		}
		allDoppler = allDoppler && r.Pulses > 1
		m, err := newModel(t, base)
		if err != nil {
			return nil, fmt.Errorf("CPI %d: %w", k+1, err)
		}
		sc, err := newScene(ctx, m)
		if err != nil {
			return nil, err
		}
		// A point echo folded from beyond the CPI's unambiguous range is
		// judged where it appears in the window, as a detection at its
		// apparent range that the schedule then unfolds: the scene forgets
		// the fold while it judges.
		folds := make([]int, len(sc.targets))
		for j, g := range sc.targets {
			if folds[j] = g.folds; g.t.Kind == TargetPoint {
				g.folds = 0
			}
		}
		trs := sc.targetReports(ctx, m, false)
		if err := ctx.Err(); err != nil {
			return nil, err
		}
		cr := CPIReport{PRIS: r.PRIS, Pulses: r.Pulses, UnambiguousRangeM: dsp.UnambiguousRange(r.PRIS), BlindSpeedMPS: dsp.BlindSpeed(r.PRIS, lambda),
			Warnings: append([]string{}, m.warnings...)}
		if r.Staggered() {
			mean := r.slowPRI()
			cr.PRIStaggerS, cr.MeanPRIS = r.PRIStaggerS, &mean
			cr.BlindSpeedMPS = staggerBlindSpeed(r.PRIStaggerS, lambda)
		}
		gate := C / (2 * m.fs)
		for j, tr := range trs {
			g := sc.targets[j]
			ct := CPITarget{ID: tr.ID, Status: tr.Status, Detected: tr.Status == StatusDetected, MarginDB: tr.MarginDB, Pd: tr.Pd,
				BlindSpeed: tr.BlindSpeed, Reason: tr.Reason}
			if tr.cancelled {
				ct.cancelledBy = cancellerWords(t.Receiver.MTI)
			}
			if g.t.Kind == TargetPoint {
				ct.Folds = folds[j]
				if a := g.apparent + tr.RangeShiftM; a >= r.WindowStartM && a <= r.WindowStopM {
					// The gate the echo peaks in: the measured range.
					q := r.WindowStartM + gate*math.Round((a-r.WindowStartM)/gate)
					ct.ApparentRangeM = &q
				}
				if ct.Folds > 0 {
					ct.Reason += fmt.Sprintf(" Its echo from %s folds %d time(s) by the %s unambiguous range.", km(g.rangeM), ct.Folds, km(m.unambM))
				}
			}
			var rt *float64
			var rateTol float64
			if sc.train != nil && tr.ApparentRangeRateMPS != nil {
				// The Doppler bin's range rate: the measured one.
				nb := float64(sc.train.plan.Bins())
				w := lambda / (2 * r.slowPRI() * nb)
				q := tidy(w * math.Round(*tr.ApparentRangeRateMPS/w))
				rt, rateTol = &q, w/2
				ct.ApparentRangeRateMPS = rt
			}
			if tr.Pd == nil {
				pdOK[j] = false
			} else {
				pds[j] = append(pds[j], *tr.Pd)
			}
			if ct.Detected {
				detected[j]++
			}
			// A staggered CPI's measurements are not unfolded: its folded
			// echoes land at a different range in each sweep, and its
			// Doppler bins do not fold by one PRF (detection.md §16).
			if ct.Detected && ct.ApparentRangeM != nil && !r.Staggered() {
				o := &seen{apparent: *ct.ApparentRangeM, rateTol: rateTol}
				if rt != nil {
					o.rate, o.hasRate = *rt, true
				}
				obs[j][k] = o
			}
			cr.Targets = append(cr.Targets, ct)
		}
		rep.CPIs = append(rep.CPIs, cr)
	}
	if len(rangePRIs) > 0 {
		if ru := dsp.NewSchedule(rangePRIs...).UnambiguousRange(); !math.IsInf(ru, 0) {
			rep.UnambiguousRangeM = &ru
		}
	}
	if v := dsp.NewSchedule(gridPRIs...).FirstBlindSpeed(lambda); allDoppler && !math.IsInf(v, 0) {
		rep.FirstBlindSpeedMPS = &v
	}
	gate := C / (2 * base.fs)
	for j, t := range s.Targets {
		st := ScheduleTarget{ID: t.ID}
		var ranges, rpris, rates, vpris, vtols []float64
		var where []string
		for k, o := range obs[j] {
			if o == nil {
				continue
			}
			ranges = append(ranges, o.apparent)
			rpris = append(rpris, pris[k])
			where = append(where, fmt.Sprintf("%s in CPI %d", km(o.apparent), k+1))
			if o.hasRate {
				rates = append(rates, o.rate)
				vpris = append(vpris, pris[k])
				vtols = append(vtols, o.rateTol)
			}
		}
		st.DetectedIn = detected[j]
		st.Detected = st.DetectedIn >= sched.M
		if pdOK[j] && len(pds[j]) == n {
			p := dsp.AtLeast(pds[j], sched.M)
			st.Pd = &p
		}
		if t.IsClutter() {
			st.Reason = "Clutter, not a target: no CPI detects it as one; it enters every CPI's scene and may mask the targets there."
			rep.Targets = append(rep.Targets, st)
			continue
		}
		var why []string
		missed := lostIn(rep.CPIs, j)
		verdict := fmt.Sprintf("%d of %d CPIs detect it, %d-of-%d %s", st.DetectedIn, n, sched.M, n, map[bool]string{true: "detects it", false: "misses it"}[st.Detected])
		if missed != "" {
			verdict += " (" + missed + ")"
		}
		why = append(why, verdict+".")
		var stag []string
		for k, c := range rep.CPIs {
			if c.PRIStaggerS != nil && c.Targets[j].Detected {
				stag = append(stag, fmt.Sprint(k+1))
			}
		}
		if t.Kind == TargetPoint && len(stag) > 0 {
			why = append(why, fmt.Sprintf("Staggered CPI %s counts towards %d-of-%d but is not unfolded (its folded echoes land at a different range in each sweep).", strings.Join(stag, ", "), sched.M, n))
		}
		if t.Kind == TargetPoint && len(ranges) == 1 {
			why = append(why, fmt.Sprintf("One CPI alone cannot resolve its range (%s, folded by multiples of %s) or its range rate.", where[0], km(dsp.UnambiguousRange(rpris[0]))))
		}
		if t.Kind == TargetPoint && len(ranges) > 1 {
			// Within the combined unambiguous range of the CPIs that
			// detect it; each measured range lies within half a gate of
			// the echo's peak, so two agree within a gate.
			c, lim := unfoldRanges(ranges, rpris, gate)
			st.RangeUnambiguousM = &lim
			if len(c) == 1 {
				st.RangeResolved, st.RangeM = true, &c[0]
				why = append(why, fmt.Sprintf("Its range unfolds to %s from %s (unambiguous together up to %s).", km(c[0]), strings.Join(where, ", "), km(lim)))
			} else {
				why = append(why, fmt.Sprintf("Its range is not resolved: %s %s.", strings.Join(where, ", "), candidateWords(len(where), len(c), "range", "below "+km(lim))))
			}
		}
		if t.Kind == TargetPoint && len(rates) > 1 {
			v, lim := unfoldRates(rates, vpris, vtols, lambda)
			st.RangeRateUnambiguousMPS = &lim
			if len(v) == 1 {
				st.RangeRateResolved, st.RangeRateMPS = true, &v[0]
				why = append(why, fmt.Sprintf("Its range rate unfolds to %.1f m/s (unambiguous together within ±%.0f m/s).", v[0], lim))
			} else {
				why = append(why, fmt.Sprintf("Its range rate is not resolved: %s.", candidateWords(len(rates), len(v), "range rate", fmt.Sprintf("within ±%.0f m/s", lim))))
			}
		}
		st.Reason = strings.Join(why, " ")
		rep.Targets = append(rep.Targets, st)
	}
	return rep, nil
}

// unfoldRanges returns the ranges (m) that fold to every measured
// apparent range (m, on gates of gate m) with the PRIs (s) of the CPIs
// that measured them, within one gate (and 10⁻⁹ of it for rounding), in
// [0, lim): lim is their
// combined unambiguous range, at most maxUnfoldRangeM (docs/detection.md
// §11).
func unfoldRanges(apparent, pris []float64, gate float64) (candidates []float64, lim float64) {
	lim = math.Min(dsp.NewSchedule(pris...).UnambiguousRange(), maxUnfoldRangeM)
	periods := make([]float64, len(pris))
	for i, p := range pris {
		periods[i] = dsp.UnambiguousRange(p)
	}
	// A gate plus rounding: two measurements a whole gate apart agree.
	c := dsp.Unfold(apparent, periods, 0, lim, gate*(1+1e-9), false)
	// [0, lim): a candidate at lim is the one at 0 again.
	for len(c) > 0 && c[len(c)-1] >= lim-gate/2 {
		c = c[:len(c)-1]
	}
	return c, lim
}

// unfoldRates returns the range rates (m/s) that fold to every measured
// apparent range rate (m/s, each within tols[i] of the truth) with the
// PRIs (s) that measured them, within the sum of the two largest tols, in
// [−lim, lim]: lim is half their first common blind speed λ/(2Δ), at most
// maxRangeRate.
func unfoldRates(apparent, pris, tols []float64, lambda float64) (candidates []float64, lim float64) {
	lim = math.Min(dsp.NewSchedule(pris...).FirstBlindSpeed(lambda)/2, maxRangeRate)
	periods := make([]float64, len(pris))
	for i, p := range pris {
		periods[i] = dsp.BlindSpeed(p, lambda)
	}
	t := slices.Clone(tols)
	sort.Float64s(t)
	tol := t[len(t)-1]
	if len(t) > 1 {
		tol += t[len(t)-2]
	}
	return dsp.Unfold(apparent, periods, -lim, lim, tol, true), lim
}

// maxRangeRate is the format's largest range rate, m/s: velocities unfold
// within ±maxRangeRate at most.
const maxRangeRate = 1e4

// candidateWords says how many values the measurements (count of them)
// fit: "fits 15 ranges below 269.81 km".
func candidateWords(measurements, n int, what, within string) string {
	verb := "fit"
	if measurements == 1 {
		verb = "fits"
	}
	w := ""
	if within != "" {
		w = " " + within
	}
	if n == 0 {
		return fmt.Sprintf("%s no single %s%s (the measurements disagree)", verb, what, w)
	}
	return fmt.Sprintf("%s %d %ss%s", verb, n, what, w)
}

// lostIn names the CPIs that do not detect target j and why, in a few
// words: "CPI 2 eclipsed, CPI 3 at a blind speed, CPI 4 cancelled by the
// two-pulse MTI canceller".
func lostIn(cpis []CPIReport, j int) string {
	var out []string
	for k, c := range cpis {
		t := c.Targets[j]
		if t.Detected {
			continue
		}
		out = append(out, fmt.Sprintf("CPI %d %s", k+1, CPIStatusWords(t)))
	}
	return strings.Join(out, ", ")
}
