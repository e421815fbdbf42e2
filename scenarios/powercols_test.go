package scenarios

import (
	"context"
	"math"
	"math/rand"
	"testing"
)

// TestPowerColumnsMatchSum checks that the ring of scene-power columns
// the clutter analysis reads its detector's training cells from returns
// the sum over the scene's objects bit for bit, whatever order the cells
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
	}
	if tested == 0 {
		t.Fatal("no demo with a pulse train")
	}
}
