package dsp

import (
	"fmt"
	"math/rand/v2"
	"testing"
)

// A warm FFT plan transforms without allocating, whatever its radices
// (4, 2, 3, 5 and the fused first stage).
func TestFFTAllocs(t *testing.T) {
	rnd := rand.New(rand.NewPCG(6, 6))
	for _, n := range []int{1, 8, 96, 1000, 4096, 6561, 1 << 17} {
		p := newFFTPlan(n)
		x, w, pre := randComplex(rnd, n), make([]complex128, n), randComplex(rnd, n)
		if a := testing.AllocsPerRun(5, func() { p.transform(x, w) }); a != 0 {
			t.Errorf("n=%d: %v allocs per transform, want 0", n, a)
		}
		y := make([]complex128, n)
		if a := testing.AllocsPerRun(5, func() { p.run(x, w, y, pre) }); a != 0 {
			t.Errorf("n=%d: %v allocs per fused run, want 0", n, a)
		}
	}
}

// A warm correlator plan compresses without allocating, with one worker
// and with several (the goroutines' bodies are made with the plan), at the
// sizes of bench/run among others.
func TestCorrelatorApplyAllocs(t *testing.T) {
	rnd := rand.New(rand.NewPCG(7, 7))
	for _, c := range []struct{ n, m, w int }{
		{4096, 300, 1}, {4096, 300, 2}, {20000, 100, 3}, {65536, 5000, 1}, {65536, 5000, 2},
	} {
		t.Run(fmt.Sprintf("n=%d/m=%d/w=%d", c.n, c.m, c.w), func(t *testing.T) {
			p := NewCorrelatorWorkers(randComplex(rnd, c.m), c.n, c.w)
			x, dst := randComplex(rnd, c.n), make([]complex128, c.n)
			if a := testing.AllocsPerRun(5, func() { p.Apply(dst, x) }); a != 0 {
				t.Errorf("%v allocs per Apply, want 0 (FFT length %d, %d workers)", a, p.l, len(p.scratch))
			}
		})
	}
	// The last block shared by the workers (29 blocks on 2, 1 block on 2).
	for _, c := range []struct{ n, m, l int }{{30000, 1000, 2048}, {5000, 5000, 16384}} {
		p := newCorrelatorLen(randComplex(rnd, c.m), c.n, c.l, 2)
		x, dst := randComplex(rnd, c.n), make([]complex128, c.n)
		if !p.coop {
			t.Fatalf("n=%d m=%d L=%d: the last block is not shared", c.n, c.m, c.l)
		}
		if a := testing.AllocsPerRun(5, func() { p.Apply(dst, x) }); a != 0 {
			t.Errorf("n=%d m=%d L=%d, shared last block: %v allocs per Apply, want 0", c.n, c.m, c.l, a)
		}
	}
}
