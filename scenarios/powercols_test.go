package scenarios

import (
	"context"
	"math"
	"math/rand"
	"slices"
	"testing"

	"github.com/pulsewright/pulsewright/dsp"
)

// TestPowerColumnsMatchSum checks that the ring of scene-power columns
// the clutter analysis reads its detector's training cells from returns
// the sum over the scene's objects bit for bit, and the kept levels
// against noise alone the level computed afresh, whatever order the cells
// are asked in (ascending, as the analysis asks, and at random, so that
// slots are overwritten and filled again), on every demo with a pulse
// train and clutter. An identity of our own code: no outside source.
func TestPowerColumnsMatchSum(t *testing.T) {
	demos, err := Demos()
	if err != nil {
		t.Fatal(err)
	}
	tested := 0
	for _, d := range demos {
		m, err := newModel(d.Scenario, nil)
		if err != nil {
			t.Fatal(err)
		}
		sc, err := newScene(context.Background(), m)
		if err != nil {
			t.Fatal(err)
		}
		if sc.train == nil {
			continue
		}
		tested++
		cf2 := sc.train.cfar()
		nb := sc.train.plan.Bins()
		pc := newPowerColumns(sc, cf2)
		check := func(k, dd int) {
			got, want := pc.at(k, dd), sc.scenePower(k, dd)
			if math.Float64bits(got) != math.Float64bits(want) {
				t.Fatalf("%s: cell %d bin %d: column %v, sum %v", d.Name, k, dd, got, want)
			}
		}
		for k := range m.n {
			for dk := -3; dk <= 3; dk++ {
				if kk := k + dk; kk >= 0 && kk < m.n {
					check(kk, (k+dk+nb)%nb)
				}
			}
		}
		r := rand.New(rand.NewSource(1))
		for range 20000 {
			check(r.Intn(m.n), r.Intn(nb))
		}
		// The kept levels against noise alone, at every processed cell
		// in the order the analysis asks, and at random.
		nl := newNoiseLevels(sc.train, cf2)
		checkLevel := func(k, dd int) {
			got, want := nl.at(k, dd), sc.train.level(cf2, k, dd, func(int, int) float64 { return 0 })
			if math.Float64bits(got) != math.Float64bits(want) {
				t.Fatalf("%s: cell %d bin %d: kept noise level %v, afresh %v", d.Name, k, dd, got, want)
			}
		}
		for k := range m.n {
			if m.processed[k] {
				for dd := range nb {
					checkLevel(k, dd)
				}
			}
		}
		for range 5000 {
			if k := r.Intn(m.n); m.processed[k] {
				checkLevel(k, r.Intn(nb))
			}
		}
	}
	if tested == 0 {
		t.Fatal("no demo with a pulse train")
	}
}

// naiveClutter is analyseClutter on a pulse train as it was written
// before the power columns and the kept noise levels: every level from
// scratch, every training cell's power summed over the scene again.
func naiveClutter(sc *scene, cf2 *dsp.CFAR2D) ([]int, [][]int) {
	m, tr := sc.m, sc.train
	cells, gates := make([]int, len(sc.targets)), make([][]int, len(sc.targets))
	scenePow := func(k, d int) float64 {
		s := 0.0
		for i := range sc.targets {
			s += tr.power(i, k, d)
		}
		return s
	}
	for k := range m.n {
		if !m.processed[k] {
			continue
		}
		crossed := make(map[int]bool)
		for d := range tr.plan.Bins() {
			s := scenePow(k, d)
			if s <= tr.noise[d] {
				continue
			}
			j := sc.dominant(k, d)
			if j < 0 || !sc.targets[j].t.IsClutter() {
				continue
			}
			if s >= tr.level(cf2, k, d, func(int, int) float64 { return 0 }) && s >= tr.level(cf2, k, d, scenePow) {
				cells[j]++
				crossed[j] = true
			}
		}
		for j := range crossed {
			gates[j] = append(gates[j], k)
		}
	}
	return cells, gates
}

// TestClutterAnalysisMatchesNaive: the clutter breakthrough of a pulse
// train (crossing cells and gates per clutter object) is the same as the
// straightforward analysis's, on every pulse-train demo and random edits
// of it (targets moved, stronger or weaker, detector kind and Pfa).
func TestClutterAnalysisMatchesNaive(t *testing.T) {
	demos, err := Demos()
	if err != nil {
		t.Fatal(err)
	}
	r := rand.New(rand.NewSource(5))
	tested := 0
	for _, d := range demos {
		raw, err := Canonical(d.Scenario)
		if err != nil {
			t.Fatal(err)
		}
		for i := range 8 {
			if i > 0 {
				if e := randomEdit(t, r, raw); e != nil {
					raw = e
				}
			}
			s, err := Decode(raw)
			if err != nil {
				t.Fatal(err)
			}
			m, err := newModel(s, nil)
			if err != nil {
				t.Fatal(err)
			}
			sc, err := newScene(context.Background(), m)
			if err != nil {
				t.Fatal(err)
			}
			if sc.train == nil {
				break
			}
			var cf2 *dsp.CFAR2D
			if m.s.Receiver.Detector.Kind != DetectorFixed {
				cf2 = sc.train.cfar()
			}
			got := sc.analyseClutter(m.detector(), cf2)
			cells, gates := naiveClutter(sc, cf2)
			if !got.any {
				continue
			}
			tested++
			if !slices.Equal(got.cells, cells) {
				t.Errorf("%s edit %d: crossing cells %v, naive %v", d.Name, i, got.cells, cells)
			}
			for j := range gates {
				if !slices.Equal(got.gates[j], gates[j]) {
					t.Errorf("%s edit %d: target %d gates differ (%d against %d naive)", d.Name, i, j, len(got.gates[j]), len(gates[j]))
				}
			}
		}
	}
	if tested == 0 {
		t.Fatal("no pulse-train demo with clutter")
	}
}
