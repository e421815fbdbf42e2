//go:build !amd64 || purego

package dsp

// Without the amd64 kernels (other architectures, or -tags purego) every
// plan runs the pure Go kernels of fftconv.go.

func simdAvailable() bool { return false }

func fwd4AVX(dst, src *complex128, tw *[3]complex128, q, cnt, nseg int) {
	panic("dsp: no simd kernels in this build")
}

func inv4AVX(dst, src *complex128, tw *[3]complex128, q, cnt, nseg int) {
	panic("dsp: no simd kernels in this build")
}

func bottom4AVX(x, spec *complex128, n int) { panic("dsp: no simd kernels in this build") }

func fwd4TopAVX(dst, src, w *complex128, q, cnt int) { panic("dsp: no simd kernels in this build") }

func inv4TopAVX(dst, src, w *complex128, q, cnt int) { panic("dsp: no simd kernels in this build") }
