//go:build amd64 && !purego

package dsp

// The AVX2/FMA kernels of the power-of-two plan (fftconv_amd64.s). Build
// with -tags purego to leave them out; plans then run the pure Go
// kernels of fftconv.go, as on other architectures.

func cpuid(eaxArg, ecxArg uint32) (eax, ebx, ecx, edx uint32)

func xgetbv0() (eax uint32)

// simdAvailable reports whether the processor and the operating system
// support the AVX2 and FMA instructions the kernels use.
func simdAvailable() bool { return hasAVX2FMA }

// hasAVX2FMA is a read-only fact about the machine, found once when the
// package is initialised: CPUID traps to the hypervisor on a virtual
// machine (tens of µs under load, measured in BenchmarkCorrelatorCold's
// profile), too slow to ask for every plan. Never written after
// initialisation: no state, a constant of the processor.
var hasAVX2FMA = detectAVX2FMA()

// detectAVX2FMA asks the processor (CPUID leaf 1: FMA, OSXSAVE, AVX;
// XCR0: the XMM and YMM state saved by the OS; leaf 7: AVX2).
func detectAVX2FMA() bool {
	max, _, _, _ := cpuid(0, 0)
	if max < 7 {
		return false
	}
	_, _, c1, _ := cpuid(1, 0)
	const fma, osxsave, avx = 1 << 12, 1 << 27, 1 << 28
	if c1&(fma|osxsave|avx) != fma|osxsave|avx {
		return false
	}
	if xgetbv0()&6 != 6 {
		return false
	}
	_, b7, _, _ := cpuid(7, 0)
	return b7&(1<<5) != 0
}

//go:noescape
func fwd4AVX(dst, src *complex128, tw *[3]complex128, q, cnt, nseg int)

//go:noescape
func inv4AVX(dst, src *complex128, tw *[3]complex128, q, cnt, nseg int)

//go:noescape
func bottom4AVX(x, spec *complex128, n int)

//go:noescape
func fwd4TopAVX(dst, src, w *complex128, q, cnt int)

//go:noescape
func inv4TopAVX(dst, src, w *complex128, q, cnt int)
