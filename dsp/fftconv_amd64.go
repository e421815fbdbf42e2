//go:build amd64 && !purego

package dsp

import "golang.org/x/sys/cpu"

// The AVX2/FMA kernels of the power-of-two plan (fftconv_amd64.s). Build
// with -tags purego to leave them out; plans then run the pure Go
// kernels of fftconv.go, as on other architectures.

// simdAvailable reports whether the processor and the operating system
// support the AVX2 and FMA instructions the kernels use. The answer comes
// from golang.org/x/sys/cpu, which asks CPUID (leaves 1 and 7) and XCR0
// (the YMM state saved by the OS) once per process: CPUID traps to the
// hypervisor on a virtual machine, too slow to ask for every plan.
func simdAvailable() bool { return cpu.X86.HasAVX2 && cpu.X86.HasFMA }

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
