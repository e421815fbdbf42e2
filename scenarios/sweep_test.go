package scenarios

import (
	"context"
	"encoding/json"
	"errors"
	"fmt"
	"math"
	"strings"
	"testing"
)

func taylorGrid(t *testing.T) *Grid {
	t.Helper()
	kind, err := ParseAxis("receiver.window.kind=taylor")
	if err != nil {
		t.Fatal(err)
	}
	sll, err := ParseAxis("receiver.window.sidelobe_db=-20:-45:-5")
	if err != nil {
		t.Fatal(err)
	}
	return &Grid{Base: demoScenario(t, "harbour-skiff"), Axes: []Axis{kind, sll}}
}

func targetByID(r *Report, id string) *TargetReport {
	for i := range r.Targets {
		if r.Targets[i].ID == id {
			return &r.Targets[i]
		}
	}
	return nil
}

// TestSweepTaylorUnmasksSkiff: the skiff sits 300 m beyond a tanker
// about 29 dB stronger, and with no weighting the tanker's sidelobes in
// the skiff's CFAR training cells mask it (the demo's notes). Its own SNR
// barely changes with the window (only the mismatch loss, below 1.4 dB
// here), so lowering the Taylor design level must turn it from masked to
// detected. The crossing point is our computation; the mismatch losses are
// checked against the Taylor window's SNR loss computed with
// scipy.signal.windows.taylor (N = 4096; no published table was at hand).
func TestSweepTaylorUnmasksSkiff(t *testing.T) {
	g := taylorGrid(t)
	if g.Len() != 6 {
		t.Fatalf("len %d, want 6", g.Len())
	}
	var got []Point
	err := g.Run(context.Background(), 2, func(p Point) error {
		got = append(got, p)
		return nil
	})
	if err != nil {
		t.Fatal(err)
	}
	if len(got) != 6 {
		t.Fatalf("%d points", len(got))
	}
	for i, p := range got {
		if p.Index != i {
			t.Fatalf("point %d emitted at position %d", p.Index, i)
		}
		sk := targetByID(p.Report, "skiff")
		t.Logf("sll %s: skiff %s margin %.2f dB, pslr %.2f, loss %.2f", g.Axes[1].Label(p.Values[1]), sk.Status, *sk.ThresholdMarginDB, pslrOf(p.Report.Waveform), p.Report.Waveform.MismatchLossDB)
	}
	first, last := targetByID(got[0].Report, "skiff"), targetByID(got[5].Report, "skiff")
	if first.Status != StatusMasked || last.Status != StatusDetected {
		t.Errorf("skiff %s at −20 dB and %s at −45 dB; want masked then detected", first.Status, last.Status)
	}
	// scipy.signal.windows.taylor, N = 4096: n̄ 5 at −30 dB loses 0.679 dB, at −35 dB 0.926 dB
	// (N = 4096; the pulse here has 400 samples, hence 0.02 dB).
	for _, c := range []struct {
		i    int
		loss float64
	}{{2, 0.679}, {3, 0.926}} {
		if got := got[c.i].Report.Waveform.MismatchLossDB; math.Abs(got-c.loss) > 0.02 {
			t.Errorf("%s dB: mismatch loss %.3f dB, want %.3f", g.Axes[1].Label(c.i), got, c.loss)
		}
	}
	// Lower design sidelobes give a lower PSLR and a larger mismatch loss
	// (the Taylor window's loss grows with the design level: Farnett &
	// Stevens in Skolnik, Radar Handbook, 2nd ed. 1990, ch. 10, from memory).
	for i := 1; i < len(got); i++ {
		a, b := got[i-1].Report.Waveform, got[i].Report.Waveform
		if !(pslrOf(b) < pslrOf(a)) || !(b.MismatchLossDB > a.MismatchLossDB) {
			t.Errorf("point %d: pslr %.2f → %.2f, loss %.3f → %.3f; want both to move", i, pslrOf(a), pslrOf(b), a.MismatchLossDB, b.MismatchLossDB)
		}
	}
}

