package dsp_test

import (
	"fmt"
	"math"
	"math/cmplx"

	"github.com/pulsewright/pulsewright/dsp"
)

func ExampleBarker() {
	ph, err := dsp.Barker(13)
	if err != nil {
		panic(err)
	}
	r := dsp.CodeACF(nil, ph)
	lags := make([]float64, len(r))
	for k, v := range r {
		lags[k] = real(v)
	}
	fmt.Println("r_k, k = 0…12:", lags)
	fmt.Printf("PSL %.0f, PSLR %.2f dB\n", dsp.CodePSL(ph), dsp.CodePSLRDB(ph))

	// Four samples per 1 µs chip.
	x := dsp.Sample(nil, dsp.PhaseCoded{Phases: ph, Chip: 1e-6}, 4e6, 0)
	fmt.Println(len(x), "samples")
	// Output:
	// r_k, k = 0…12: [13 0 1 0 1 0 1 0 1 0 1 0 1]
	// PSL 1, PSLR -22.28 dB
	// 52 samples
}

func ExampleLFM() {
	// 10 µs up-chirp sweeping 5 MHz: instantaneous frequency
	// (B/τ)(t − τ/2), from −2.5 MHz to +2.5 MHz.
	l := dsp.LFM{Width: 10e-6, Band: 5e6}
	fmt.Printf("B·τ = %.0f, slope %.3g Hz/s\n", l.Width*l.Band, l.Slope())

	// Phase at the edge: π(B/τ)(τ/2)² = πBτ/4.
	fmt.Printf("phase at t=0: %.4f rad (πBτ/4 mod 2π = %.4f)\n",
		cmplx.Phase(l.At(0)), math.Remainder(math.Pi*50/4, 2*math.Pi))

	// An echo 2.35 samples late, Doppler 1 kHz, into a 250-sample window.
	fs := 20e6
	rx := make([]complex128, 250)
	dsp.AddEcho(rx, l, fs, 2.35/fs, 1, 1e3)
	fmt.Println("first touched sample:", firstNonZero(rx))
	// Output:
	// B·τ = 50, slope 5e+11 Hz/s
	// phase at t=0: 1.5708 rad (πBτ/4 mod 2π = 1.5708)
	// first touched sample: 3
}

func firstNonZero(x []complex128) int {
	for i, v := range x {
		if v != 0 {
			return i
		}
	}
	return -1
}
