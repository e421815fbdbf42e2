package dsp

import (
	"math"
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

// TestWedgeAccept: the ziggurat's wedge test without math.Exp against the
// test with it (math/rand/v2's form), at the boundary: for v across the
// wedges' range, l = float32(math.Exp(v)) and the 40 float32 values either
// side of it; and expBound within its stated 2e-8 of math.Exp over
// −9 … 0.
func TestWedgeAccept(t *testing.T) {
	r := rand.New(rand.NewPCG(11, 12))
	worst := 0.0
	for range 200_000 {
		v := -9 * r.Float64()
		if d := math.Abs(expBound(v)/math.Exp(v) - 1); d > worst {
			worst = d
		}
		if v < -6 {
			continue
		}
		e := float32(math.Exp(v))
		l := e
		for range 40 {
			l = math.Nextafter32(l, 0)
		}
		for range 81 {
			if got, want := wedgeAccept(l, v), l < float32(math.Exp(v)); got != want {
				t.Fatalf("v %v, l %v (float32(e^v) %v): %v, want %v", v, l, e, got, want)
			}
			l = math.Nextafter32(l, 2)
		}
	}
	for _, v := range []float64{0, math.Copysign(0, -1), -0.5 * math.Ln2, -math.Ln2, -9} {
		if d := math.Abs(expBound(v)/math.Exp(v) - 1); d > worst {
			worst = d
		}
	}
	if worst > 2e-8 {
		t.Errorf("expBound's relative error %.3g, stated 2e-8", worst)
	}
	t.Logf("expBound's largest relative error %.3g", worst)
}
