package scenarios

import (
	"encoding/json"
	"math"
	"os"
	"testing"

	"github.com/pulsewright/pulsewright/dsp"
)

// Independent check of the schedule's unfolding and M-of-N rule against
// testdata/schedule/cases.json, written by testdata/schedule/gen.py from
// docs/detection.md §11 alone: ranges in exact integer arithmetic on the
// gate grid (the true range found by its own Chinese-remainder solver is
// among the candidates), range rates in floating point, and the M-of-N
// probability by enumerating every outcome.
type scheduleCases struct {
	Ranges []struct {
		PRIS        []float64 `json:"pri_s"`
		GateM       float64   `json:"gate_m"`
		ApparentM   []float64 `json:"apparent_m"`
		TrueM       float64   `json:"true_m"`
		LimitM      float64   `json:"limit_m"`
		CandidatesM []float64 `json:"candidates_m"`
	} `json:"ranges"`
	Rates []struct {
		PRIS          []float64 `json:"pri_s"`
		LambdaM       float64   `json:"lambda_m"`
		ApparentMPS   []float64 `json:"apparent_mps"`
		TolMPS        []float64 `json:"tol_mps"`
		TrueMPS       float64   `json:"true_mps"`
		LimitMPS      float64   `json:"limit_mps"`
		CandidatesMPS []float64 `json:"candidates_mps"`
	} `json:"rates"`
	MofN []struct {
		P  []float64 `json:"p"`
		M  int       `json:"m"`
		Pd float64   `json:"pd"`
	} `json:"mofn"`
}

func TestScheduleAgainstIndependentModel(t *testing.T) {
	data, err := os.ReadFile("../testdata/schedule/cases.json")
	if err != nil {
		t.Fatal(err)
	}
	var cs scheduleCases
	if err := json.Unmarshal(data, &cs); err != nil {
		t.Fatal(err)
	}
	if len(cs.Ranges) < 100 || len(cs.Rates) < 100 || len(cs.MofN) < 50 {
		t.Fatalf("cases.json holds too few cases: %d, %d, %d", len(cs.Ranges), len(cs.Rates), len(cs.MofN))
	}
	ambiguous := 0
	for i, c := range cs.Ranges {
		got, lim := unfoldRanges(c.ApparentM, c.PRIS, c.GateM)
		if math.Abs(lim-c.LimitM) > 1e-6*c.LimitM {
			t.Errorf("range case %d: limit %.3f m, model %.3f m", i, lim, c.LimitM)
		}
		if len(got) != len(c.CandidatesM) {
			t.Errorf("range case %d (PRIs %v, apparent %v): %d candidates %v, model %d %v", i, c.PRIS, c.ApparentM, len(got), got, len(c.CandidatesM), c.CandidatesM)
			continue
		}
		for k := range got {
			if math.Abs(got[k]-c.CandidatesM[k]) > 1e-6*c.GateM+1e-9*c.LimitM {
				t.Errorf("range case %d: candidate %d at %.4f m, model %.4f m", i, k, got[k], c.CandidatesM[k])
			}
		}
		if len(got) > 1 {
			ambiguous++
		}
	}
	if ambiguous == 0 || ambiguous == len(cs.Ranges) {
		t.Errorf("%d of %d range cases ambiguous: the cases do not exercise both outcomes", ambiguous, len(cs.Ranges))
	}
	for i, c := range cs.Rates {
		got, lim := unfoldRates(c.ApparentMPS, c.PRIS, c.TolMPS, c.LambdaM)
		if math.Abs(lim-c.LimitMPS) > 1e-9*c.LimitMPS {
			t.Errorf("rate case %d: limit %.6f m/s, model %.6f", i, lim, c.LimitMPS)
		}
		if len(got) != len(c.CandidatesMPS) {
			t.Errorf("rate case %d: %d candidates %v, model %d %v", i, len(got), got, len(c.CandidatesMPS), c.CandidatesMPS)
			continue
		}
		for k := range got {
			if math.Abs(got[k]-c.CandidatesMPS[k]) > 1e-6 {
				t.Errorf("rate case %d: candidate %d at %.6f m/s, model %.6f", i, k, got[k], c.CandidatesMPS[k])
			}
		}
	}
	for i, c := range cs.MofN {
		if got := dsp.AtLeast(c.P, c.M); math.Abs(got-c.Pd) > 1e-12 {
			t.Errorf("M-of-N case %d: %d of %v gives %.15g, model %.15g", i, c.M, c.P, got, c.Pd)
		}
	}
}
