package server

import (
	"context"
	"encoding/json"
	"fmt"
	"math"
	"net/http/httptest"
	"reflect"
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

// markItemRef is a mark's data item as a map, encoded by encoding/json:
// the reference appendMarkItem, which encodes by hand without
// allocating, must agree with.
func markItemRef(m scenarios.FloorMark, f *scenarios.Floors) map[string]any {
	st, ok := statusStyle[m.Status]
	if !ok {
		st = statusStyle[scenarios.StatusTooWeak]
	}
	colour := floorStyle[m.Floor].colour
	style := map[string]any{"color": colour, "borderColor": colour, "borderWidth": 1.5}
	symbol := strings.TrimPrefix(st.symbol, "empty")
	if !m.Hidden {
		style["color"] = "#ffffff"
		symbol = st.symbol
	}
	var tip string
	words := strings.ReplaceAll(m.Status, "_", " ")
	switch {
	case m.Hidden && m.Floor == scenarios.FloorThermal:
		tip = fmt.Sprintf("%s: %s, its peak %.1f dB is too weak for thermal noise", m.ID, words, m.PeakDB)
	case m.Hidden && m.Floor == scenarios.FloorOwn:
		tip = fmt.Sprintf("%s: %s by its own response, which fills the detector's training cells (its peak %.1f dB)", m.ID, words, m.PeakDB)
	case m.Hidden && m.Floor == scenarios.FloorOthers && m.Source != "":
		tip = fmt.Sprintf("%s: %s, hidden by %s (%.1f dB at its cell; its peak %.1f dB)", m.ID, words, m.Source, m.FloorDB, m.PeakDB)
	case m.Hidden && m.Floor == scenarios.FloorQuantise, m.Hidden && m.Floor == scenarios.FloorDC:
		tip = fmt.Sprintf("%s: %s, hidden by the %s (%.1f dB at its cell; its peak %.1f dB)", m.ID, words, floorWords[m.Floor], m.FloorDB, m.PeakDB)
	case m.Hidden:
		tip = fmt.Sprintf("%s: %s, hidden by %s's %s (%.1f dB at its cell; its peak %.1f dB)", m.ID, words, f.Target, floorWords[m.Floor], m.FloorDB, m.PeakDB)
	default:
		tip = fmt.Sprintf("%s: %s, its peak %.1f dB over the highest floor at its cell, %s at %.1f dB", m.ID, words, m.PeakDB, floorWords[m.Floor], m.FloorDB)
	}
	if f.Row >= 0 && !m.OnRow {
		tip += fmt.Sprintf(" — at %+.1f m/s, off the plotted row (its floor is read on its own row)", m.RateMPS)
		style["opacity"] = 0.45
	}
	return map[string]any{
		"value": []float64{round2(m.RangeM), math.Round(clampDB(m.PeakDB)*100) / 100},
		"name":  m.ID, "id": m.ID, "status": m.Status, "floor": m.Floor, "hidden": m.Hidden,
		"symbol": symbol, "itemStyle": style, "tip": tip,
	}
}

// TestMarkItemMatchesJSON: the Floors marks encoded by hand decode to the
// same values as encoding/json's encoding of the same items as maps, for
// every mark of every demo's Floors view and for made-up marks through
// every tooltip sentence, off the map row or on it, with names that need
// escaping, negative zero, NaN-free extremes and a rate of either sign.
func TestMarkItemMatchesJSON(t *testing.T) {
	demos, err := scenarios.Demos()
	if err != nil {
		t.Fatal(err)
	}
	check := func(what string, m scenarios.FloorMark, f *scenarios.Floors) {
		t.Helper()
		var got, want any
		b := appendMarkItem(nil, m, f)
		if err := json.Unmarshal(b, &got); err != nil {
			t.Fatalf("%s: %s is not JSON: %v", what, b, err)
		}
		w, _ := json.Marshal(markItemRef(m, f))
		json.Unmarshal(w, &want)
		if !reflect.DeepEqual(got, want) {
			t.Errorf("%s:\n got %s\nwant %s", what, b, w)
		}
	}
	n := 0
	for _, d := range demos {
		res, err := scenarios.Evaluate(context.Background(), d.Scenario)
		if err != nil {
			t.Fatal(err)
		}
		f, err := res.Floors("", "")
		if err != nil {
			t.Fatal(err)
		}
		for _, m := range f.Marks {
			check(d.Name+" "+m.ID, m, f)
			n++
		}
	}
	if n < 5 {
		t.Errorf("only %d marks in the demos' Floors views", n)
	}
	f := &scenarios.Floors{Target: `tank"er<&>`, Row: 2}
	floors := []string{scenarios.FloorThermal, scenarios.FloorOwn, scenarios.FloorOthers, scenarios.FloorQuantise, scenarios.FloorDC,
		scenarios.FloorResponse, scenarios.FloorSkirt, scenarios.FloorImage, "unknown"}
	for _, fl := range floors {
		for _, hidden := range []bool{true, false} {
			for _, onRow := range []bool{true, false} {
				for _, src := range []string{"", "pilot\\boat\u2028"} {
					m := scenarios.FloorMark{ID: "sk\"iff\t", RangeM: 1234.5678, PeakDB: -0.04, Status: "too_weak", Floor: fl, FloorDB: 17.25,
						Hidden: hidden, Source: src, OnRow: onRow, RateMPS: -0.04}
					check(fmt.Sprintf("%s hidden %v on row %v source %q", fl, hidden, onRow, src), m, f)
					m.RateMPS, m.PeakDB, m.RangeM, m.Status = 12.35, 1e6, 2.5e6, "out_of_window"
					check(fmt.Sprintf("%s hidden %v on row %v source %q (2)", fl, hidden, onRow, src), m, f)
				}
			}
		}
	}
}
