package scenarios

import (
	"crypto/sha256"
	"fmt"
	"math"

	"github.com/pulsewright/pulsewright/dsp"
)

// TrialConfidence is the confidence level of the intervals of a trial
// summary.
const TrialConfidence = 0.95

// TrialSummary is the result of a Monte Carlo run: each target's empirical
// Pd with its exact binomial interval beside the analytic Pd, and the
// false alarms of the noise-only cells against the expected number
// (docs/detection-probability.md §8, "Output").
type TrialSummary struct {
	Scenario string `json:"scenario"`
	// ScenarioHash is "sha256:" and the hexadecimal SHA-256 of the
	// scenario's canonical JSON: runs to be added must share it.
	ScenarioHash string  `json:"scenario_hash"`
	Seed         int64   `json:"seed"`
	FirstTrial   int     `json:"first_trial"`
	Trials       int     `json:"trials"`
	Requested    int     `json:"trials_requested"`
	Complete     bool    `json:"complete"`
	Interval     string  `json:"interval"`   // "clopper-pearson"
	Confidence   float64 `json:"confidence"` // 0.95
	Pfa          float64 `json:"pfa"`
	PdRequired   float64 `json:"pd_required"`
	// RandomPhase: each trial drew the point echoes' carrier phases.
	RandomPhase bool `json:"random_phase,omitempty"`

	Targets     []TrialTarget    `json:"targets"`
	FalseAlarms TrialFalseAlarms `json:"false_alarms"`
	Counts      TrialCounts      `json:"counts"`
	Engine      *EngineInfo      `json:"engine,omitempty"`
}

// TrialTarget is one target's line of a trial summary. Figures that do
// not apply are left out: the empirical ones for a target with no cell to
// test (outside the window, no echo) or no trial run, the analytic ones
// where the report has no Pd.
type TrialTarget struct {
	ID         string   `json:"id"`
	Status     string   `json:"status"`                   // the report's status
	TestedM    *float64 `json:"tested_range_m,omitempty"` // range of the tested cell, m
	TestedSNR  *float64 `json:"tested_snr_db,omitempty"`  // the target's own noise-free SNR there, dB
	Detections int64    `json:"detections"`
	Pd         *float64 `json:"pd,omitempty"`      // empirical, detections / trials
	PdLow      *float64 `json:"pd_low,omitempty"`  // interval bounds
	PdHigh     *float64 `json:"pd_high,omitempty"` //
	PdAnalytic *float64 `json:"pd_analytic,omitempty"`
	// Inside says whether pd_analytic lies inside [pd_low, pd_high].
	Inside *bool `json:"analytic_inside,omitempty"`
}

// TrialFalseAlarms counts threshold crossings of the noise-only cells.
type TrialFalseAlarms struct {
	Count    int64    `json:"count"`
	Cells    int64    `json:"cells"`               // noise-only cells tested over all trials
	Expected float64  `json:"expected"`            // pfa × cells
	Rate     *float64 `json:"rate,omitempty"`      // count / cells
	RateLow  *float64 `json:"rate_low,omitempty"`  // interval bounds of the rate
	RateHigh *float64 `json:"rate_high,omitempty"` //
	// Inside says whether pfa lies inside [rate_low, rate_high].
	Inside *bool `json:"pfa_inside,omitempty"`
}

// Summarise turns the counts of a run of t into a summary; requested is
// the number of trials asked for (the run may have stopped early).
func (t *Trials) Summarise(c TrialCounts, requested int) TrialSummary {
	d := t.s.Receiver.Detector
	s := TrialSummary{
		Scenario: t.s.Name, Seed: t.s.Seed, FirstTrial: c.First, Trials: c.Trials, Requested: requested,
		Complete: c.Trials >= requested, Interval: "clopper-pearson", Confidence: TrialConfidence,
		Pfa: d.PFA, PdRequired: d.PdRequired, Counts: c, RandomPhase: t.randomPhase,
	}
	if b, err := Canonical(t.s); err == nil {
		s.ScenarioHash = fmt.Sprintf("sha256:%x", sha256.Sum256(b))
	}
	for j, r := range t.report.Targets {
		tt := TrialTarget{ID: r.ID, Status: r.Status, PdAnalytic: r.Pd}
		if j < len(c.Detections) {
			tt.Detections = c.Detections[j]
		}
		if rm, ok := t.TestedGate(j); ok {
			tt.TestedM = &rm
			if db, ok := t.TestedSNRDB(j); ok && !math.IsInf(db, 0) {
				tt.TestedSNR = &db
			}
			if c.Trials > 0 {
				p := float64(tt.Detections) / float64(c.Trials)
				lo, hi := dsp.ClopperPearson(tt.Detections, int64(c.Trials), TrialConfidence)
				tt.Pd, tt.PdLow, tt.PdHigh = &p, &lo, &hi
				if r.Pd != nil {
					in := *r.Pd >= lo && *r.Pd <= hi
					tt.Inside = &in
				}
			}
		}
		s.Targets = append(s.Targets, tt)
	}
	fa := TrialFalseAlarms{Count: c.FalseAlarms, Cells: c.NoiseCells, Expected: d.PFA * float64(c.NoiseCells)}
	if c.NoiseCells > 0 {
		r := float64(c.FalseAlarms) / float64(c.NoiseCells)
		lo, hi := dsp.ClopperPearson(c.FalseAlarms, c.NoiseCells, TrialConfidence)
		in := d.PFA >= lo && d.PFA <= hi
		fa.Rate, fa.RateLow, fa.RateHigh, fa.Inside = &r, &lo, &hi, &in
	}
	if math.IsInf(fa.Expected, 0) || math.IsNaN(fa.Expected) {
		fa.Expected = 0
	}
	s.FalseAlarms = fa
	return s
}
