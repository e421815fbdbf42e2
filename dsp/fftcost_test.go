package dsp

import (
	"fmt"
	"math/rand/v2"
	"testing"
)

func BenchmarkFFTRadix(b *testing.B) {
	for _, n := range []int{16384, 32768, 19683, 15625, 4096 * 4 * 3, 1 << 18, 3 * 3 * 3 * 5 * 5 * 5 * 64} {
		x := randComplex(rand.New(rand.NewPCG(3, 3)), n)
		p, w := newFFTPlan(n), make([]complex128, n)
		b.Run(fmt.Sprint(n), func(b *testing.B) {
			for b.Loop() {
				p.transform(x, w)
			}
			b.ReportMetric(float64(b.Elapsed().Nanoseconds())/float64(b.N)/float64(n)/float64(len(p.stages)), "ns/pt/stage")
		})
	}
}
