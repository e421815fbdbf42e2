package server

import (
	"context"
	"encoding/json"
	"net/http/httptest"
	"slices"
	"strings"
	"testing"

	"github.com/pulsewright/pulsewright/scenarios"
)

// floorsOption is the part of a floors chart option the tests read.
type floorsOption struct {
	Title  struct{ Text string }
	Series []struct {
		ID   string
		Name string
		Type string
		Data json.RawMessage
	}
}

// TestSessionFloors: frames carry the Floors chart only while the page
// asks for it (a floors message), whole the first time and as data-only
// merges while its structure holds; the harbour demo's view names the
// tanker (the strongest target) and marks the skiff as hidden by its
// response (the demo's story: its range sidelobes fill the skiff's CFAR
// cells), which is the engine's masked_by; the pilot boat, which masks
// itself through the CFAR, is marked with its own response.
func TestSessionFloors(t *testing.T) {
	s, err := New(Config{DataDir: t.TempDir(), SessionEvaluator: func() Evaluator { return new(scenarios.Engine).Evaluate }}, testLogger(t), scenarios.Evaluate)
	if err != nil {
		t.Fatal(err)
	}
	ts := httptest.NewServer(s.Handler())
	defer ts.Close()
	defer s.Close(context.Background())
	c := mustDial(t, ts, nil)
	demo := mustDemoJSON(t, "harbour-skiff")
	sendScenario(t, c, 1, demo)
	if m := next(t, c, 1); m.Type != MsgFrame || m.Charts[ChartFloors].Option != nil {
		t.Fatalf("frame without a floors request: %s, charts %v", m.Type, keysOf(m))
	}
	send(t, c, MsgFloors, 2, `,"floors":{"target":""}`)
	m := next(t, c, 2)
	ch, ok := m.Charts[ChartFloors]
	if !ok || !ch.Replace {
		t.Fatalf("floors requested: charts %v", keysOf(m))
	}
	var opt floorsOption
	if err := json.Unmarshal(ch.Option, &opt); err != nil {
		t.Fatal(err)
	}
	var ids []string
	for _, s := range opt.Series {
		ids = append(ids, s.ID)
	}
	for _, want := range []string{"floor-response", "floor-others", "floor-thermal", "floor-threshold", "marks-response", "marks-own"} {
		if !slices.Contains(ids, want) {
			t.Errorf("series %v lack %s", ids, want)
		}
	}
	if !strings.Contains(opt.Title.Text, "tanker") {
		t.Errorf("title %+v does not name the tanker", opt.Title)
	}
	for _, s := range opt.Series {
		if s.ID != "marks-response" {
			continue
		}
		var items []struct {
			ID, Floor, Status string
			Hidden            bool
		}
		if err := json.Unmarshal(s.Data, &items); err != nil {
			t.Fatal(err)
		}
		found := false
		for _, it := range items {
			if it.ID == "skiff" {
				found = it.Hidden && it.Status == scenarios.StatusMasked
			}
		}
		if !found {
			t.Errorf("skiff's mark %+v, want hidden by the tanker's response", items)
		}
	}
	// Another edit of the same structure: a data-only merge.
	sendScenario(t, c, 3, strings.Replace(demo, `"rcs_dbsm":5`, `"rcs_dbsm":6`, 1))
	if m := next(t, c, 3); !hasMerge(m, ChartFloors) {
		t.Errorf("edit: floors chart %+v, want a data-only merge", m.Charts[ChartFloors].Replace)
	}
	// The tab hidden: no floors chart.
	send(t, c, MsgFloors, 4, `,"floors":null`)
	if m := next(t, c, 4); m.Charts[ChartFloors].Option != nil {
		t.Errorf("floors after null: %v", keysOf(m))
	}
	// An unknown target falls back to the strongest; a huge id is refused.
	send(t, c, MsgFloors, 5, `,"floors":{"target":"nobody"}`)
	if m := next(t, c, 5); m.Charts[ChartFloors].Option == nil {
		t.Errorf("unknown target: no floors chart")
	}
	send(t, c, MsgFloors, 6, `,"floors":{"target":"`+strings.Repeat("x", 300)+`"}`)
	if m := next(t, c, 6); m.Type != MsgError || !strings.Contains(m.Error, "at most 256 bytes") {
		t.Errorf("long id: %s %q", m.Type, m.Error)
	}
}

func hasMerge(m testMsg, name string) bool {
	ch, ok := m.Charts[name]
	return ok && !ch.Replace && ch.Option != nil
}

func keysOf(m testMsg) []string {
	var out []string
	for k := range m.Charts {
		out = append(out, k)
	}
	slices.Sort(out)
	return out
}

// TestMaskWords: the profile's masking label names the impairment the
// reason names (the Floors tab and the label agree).
func TestMaskWords(t *testing.T) {
	for _, c := range []struct{ reason, id, want string }{
		{"Masked by tanker's phase-noise skirt (its echo's …", "tanker", "'s phase-noise skirt masks "},
		{"Masked by tanker's I/Q image (image rejection …", "tanker", "'s I/Q image masks "},
		{"Masked by tanker through the CA-CFAR: …", "tanker", "'s response masks "},
		{"Masked by tank's phase-noise skirt", "tanker", "'s response masks "},
		{"", "tanker", "'s response masks "},
	} {
		if got := maskWords(c.reason, c.id); got != c.want {
			t.Errorf("maskWords(%q, %q) = %q, want %q", c.reason, c.id, got, c.want)
		}
	}
}