func TestSweepSequentialEqualsParallel(t *testing.T) {
	g := taylorGrid(t)
	var seq, par []float64
	for _, run := range []struct {
		w   int
		dst *[]float64
	}{{1, &seq}, {3, &par}} {
		if err := g.Run(context.Background(), run.w, func(p Point) error {
			*run.dst = append(*run.dst, *targetByID(p.Report, "skiff").ThresholdMarginDB)
			return nil
		}); err != nil {
			t.Fatal(err)
		}
	}
	for i := range seq {
		if seq[i] != par[i] {
			t.Errorf("point %d: %v sequential, %v parallel", i, seq[i], par[i])
		}
	}
}

// TestSweepCancelKeepsPrefix cancels after the second point: the points
// emitted are exactly 0, 1 (and any completed in order before the stop),
// and Run reports the cancellation.
func TestSweepCancelKeepsPrefix(t *testing.T) {
	g := taylorGrid(t)
	ctx, cancel := context.WithCancel(context.Background())
	defer cancel()
	var idx []int
	err := g.Run(ctx, 2, func(p Point) error {
		idx = append(idx, p.Index)
		if len(idx) == 2 {
			cancel()
		}
		return nil
	})
	if !errors.Is(err, context.Canceled) {
		t.Fatalf("error %v, want context.Canceled", err)
	}
	if len(idx) < 2 || len(idx) == g.Len() {
		t.Fatalf("emitted %v", idx)
	}
	for i, k := range idx {
		if k != i {
			t.Fatalf("emitted %v, not a prefix in order", idx)
		}
	}
}

func TestSweepInvalidPoint(t *testing.T) {
	a, _ := ParseAxis("targets[skiff].rcs_dbsm=90:110:10")
	g := &Grid{Base: demoScenario(t, "harbour-skiff"), Axes: []Axis{a}}
	err := g.Run(context.Background(), 2, func(Point) error { t.Error("emitted"); return nil })
	if !errors.Is(err, ErrInvalid) {
		t.Fatalf("error %v", err)
	}
	t.Log(err)
}

// BenchmarkSweep runs 24 points of the harbour scene (the skiff's range)
// on 1 and 2 workers: each worker's Engine reuses the waveform and the
// reference between points.
func BenchmarkSweep(b *testing.B) {
	d, err := LoadDemo("harbour-skiff")
	if err != nil {
		b.Fatal(err)
	}
	a, err := ParseAxis("targets[skiff].range_m=6100:6560:20")
	if err != nil {
		b.Fatal(err)
	}
	g := &Grid{Base: d.Scenario, Axes: []Axis{a}}
	for _, w := range []int{1, 2} {
		b.Run(fmt.Sprintf("workers=%d", w), func(b *testing.B) {
			b.ReportAllocs()
			for b.Loop() {
				if err := g.Run(context.Background(), w, func(Point) error { return nil }); err != nil {
					b.Fatal(err)
				}
			}
			b.ReportMetric(float64(b.Elapsed().Nanoseconds())/float64(b.N)/float64(g.Len())/1e6, "ms/point")
		})
	}
}

// TestGridCountOverflow: products that overflow int are refused, never
// wrapped to a small or negative count.
func TestGridCountOverflow(t *testing.T) {
	axis := func(n int) Axis {
		return Axis{Path: "seed", Values: make([]json.RawMessage, n)}
	}
	for _, lens := range [][]int{{65536, 65536, 65536, 65536}, {65536, 65536, 65536, 65536, 3}, {1 << 16, 1 << 16}, {100001}, {400, 251}} {
		g := &Grid{}
		for _, n := range lens {
			g.Axes = append(g.Axes, axis(n))
		}
		n, err := g.Count()
		if err == nil || !errors.Is(err, ErrInvalid) || !strings.Contains(err.Error(), "over the limit") {
			t.Errorf("%v: count %d, err %v; want refused", lens, n, err)
		}
		if g.Len() != -1 {
			t.Errorf("%v: Len %d, want -1", lens, g.Len())
		}
	}
	g := &Grid{Axes: []Axis{axis(400), axis(250)}}
	if n, err := g.Count(); n != 100000 || err != nil {
		t.Errorf("400 × 250: %d, %v", n, err)
	}
}
