package scenarios

import (
	"bytes"
	"context"
	"encoding/gob"
	"encoding/json"
	"math/rand"
	"reflect"
	"slices"
	"testing"

	"github.com/pulsewright/pulsewright/dsp"
)

// frameEdit returns raw (canonical JSON) with one or two of the edits a
// user makes while dragging or nudging on the page: a target's range
// moved by a fraction of a metre or by many cells, its RCS nudged by
// ±1 dB (the wheel), its range rate changed; now and then the receive
// window, the taper, the pulse or the detector changed. It returns nil
// when the edit made the scenario invalid.
func frameEdit(t *testing.T, r *rand.Rand, raw []byte) []byte {
	t.Helper()
	var m map[string]any
	if err := json.Unmarshal(raw, &m); err != nil {
		t.Fatal(err)
	}
	obj := func(parent map[string]any, key string) map[string]any {
		o, _ := parent[key].(map[string]any)
		if o == nil {
			o = map[string]any{}
			parent[key] = o
		}
		return o
	}
	targets, _ := m["targets"].([]any)
	for range 1 + r.Intn(2) {
		if len(targets) == 0 {
			break
		}
		tg := targets[r.Intn(len(targets))].(map[string]any)
		switch r.Intn(5) {
		case 0:
			if v, ok := tg["range_m"].(float64); ok {
				tg["range_m"] = v + 0.25*float64(r.Intn(9)-4)
			}
		case 1:
			if v, ok := tg["range_m"].(float64); ok {
				tg["range_m"] = v + float64(r.Intn(41)-20)*7.3
			}
		case 2:
			if v, ok := tg["rcs_dbsm"].(float64); ok {
				tg["rcs_dbsm"] = v + float64(2*r.Intn(2)-1)
			}
		case 3:
			if tg["kind"] == TargetPoint {
				v, _ := tg["range_rate_mps"].(float64)
				tg["range_rate_mps"] = v + float64(r.Intn(21)-10)*3.1
			}
		case 4:
			if v, ok := tg["range_start_m"].(float64); ok {
				tg["range_start_m"] = v + float64(r.Intn(9)-4)*2.5
			}
		}
	}
	rx := obj(m, "receiver")
	switch r.Intn(10) {
	case 0:
		rx["window"] = map[string]any{"kind": []string{"none", "hann", "hamming", "taylor", "blackman"}[r.Intn(5)]}
	case 1:
		w := obj(m, "waveform")
		if v, ok := w["pulse_width_s"].(float64); ok {
			w["pulse_width_s"] = v * []float64{0.8, 1.25}[r.Intn(2)]
		}
	case 2:
		w := obj(m, "waveform")
		if v, ok := w["bandwidth_hz"].(float64); ok {
			w["bandwidth_hz"] = v * []float64{0.8, 1.25}[r.Intn(2)]
		}
	case 3:
		rd := obj(m, "radar")
		if a, ok := rd["window_start_m"].(float64); ok {
			rd["window_start_m"] = a + float64(r.Intn(21)-10)*15
		}
	case 4:
		det := obj(rx, "detector")
		det["pfa"] = []float64{1e-4, 1e-6, 1e-8}[r.Intn(3)]
	case 5:
		det := obj(rx, "detector")
		det["kind"] = []string{"fixed", "ca_cfar", "os_cfar", "go_cfar", "so_cfar"}[r.Intn(5)]
		delete(det, "rank")
		delete(det, "censored_cells")
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

// resultBytes encodes a result's report (JSON, as the server sends it)
// and its plot series (gob: every float bit for bit, NaN included).
func resultBytes(t *testing.T, res *Result) ([]byte, []byte) {
	t.Helper()
	rep, err := json.Marshal(res.Report)
	if err != nil {
		t.Fatal(err)
	}
	var ser bytes.Buffer
	if err := gob.NewEncoder(&ser).Encode(res.Series); err != nil {
		t.Fatal(err)
	}
	return rep, ser.Bytes()
}

// TestReuseMatchesFresh: an Engine that keeps work across evaluations
// (the detectors with their solved multipliers, the local compression
// plans, the density convolutions: reuse.go; and the detection
// probabilities, pdmemo.go) gives exactly, byte for byte, the report and
// the plot series of a fresh evaluation that keeps nothing, over random
// sequences of frame edits to every demo: targets dragged by a quarter
// metre or moved by many cells, RCS nudged by ±1 dB, range rates, the
// receive window, the taper, the pulse and the detector changed.
func TestReuseMatchesFresh(t *testing.T) {
	if testing.Short() {
		t.Skip("evaluates demos")
	}
	ctx := context.Background()
	r := rand.New(rand.NewSource(20))
	steps := 10
	for _, name := range demoNames() {
		d, err := LoadDemo(name)
		if err != nil {
			t.Fatal(err)
		}
		raw, err := Canonical(d.Scenario)
		if err != nil {
			t.Fatal(err)
		}
		var reusing Engine
		for i := range steps {
			if i > 0 {
				if e := frameEdit(t, r, raw); e != nil {
					raw = e
				}
			}
			s, err := Decode(raw)
			if err != nil {
				t.Fatal(err)
			}
			got, err := reusing.Evaluate(ctx, s)
			if err != nil {
				t.Fatal(err)
			}
			fresh := Engine{uncached: true}
			want, err := fresh.Evaluate(ctx, s)
			if err != nil {
				t.Fatal(err)
			}
			gr, gs := resultBytes(t, got)
			wr, ws := resultBytes(t, want)
			if !bytes.Equal(gr, wr) {
				t.Fatalf("%s step %d: the reusing engine's report differs from a fresh one\nreusing: %.400s\nfresh:   %.400s\nscenario %s", name, i, diffAt(gr, wr), diffAt(wr, gr), raw)
			}
			if !bytes.Equal(gs, ws) {
				t.Fatalf("%s step %d: the reusing engine's plot series differ from a fresh one's\nscenario %s", name, i, raw)
			}
		}
		if p := reusing.last.memo; p == nil || len(p.cf1s)+len(p.plans)+len(p.convs) == 0 {
			t.Errorf("%s: the engine kept no detector, plan or convolution", name)
		}
	}
}

// TestReuseBounded: the kept detectors, plans, convolutions, clutter
// levels and threshold series stay within their bounds over many
// different scenes.
func TestReuseBounded(t *testing.T) {
	if testing.Short() {
		t.Skip("evaluates demos")
	}
	d, err := LoadDemo("rocky-coast")
	if err != nil {
		t.Fatal(err)
	}
	ctx := context.Background()
	var e Engine
	for i := range 24 {
		s := *d.Scenario
		s.Targets = slices.Clone(s.Targets)
		s.Receiver.Detector.PFA = []float64{1e-4, 1e-5, 1e-6, 1e-7, 1e-8}[i%5]
		for j := range s.Targets {
			if s.Targets[j].Kind != TargetPoint {
				s.Targets[j].RangeStartM += float64(i) * 3
			}
		}
		if _, err := e.Evaluate(ctx, &s); err != nil {
			t.Fatal(err)
		}
	}
	p := e.last.memo
	if len(p.cf1s) > cf1Kept || len(p.plans) > planKept || len(p.convs) > convKept {
		t.Errorf("memo keeps %d detector sets (bound %d), %d plans (%d), %d convolutions (%d)", len(p.cf1s), cf1Kept, len(p.plans), planKept, len(p.convs), convKept)
	}
	// A pulse train's maps: its clutter levels and threshold series.
	h, err := LoadDemo("hill-clutter-doppler")
	if err != nil {
		t.Fatal(err)
	}
	var eh Engine
	for i := range 12 {
		s := *h.Scenario
		s.Targets = slices.Clone(s.Targets)
		for j := range s.Targets {
			if s.Targets[j].Kind == TargetPoint {
				s.Targets[j].RangeM += float64(i) * 11
			}
		}
		if _, err := eh.Evaluate(ctx, &s); err != nil {
			t.Fatal(err)
		}
	}
	ph := eh.last.memo
	cells := 0
	for _, l := range ph.levels {
		cells += l.n * l.nb
	}
	spare := 0
	for _, l := range ph.spareLevels {
		spare += cap(l.pow)
		if l.users != 0 || !l.dropped || slices.Contains(ph.levels, l) {
			t.Errorf("a spare clutter analysis has %d users, dropped %v, kept %v", l.users, l.dropped, slices.Contains(ph.levels, l))
		}
	}
	if len(ph.spareLevels) > levelsSpare || cells+spare > levelsKeptCells {
		t.Errorf("memo keeps %d spare clutter analyses (bound %d) of %d cells with %d kept cells (bound %d)", len(ph.spareLevels), levelsSpare, spare, cells, levelsKeptCells)
	}
	samples := 0
	for _, b := range ph.scratch {
		samples += cap(b)
	}
	if len(ph.scratch) == 0 || len(ph.scratch) > scratchKept || samples > scratchKeptSamples {
		t.Errorf("memo keeps %d work buffers of %d samples, bounds %d and %d and at least one", len(ph.scratch), samples, scratchKept, scratchKeptSamples)
	}
	if len(ph.covs) == 0 || len(ph.covs) > covKept {
		t.Errorf("memo keeps %d noise covariances, bound %d and at least one", len(ph.covs), covKept)
	}
	for _, l := range ph.levels {
		if l.users != 0 {
			t.Errorf("a kept clutter analysis has %d users after the evaluations", l.users)
		}
	}
	pcells := 0
	for _, l := range ph.profiles {
		pcells += l.n * l.nb
	}
	if len(ph.levels) == 0 || len(ph.profiles) == 0 || len(ph.levels) > levelsKept || len(ph.profiles) > levelsKept || cells > levelsKeptCells || pcells > levelsKeptCells {
		t.Errorf("memo keeps %d clutter maps (%d cells) and %d threshold series (%d cells); bounds %d maps, %d cells, and at least one of each", len(ph.levels), cells, len(ph.profiles), pcells, levelsKept, levelsKeptCells)
	}
	total := 0
	for _, c := range p.convs {
		total += c.bytes()
	}
	if total > convKeptBytes {
		t.Errorf("kept convolutions hold %d bytes, bound %d", total, convKeptBytes)
	}
	if len(p.convs) == 0 {
		t.Error("no convolution kept: the coast's is the same in every step but for its start")
	}
}

// TestSameCFARKnowsEveryField: sameCFAR compares every exported setting
// of dsp.CFAR; a new one must be added there (and to sameDetector), or
// the memo would hand out a detector of other settings.
func TestSameCFARKnowsEveryField(t *testing.T) {
	typ := reflect.TypeFor[dsp.CFAR]()
	var names []string
	for i := range typ.NumField() {
		if f := typ.Field(i); f.IsExported() {
			names = append(names, f.Name)
		}
	}
	want := []string{"PFA", "Guard", "Train", "Rank", "Rho", "Variant", "Censor", "Pulses"}
	if !slices.Equal(names, want) {
		t.Errorf("dsp.CFAR's exported fields are %v; sameCFAR compares %v", names, want)
	}
	a := &dsp.CFAR{PFA: 1e-6, Train: 16, Rho: []complex128{1, 0.5}}
	b := *a
	b.Rho = []complex128{1, 0.25}
	var p pdMemo
	if p.cfar1(a, 0) != a || p.cfar1(&b, 0) != &b || p.cfar1(&dsp.CFAR{PFA: 1e-6, Train: 16, Rho: []complex128{1, 0.5}}, 0) != a {
		t.Error("the memo does not tell detectors apart by their noise correlation, or does not keep them")
	}
	if c := p.cfar1(a, 1); c == a || c == nil || p.cfar1(a, 1) != c || !sameCFAR(c, a) {
		t.Error("the memo's second detector of a set is not kept, or is the first")
	}
}
