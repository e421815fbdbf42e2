package scenarios

import (
	"math"
	"testing"

	"github.com/pulsewright/pulsewright/dsp"
)

// TestPdAverage checks the average of pdavg.go against dsp's exact series
// where both apply (a steady target behind 16-cell CA and OS CFARs, and a
// raised threshold), and i0e against tabulated values of I0 (Abramowitz &
// Stegun, Table 9.8: I0(1) = 1.266065878, I0(5) = 27.23987182,
// I0(10) = 2815.716628).
func TestPdAverage(t *testing.T) {
	for _, c := range []struct{ x, i0 float64 }{{1, 1.266065878}, {5, 27.23987182}, {10, 2815.716628}} {
		if got := i0e(c.x) * math.Exp(c.x); math.Abs(got/c.i0-1) > 2e-7 {
			t.Errorf("I0(%g) = %.9g, want %.9g", c.x, got, c.i0)
		}
	}
	for _, d := range []dsp.Detector{
		{Pfa: 1e-6, Pulses: 1, CFARCells: 16},
		{Pfa: 1e-6, Pulses: 1, CFARCells: 16, OSRank: 12},
		{Pfa: 1e-4, Pulses: 1, CFARCells: 8, OSRank: 6},
	} {
		for _, snrDB := range []float64{0, 10, 15, 20, 30} {
			snr := dsp.FromDB(snrDB)
			want := d.Pd(snr)
			got := pdAverage(snr, thresholdCDF(d, 1))
			if math.Abs(got-want) > 1e-6 {
				t.Errorf("%+v at %g dB: average %.8f, series %.8f", d, snrDB, got, want)
			}
		}
		// A threshold raised 3 dB is the nominal one at the Pfa that
		// logPfaRaised gives: the series there.
		tt := pdTest{det: d, snr: dsp.FromDB(18)}
		raised := d
		raised.Pfa = math.Exp(tt.logPfaRaised(2))
		if got, want := pdAverage(tt.snr, thresholdCDF(d, 2)), raised.Pd(tt.snr); math.Abs(got-want) > 1e-6 {
			t.Errorf("%+v raised 2×: average %.8f, series %.8f", d, got, want)
		}
	}
	// At zero SNR the average is the false-alarm probability.
	d := dsp.Detector{Pfa: 1e-9, Pulses: 1, CFARCells: 2}
	if got := pdAverage(0, thresholdCDF(d, 1)); math.Abs(got/1e-9-1) > 1e-4 {
		t.Errorf("two cells, Pfa 1e-9, SNR 0: Pd %g", got)
	}
}
