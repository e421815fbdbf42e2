package dsp

import "testing"

func BenchmarkNewNLFM(b *testing.B) {
	for _, bt := range []float64{100, 1000, 10000} {
		b.Run(fmtBT(bt), func(b *testing.B) {
			b.ReportAllocs()
			for b.Loop() {
				if _, err := NewNLFM(bt*1e-6, 1e6, -40); err != nil {
					b.Fatal(err)
				}
			}
		})
	}
}

func fmtBT(bt float64) string {
	switch bt {
	case 100:
		return "BT=100"
	case 1000:
		return "BT=1000"
	}
	return "BT=10000"
}
