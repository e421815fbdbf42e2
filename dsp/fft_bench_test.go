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

// BenchmarkConvolve times one block of the correlator's power-of-two
// plan (forward levels, spectral product, inverse levels) by length,
// with the process's CPU time per block beside the wall time (cpu-ns/op:
// steadier than the wall time on a shared machine), on the pure Go and
// (where the processor has them) the SIMD kernels.
func BenchmarkConvolve(b *testing.B) {
	for _, n := range []int{4096, 16384, 65536, 1 << 18} {
		rnd := rand.New(rand.NewPCG(3, 3))
		x, spec := randComplex(rnd, n), randComplex(rnd, n)
		for i := range spec {
			spec[i] /= complex(float64(n), 0) // keep the repeated products bounded
		}
		p, buf, dst := newConvPlan(n), make([]complex128, n), make([]complex128, n)
		for _, simd := range convKernels() {
			p.simd = simd
			b.Run(fmt.Sprintf("%s/%d", kernelName(simd), n), func(b *testing.B) {
				c0 := processCPU()
				for b.Loop() {
					p.convolve(dst, x, buf, spec)
				}
				b.ReportMetric(float64((processCPU()-c0).Nanoseconds())/float64(b.N), "cpu-ns/op")
			})
		}
	}
}

// BenchmarkCorrelatorLen times the correlator at the sizes of bench/run
// with its block length forced, one and two workers, with the process's
// CPU time per Apply: the measurements behind bestBlockLen's choice.
func BenchmarkCorrelatorLen(b *testing.B) {
	for _, c := range []struct {
		n, m int
		ls   []int
	}{
		{65536, 5000, []int{8192, 12288, 15360, 16384, 20480, 32768}},
		{1048576, 50000, []int{131072, 196608, 262144, 327680, 524288}},
	} {
		rnd := rand.New(rand.NewPCG(3, 3))
		h, x, dst := randComplex(rnd, c.m), randComplex(rnd, c.n), make([]complex128, c.n)
		for _, l := range c.ls {
			for _, w := range []int{1, 2} {
				b.Run(fmt.Sprintf("n=%d/m=%d/L=%d/w=%d", c.n, c.m, l, w), func(b *testing.B) {
					p := newCorrelatorLen(h, c.n, l, w)
					c0 := processCPU()
					for b.Loop() {
						p.Apply(dst, x)
					}
					b.ReportMetric(float64((processCPU()-c0).Nanoseconds())/float64(b.N), "cpu-ns/op")
					b.ReportMetric(float64((c.n+p.step-1)/p.step), "blocks")
				})
			}
		}
	}
}

// BenchmarkCorrelatorCold builds the plan and applies it once, as
// bench/run's cold case does, two workers.
func BenchmarkCorrelatorCold(b *testing.B) {
	for _, c := range []struct{ n, m int }{{65536, 5000}, {1048576, 50000}} {
		rnd := rand.New(rand.NewPCG(3, 3))
		h, x, dst := randComplex(rnd, c.m), randComplex(rnd, c.n), make([]complex128, c.n)
		b.Run(fmt.Sprintf("n=%d/m=%d", c.n, c.m), func(b *testing.B) {
			c0 := processCPU()
			for b.Loop() {
				NewCorrelatorWorkers(h, c.n, 2).Apply(dst, x)
			}
			b.ReportMetric(float64((processCPU()-c0).Nanoseconds())/float64(b.N), "cpu-ns/op")
		})
	}
}
