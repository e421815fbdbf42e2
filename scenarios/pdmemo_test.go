package scenarios

import (
	"bytes"
	"context"
	"encoding/json"
	"math/rand"
	"reflect"
	"slices"
	"testing"

	"github.com/pulsewright/pulsewright/dsp"
)

// randomEdit returns s (canonical JSON) with a few of the edits a user
// makes on the page: a target moved or made stronger or weaker, its
// fluctuation changed, the detector's Pfa, kind or required Pd changed. It
// returns nil when the edit made the scenario invalid.
func randomEdit(t *testing.T, r *rand.Rand, raw []byte) []byte {
	t.Helper()
	var m map[string]any
	if err := json.Unmarshal(raw, &m); err != nil {
		t.Fatal(err)
	}
	targets, _ := m["targets"].([]any)
	for range 1 + r.Intn(2) {
		if len(targets) == 0 {
			break
		}
		tg := targets[r.Intn(len(targets))].(map[string]any)
		switch r.Intn(4) {
		case 0, 1:
			if v, ok := tg["range_m"].(float64); ok {
				tg["range_m"] = v + float64(r.Intn(41)-20)*1.7
			}
		case 2:
			if v, ok := tg["rcs_dbsm"].(float64); ok {
				tg["rcs_dbsm"] = v + float64(r.Intn(13)-6)/2
			}
		case 3:
			if tg["kind"] == TargetPoint {
				tg["fluctuation"] = []string{"none", "swerling1", "swerling2", "swerling3", "swerling4"}[r.Intn(5)]
			}
		}
	}
	rx, _ := m["receiver"].(map[string]any)
	if rx == nil {
		rx = map[string]any{}
		m["receiver"] = rx
	}
	det, _ := rx["detector"].(map[string]any)
	if det == nil {
		det = map[string]any{"kind": "ca_cfar", "pfa": 1e-6}
		rx["detector"] = det
	}
	switch r.Intn(6) {
	case 0:
		det["pfa"] = []float64{1e-4, 1e-6, 1e-8}[r.Intn(3)]
	case 1:
		det["kind"] = []string{"fixed", "ca_cfar", "os_cfar"}[r.Intn(3)]
		delete(det, "rank")
		delete(det, "censored_cells")
	case 2:
		det["pd_required"] = []float64{0.5, 0.8, 0.9, 0.99}[r.Intn(4)]
	}
	out, err := json.Marshal(m)
	if err != nil {
		t.Fatal(err)
	}
	if _, err := Decode(out); err != nil {
		return nil
	}
	return out
}

// TestPdMemoMatchesFresh: an Engine that keeps detection probabilities
// across evaluations (pdmemo.go) reports exactly, bit for bit, what an
// evaluation without the memo reports, over random sequences of edits to
// every demo (a target dragged or changed, the detector changed), and
// after the memo has turned over its generations.
func TestPdMemoMatchesFresh(t *testing.T) {
	if testing.Short() {
		t.Skip("evaluates demos")
	}
	demos, err := Demos()
	if err != nil {
		t.Fatal(err)
	}
	ctx := context.Background()
	r := rand.New(rand.NewSource(13))
	steps := 6
	type start struct {
		name string
		raw  []byte
	}
	var starts []start
	for _, d := range demos {
		raw, err := Canonical(d.Scenario)
		if err != nil {
			t.Fatal(err)
		}
		starts = append(starts, start{d.Name, raw})
		if d.Name != "squall-line" && d.Name != "harbour-skiff" {
			continue
		}
		// The greatest-of, smallest-of and censored CFARs' Pd
		// (pdTest.variant) go through the memo too.
		for _, kind := range []string{DetectorGO, DetectorSO, DetectorCens} {
			var doc map[string]any
			if err := json.Unmarshal(raw, &doc); err != nil {
				t.Fatal(err)
			}
			rx, _ := doc["receiver"].(map[string]any)
			if rx == nil {
				rx = map[string]any{}
				doc["receiver"] = rx
			}
			rx["detector"] = map[string]any{"kind": kind, "training_cells": 32}
			b, err := json.Marshal(doc)
			if err != nil {
				t.Fatal(err)
			}
			starts = append(starts, start{d.Name + "/" + kind, b})
		}
	}
	for _, d := range starts {
		raw := d.raw
		var cached Engine
		for i := range steps {
			if i > 0 {
				if e := randomEdit(t, r, raw); e != nil {
					raw = e
				}
			}
			if i == steps-1 {
				// Turn the generations over: every entry from the
				// earlier steps moves to old, then is dropped.
				fillMemo(cached.last.memo)
				fillMemo(cached.last.memo)
			}
			s, err := Decode(raw)
			if err != nil {
				t.Fatal(err)
			}
			got, err := cached.Evaluate(ctx, s)
			if err != nil {
				t.Fatal(err)
			}
			fresh := Engine{uncached: true}
			want, err := fresh.Evaluate(ctx, s)
			if err != nil {
				t.Fatal(err)
			}
			g, _ := json.Marshal(got.Report)
			w, _ := json.Marshal(want.Report)
			if !bytes.Equal(g, w) {
				t.Fatalf("%s step %d: memoised report differs from the fresh one\nmemo:  %.400s\nfresh: %.400s\nscenario %s", d.name, i, diffAt(g, w), diffAt(w, g), raw)
			}
			if got.Report.Targets != nil && i == 0 && cached.last.memo == nil {
				t.Fatalf("%s: the engine keeps no memo", d.name)
			}
		}
	}
}

