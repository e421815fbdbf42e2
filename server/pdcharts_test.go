package server

import (
	"encoding/json"
	"strings"
	"testing"
)

// POST /api/v1/coverage: the Pd curves of a demo's target with the chart
// option, and clear errors for an unknown target and a bad point count.
func TestCoverageRoute(t *testing.T) {
	_, ts := mustServer(t, &fakeEval{}, nil)
	demo := mustDemoJSON(t, "harbour-skiff")
	resp, body := testRequest(t, ts, "POST", "/api/v1/coverage?target=tanker&points=30", demo)
	if resp.StatusCode != 200 {
		t.Fatalf("%d %s", resp.StatusCode, body)
	}
	var b struct {
		Coverage struct {
			Target          string
			DetectionRangeM float64 `json:"detection_range_m"`
			ByRange         []struct {
				RangeM float64 `json:"range_m"`
			} `json:"by_range"`
			BySNR []struct{ Pd float64 } `json:"by_snr"`
		}
		Option struct {
			Series []struct {
				ID   string
				Data []any
			}
			YAxis []struct{ Min, Max float64 }
		}
	}
	if err := json.Unmarshal([]byte(body), &b); err != nil {
		t.Fatal(err)
	}
	c := b.Coverage
	if c.Target != "tanker" || len(c.ByRange) < 20 || len(c.BySNR) < 50 || !(c.DetectionRangeM > 6000) {
		t.Errorf("coverage %+v", c)
	}
	ids := []string{}
	for _, s := range b.Option.Series {
		ids = append(ids, s.ID)
		if len(s.Data) < 20 {
			t.Errorf("series %s has %d points", s.ID, len(s.Data))
		}
	}
	if strings.Join(ids, ",") != "pd-snr,pd-range,pd-alone" || len(b.Option.YAxis) != 2 || b.Option.YAxis[1].Max != 1 {
		t.Errorf("series %v, y axes %+v", ids, b.Option.YAxis)
	}
	for _, tt := range []struct{ query, want string }{
		{"target=boat", `target \"boat\" is not in the scenario (targets: [tanker skiff pilot-boat])`},
		{"target=tanker&points=1", `points \"1\": want a whole number 2 … 2000`},
		{"target=tanker&points=x", `points \"x\"`},
	} {
		resp, body := testRequest(t, ts, "POST", "/api/v1/coverage?"+tt.query, demo)
		if resp.StatusCode != 400 || !strings.Contains(body, tt.want) {
			t.Errorf("%s: %d %s; want 400 and %s", tt.query, resp.StatusCode, body, tt.want)
		}
	}
}
