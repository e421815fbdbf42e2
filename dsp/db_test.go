package dsp

import (
	"math"
	"math/rand/v2"
	"testing"
)

// Source: DB (math.Log10), over powers spread across the whole exponent
// range, the table's interval edges and the special values.
func TestPowersDB(t *testing.T) {
	r := rand.New(rand.NewPCG(1, 1))
	var p []float64
	for range 20000 {
		p = append(p, math.Exp(r.Float64()*1400-700))
	}
	for i := range 1 << dbTableBits {
		m := 1 + float64(i)/(1<<dbTableBits)
		p = append(p, m, math.Nextafter(m, 0), math.Nextafter(m, 2), m*1e-30, 1)
	}
	p = append(p, 0, -1, math.SmallestNonzeroFloat64, math.MaxFloat64, math.Inf(1), math.NaN(), 0x1p-1022)
	p = append(p, 5, 5, 5, 0, 0, 7, 7, math.NaN(), math.NaN(), 5) // runs reuse the previous result
	got := PowersDB(nil, p, -300)
	for i, x := range p {
		want := math.Max(DB(x), -300)
		switch {
		case math.IsNaN(x):
			if !math.IsNaN(got[i]) {
				t.Errorf("PowersDB(NaN) = %v", got[i])
			}
		case x <= 0:
			if got[i] != -300 {
				t.Errorf("PowersDB(%v) = %v, want the floor", x, got[i])
			}
		case math.Abs(got[i]-want) > 1e-13+1e-15*math.Abs(want) && !(math.IsInf(want, 1) && math.IsInf(got[i], 1)):
			t.Fatalf("PowersDB(%v) = %.17g, DB %.17g", x, got[i], want)
		}
	}
	// In place, and the floor.
	q := []float64{1e-12, 100}
	PowersDB(q, q, -100)
	if q[0] != -100 || math.Abs(q[1]-20) > 1e-13 {
		t.Errorf("in place with floor: %v", q)
	}
}

func BenchmarkPowersDB(b *testing.B) {
	r := rand.New(rand.NewPCG(1, 1))
	p := make([]float64, 65536)
	for i := range p {
		p[i] = r.ExpFloat64() * 1e3
	}
	dst := make([]float64, len(p))
	b.Run("PowersDB", func(b *testing.B) {
		b.ReportAllocs()
		for b.Loop() {
			PowersDB(dst, p, -100)
		}
	})
	b.Run("DB", func(b *testing.B) {
		b.ReportAllocs()
		for b.Loop() {
			for i, x := range p {
				dst[i] = math.Max(DB(x), -100)
			}
		}
	})
}
