package dsp

import (
	"fmt"
	"testing"
)

func BenchmarkNewNLFM(b *testing.B) {
	for _, bt := range []float64{100, 1000, 10000} {
		b.Run(fmt.Sprintf("BT=%g", bt), func(b *testing.B) {
			b.ReportAllocs()
			for b.Loop() {
				if _, err := NewNLFM(bt*1e-6, 1e6, -40); err != nil {
					b.Fatal(err)
				}
			}
		})
	}
}

func BenchmarkNLFMAt(b *testing.B) {
	g, err := NewNLFM(100e-6, 10e6, -40)
	if err != nil {
		b.Fatal(err)
	}
	var w Waveform = g
	dst := make([]complex128, 5000)
	b.ReportAllocs()
	for b.Loop() {
		Sample(dst, w, 50e6, 0)
	}
}
