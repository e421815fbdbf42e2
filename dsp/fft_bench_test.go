package dsp

import (
	"fmt"
	"math/rand/v2"
	"testing"
)

// BenchmarkFFTRadix reports the time per point and stage by length and
// radix: the figures behind the correlator's cost model (correlate.go).
func BenchmarkFFTRadix(b *testing.B) {
	for _, n := range []int{1024, 2048, 4096, 8192, 16384, 65536, 1 << 18, 1 << 20, 19683, 15625, 1215, 1280} {
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
