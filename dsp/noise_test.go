package dsp

import (
	"math/rand/v2"
	"testing"
)

// TestAddComplexNormalIsComplexNormal: the fast generator against the
// reference it replaces, Go's standard library (math/rand/v2 PCG and
// NormFloat64 through ComplexNormal): every sample equal to the last bit,
// over enough draws (4 M normals) that the ziggurat's tail and wedge
// paths (about 1 % of draws) are taken tens of thousands of times, and
// the stream continues identically afterwards.
func TestAddComplexNormalIsComplexNormal(t *testing.T) {
	for seed := range uint64(8) {
		a, b := rand.NewPCG(seed*7919+1, seed^0x4e01), rand.NewPCG(seed*7919+1, seed^0x4e01)
		r := rand.New(b)
		for _, n := range []int{0, 1, 3, 1000, 250_000} {
			x := make([]complex128, n)
			want := make([]complex128, n)
			for i := range x {
				x[i] = complex(float64(i), -1)
				want[i] = x[i] + ComplexNormal(r)
			}
			AddComplexNormal(x, a)
			for i := range x {
				if x[i] != want[i] {
					t.Fatalf("seed %d, n %d: sample %d is %v, math/rand/v2 gives %v", seed, n, i, x[i], want[i])
				}
			}
		}
		if ga, gb := a.Uint64(), r.Uint64(); ga != gb {
			t.Fatalf("seed %d: stream continues with %#x, math/rand/v2 with %#x", seed, ga, gb)
		}
	}
}

func TestAddComplexNormalAllocs(t *testing.T) {
	x := make([]complex128, 1024)
	src := rand.NewPCG(1, 2)
	if a := testing.AllocsPerRun(20, func() { AddComplexNormal(x, src) }); a != 0 {
		t.Errorf("%v allocations per call, want 0", a)
	}
}

// BenchmarkComplexNoise: the fast generator against ComplexNormal over
// rand.Rand, 1024 samples (2048 normals) per op.
func BenchmarkComplexNoise(b *testing.B) {
	x := make([]complex128, 1024)
	b.Run("AddComplexNormal", func(b *testing.B) {
		src := rand.NewPCG(1, 2)
		for b.Loop() {
			AddComplexNormal(x, src)
		}
	})
	b.Run("ComplexNormal", func(b *testing.B) {
		r := rand.New(rand.NewPCG(1, 2))
		for b.Loop() {
			for i := range x {
				x[i] += ComplexNormal(r)
			}
		}
	})
}
