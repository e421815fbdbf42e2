package server

import (
	"encoding/json"
	"math"
	"testing"

	"github.com/pulsewright/pulsewright/scenarios"
)

const staggerDoc = `{"version": 2, "name": "stagger chart", "radar": {"carrier_hz": 9.5e9, "pulses": 24, "pri_stagger_s": [100e-6, 125e-6],
  "window_start_m": 2000, "schedule": {"cpis": [{"pri_s": 1.1e-4}, {"pri_stagger_s": [1.25e-4, 1.5e-4]}]}},
  "waveform": {"kind": "barker", "length": 13, "chip_s": 1e-6}, "receiver": {"mti": "two_pulse"},
  "targets": [{"id": "a", "kind": "point", "range_m": 9000, "rcs_dbsm": 5, "range_rate_mps": -157.8}]}`

// TestVelocityChart: one curve per staggered CPI (CPI 1 and CPI 3), each
// ending at 1.25 × the largest first blind speed λ/(2Δ) = 631.1 m/s
// (both have Δ = 25 µs), the blind speed marked on each, every value
// finite and at least the floor; a uniform scenario has no chart, and
// its key costs nothing.
func TestVelocityChart(t *testing.T) {
	sc, err := scenarios.Decode([]byte(staggerDoc))
	if err != nil {
		t.Fatal(err)
	}
	c, ok := velocityChart(sc)
	if !ok || c.name != ChartVelocity || !c.static {
		t.Fatalf("chart %q ok %v", c.name, ok)
	}
	var opt struct {
		Series []struct {
			ID       string       `json:"id"`
			Data     [][2]float64 `json:"data"`
			MarkLine struct {
				Data []map[string]any `json:"data"`
			} `json:"markLine"`
		} `json:"series"`
	}
	if err := json.Unmarshal(c.option, &opt); err != nil {
		t.Fatal(err)
	}
	if len(opt.Series) != 2 || opt.Series[0].ID != "velocity1" || opt.Series[1].ID != "velocity3" {
		t.Fatalf("series %+v", opt.Series)
	}
	for _, s := range opt.Series {
		if n := len(s.Data); n != velocityPoints || math.Abs(s.Data[n-1][0]-1.25*631.142) > 0.01 {
			t.Errorf("%s: %d points ending at %v", s.ID, n, s.Data[n-1])
		}
		for _, p := range s.Data {
			if math.IsNaN(p[1]) || p[1] < velocityFloorDB {
				t.Fatalf("%s: point %v", s.ID, p)
			}
		}
		if x := s.MarkLine.Data[0]["xAxis"].(float64); math.Abs(x-631.142) > 0.01 {
			t.Errorf("%s: blind speed marked at %v", s.ID, x)
		}
	}
	uni := sc
	uni.Radar.PRIStaggerS = nil
	uni.Radar.Schedule = nil
	if _, ok := velocityChart(uni); ok || velocityKey(uni) != "" {
		t.Error("a uniform scenario has a velocity chart")
	}
	if a := testing.AllocsPerRun(100, func() { velocityKey(uni) }); a != 0 {
		t.Errorf("velocityKey of a uniform scenario allocates %v times", a)
	}
}
