package server

import (
	"context"
	"encoding/json"
	"math"
	"strings"
	"testing"

	"github.com/pulsewright/pulsewright/scenarios"
)

type labelledProfile struct {
	Series []struct {
		ID       string          `json:"id"`
		Data     json.RawMessage `json:"data"`
		EndLabel map[string]any  `json:"endLabel"`
		MarkArea struct {
			Data [][2]map[string]any `json:"data"`
		} `json:"markArea"`
	} `json:"series"`
}

func demoProfile(t *testing.T, name string) (*scenarios.Result, labelledProfile) {
	t.Helper()
	d, err := scenarios.LoadDemo(name)
	if err != nil {
		t.Fatal(err)
	}
	res, err := scenarios.Evaluate(context.Background(), d.Scenario)
	if err != nil {
		t.Fatal(err)
	}
	var opt labelledProfile
	if err := json.Unmarshal(profileChart(res, nil, view{width: 1200}).option, &opt); err != nil {
		t.Fatal(err)
	}
	return res, opt
}

// The harbour scene's skiff is masked by the tanker (the demo's story):
// the masking series draws one labelled segment from the tanker's peak to
// the skiff, and every marker carries its target's name.
func TestProfileLabelsMasking(t *testing.T) {
	res, opt := demoProfile(t, "harbour-skiff")
	var skiff scenarios.TargetReport
	for _, tr := range res.Report.Targets {
		if tr.ID == "skiff" {
			skiff = tr
		}
	}
	if skiff.Status != scenarios.StatusMasked || skiff.MaskedBy != "tanker" {
		t.Fatalf("skiff is %s by %q; the demo's story needs it masked by the tanker", skiff.Status, skiff.MaskedBy)
	}
	found := map[string]bool{}
	for _, se := range opt.Series {
		found[se.ID] = true
		switch se.ID {
		case SeriesThreshold:
			if se.EndLabel["formatter"] != "threshold" {
				t.Errorf("threshold end label %v", se.EndLabel)
			}
		case SeriesMasking:
			var items []maskingItem
			if err := json.Unmarshal(se.Data, &items); err != nil || len(items) != 2 {
				t.Fatalf("masking data %s (%v)", se.Data, err)
			}
			if x := items[0].Value[0].(float64); math.Abs(x-6000) > 0.01 {
				t.Errorf("masking segment starts at %g m, want the tanker at 6000 m", x)
			}
			if f, _ := items[1].Label["formatter"].(string); f != "tanker's response masks skiff" {
				t.Errorf("masking label %q", f)
			}
		case SeriesMarkers:
			var marks []marker
			json.Unmarshal(se.Data, &marks)
			for _, m := range marks {
				if m.Name != m.ID || m.Name == "" {
					t.Errorf("marker %q named %q", m.ID, m.Name)
				}
			}
		}
	}
	if !found[SeriesMasking] || found[SeriesBlind] {
		t.Errorf("series %v: want masking, and no blind range (the window starts at 3.5 km, beyond c·τ/2 = 3 km)", found)
	}
}

// The long pulse (120 µs) is blind to c·τ/2 = 17 987.5 m: the shaded area
// spans the window's start to there.
func TestProfileLabelsBlindRange(t *testing.T) {
	_, opt := demoProfile(t, "long-pulse-blind")
	for _, se := range opt.Series {
		if se.ID != SeriesBlind {
			continue
		}
		if len(se.MarkArea.Data) != 1 {
			t.Fatalf("blind mark area %v", se.MarkArea.Data)
		}
		end := se.MarkArea.Data[0][1]["xAxis"].(float64)
		if want := 299792458 * 1.2e-4 / 2; math.Abs(end-want) > 0.01 {
			t.Errorf("blind range shaded to %g m, want c·τ/2 = %g m", end, want)
		}
		return
	}
	t.Error("no blind range series")
}

func TestPlainLabel(t *testing.T) {
	if got := plainLabel("{a}|b"); strings.ContainsAny(got, "{}|") {
		t.Errorf("plainLabel kept markup: %q", got)
	}
}

// The Response plot opens on the main lobe and its near sidelobes, not on
// the whole ±τ span, and carries every sample there.
func TestResponseOpensNearMainLobe(t *testing.T) {
	res, _ := demoProfile(t, "harbour-skiff")
	var opt struct {
		DataZoom []map[string]any `json:"dataZoom"`
		Series   []struct {
			Data [][2]float64 `json:"data"`
		} `json:"series"`
	}
	if err := json.Unmarshal(responseChart(res, nil, view{width: 600}).option, &opt); err != nil {
		t.Fatal(err)
	}
	w := res.Report.Waveform.Mainlobe3dBM
	for _, z := range opt.DataZoom {
		a, b := z["startValue"].(float64), z["endValue"].(float64)
		if math.Abs(b-responseNearLobes*w) > 0.01 || math.Abs(a+b) > 0.01 {
			t.Errorf("%s zoom [%g, %g] m, want ±%d main-lobe widths (%g m)", z["type"], a, b, responseNearLobes, w)
		}
	}
	inside := 0
	for _, p := range opt.Series[0].Data {
		if math.Abs(p[0]) <= responseNearLobes*w {
			inside++
		}
	}
	step := res.Series.Response.RangeM[1] - res.Series.Response.RangeM[0]
	if want := int(2 * responseNearLobes * w / step); inside < want-2 {
		t.Errorf("%d points near the main lobe, want every sample (%d)", inside, want)
	}
}
