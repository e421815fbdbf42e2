package dsp

import (
	"math"
	"math/rand"
	"slices"
	"testing"
)

// TestCFAR2DReuseMatchesFresh: a CFAR2D that keeps its training-cell list
// and multiplier between calls gives the same cells as a fresh detector
// of the same settings, and the same level, bit for bit, as one that
// builds its list and looks its multiplier up on every call (a detector
// keeps the multipliers it has solved by training pattern; on a
// circulant Doppler covariance, equal to 1e-9, that of the first bin it
// met, so a fresh detector may differ from either in the last bits), over random
// cells under test near the map's edges and in it, random invalid range
// cells, cell averaging and the ordered statistic, with a circulant
// (Hann, no canceller) and a non-circulant (two-pulse canceller) Doppler
// covariance. An identity of our own code: no outside source.
func TestCFAR2DReuseMatchesFresh(t *testing.T) {
	r := rand.New(rand.NewSource(7))
	const nr = 90
	for _, h := range [][]float64{MTINone, MTITwoPulse} {
		plan := NewSlowTimePlan(16, h, Hann{})
		nb := plan.Bins()
		cov := plan.NoiseCovariance()
		pw := make([][]float64, nb)
		for d := range pw {
			pw[d] = make([]float64, nr)
			for k := range pw[d] {
				pw[d][k] = 1 + r.ExpFloat64()
			}
		}
		p := func(k, d int) float64 { return pw[d][k] }
		for _, rank := range []int{0, 20} {
			settings := CFAR2D{PFA: 1e-5, GuardR: 1, TrainR: 8, GuardD: 1, TrainD: 2, Rank: rank, RhoR: []complex128{1, 0.3}, DopplerCov: cov}
			kept, ref := settings, settings
			invalid := map[int]bool{}
			for i := range 600 {
				if i%50 == 0 { // a new blanking pattern now and then
					clear(invalid)
					for range r.Intn(6) {
						invalid[r.Intn(nr)] = true
					}
				}
				valid := func(k int) bool { return !invalid[k] }
				k, d := r.Intn(nr), r.Intn(nb)
				if i%3 == 0 { // runs of neighbouring cells, as a map is scanned
					k = 40 + i%7
				}
				fresh := settings
				want := slices.Clone(fresh.Cells(valid, k, d, nr, nb))
				if got := kept.Cells(valid, k, d, nr, nb); !slices.Equal(got, want) {
					t.Fatalf("mti %v rank %d cell (%d, %d): kept cells %v, fresh %v", h, rank, k, d, got, want)
				}
				ref.mask = nil // build the list again, look the multiplier up
				a, b := kept.LevelValid(p, valid, k, d, nr, nb), ref.LevelValid(p, valid, k, d, nr, nb)
				if math.Float64bits(a) != math.Float64bits(b) {
					t.Fatalf("mti %v rank %d cell (%d, %d): kept level %v, rebuilt %v", h, rank, k, d, a, b)
				}
			}
		}
	}
}