// fillMemo stores a generation's worth of unrelated entries.
func fillMemo(p *pdMemo) {
	for i := range pdMemoGen {
		p.store(pdKey{snr: -float64(i + 1)}, pdVal{})
	}
}

// diffAt returns a from a little before where it first differs from b.
func diffAt(a, b []byte) []byte {
	i := 0
	for i < len(a) && i < len(b) && a[i] == b[i] {
		i++
	}
	return a[max(0, i-100):]
}

// TestPdMemoHits: a drag of one target on a demo finds most detection
// probabilities in the memo (the other targets' Pd, every required SNR),
// and the memo stays within its bound.
func TestPdMemoHits(t *testing.T) {
	d, err := LoadDemo("harbour-skiff")
	if err != nil {
		t.Fatal(err)
	}
	var e Engine
	ctx := context.Background()
	if _, err := e.Evaluate(ctx, d.Scenario); err != nil {
		t.Fatal(err)
	}
	p := e.last.memo
	before := len(p.cur) + len(p.old)
	s := *d.Scenario
	s.Targets = append([]Target(nil), s.Targets...)
	for i := range s.Targets {
		if s.Targets[i].Kind == TargetPoint {
			s.Targets[i].RangeM += 3
			break
		}
	}
	if _, err := e.Evaluate(ctx, &s); err != nil {
		t.Fatal(err)
	}
	added := len(p.cur) + len(p.old) - before
	if before == 0 || added >= before {
		t.Errorf("moving one target added %d results to a memo of %d: want fewer than the first evaluation's", added, before)
	}
	for range 3 {
		fillMemo(p)
	}
	if n := len(p.cur) + len(p.old); n > 2*pdMemoGen {
		t.Errorf("memo holds %d results, bound %d", n, 2*pdMemoGen)
	}
}

// TestSameCFAR2DKnowsEveryField: sameCFAR2D compares every exported
// setting of dsp.CFAR2D; a new one must be added there, or the memo
// would hand out a detector of other settings.
func TestSameCFAR2DKnowsEveryField(t *testing.T) {
	typ := reflect.TypeFor[dsp.CFAR2D]()
	var names []string
	for i := range typ.NumField() {
		if f := typ.Field(i); f.IsExported() {
			names = append(names, f.Name)
		}
	}
	want := []string{"PFA", "GuardR", "TrainR", "GuardD", "TrainD", "Rank", "Variant", "Censor", "RhoR", "DopplerCov"}
	if !slices.Equal(names, want) {
		t.Errorf("dsp.CFAR2D's exported fields are %v; sameCFAR2D compares %v", names, want)
	}
	a := &dsp.CFAR2D{PFA: 1e-6, TrainR: 16, RhoR: []complex128{1, 0.5}}
	b := *a
	b.RhoR = []complex128{1, 0.25}
	var p pdMemo
	if p.cfar2(a) != a || p.cfar2(&b) != &b || p.cfar2(&dsp.CFAR2D{PFA: 1e-6, TrainR: 16, RhoR: []complex128{1, 0.5}}) != a {
		t.Error("the memo does not tell detectors apart by their noise correlation, or does not keep them")
	}
}
