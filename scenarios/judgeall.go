package scenarios

import (
	"runtime"
	"sync"
	"sync/atomic"

	"github.com/pulsewright/pulsewright/dsp"
)

// judgeAll returns every target's single-pulse verdict, sc.judge(j, cf)
// for each j, judged on two goroutines when there are two cores and
// several targets: a verdict is a pure function of the scene and the
// target (the Pd memo is safe for several goroutines and returns the
// values computed afresh; the detector's multipliers are the same
// whichever detector solved them), so the verdicts are bit for bit those
// of judging the targets one after another. The second goroutine judges
// with a detector of its own (a dsp.CFAR keeps scratch buffers and its
// solved multipliers), made with the same settings; targets are handed
// out one at a time, as the in-cell Pd makes some much dearer than
// others. Everything judge reads lazily is made before the goroutines
// start.
func (sc *scene) judgeAll(cf *dsp.CFAR) []verdict {
	n := len(sc.targets)
	out := make([]verdict, n)
	if n < 2 || runtime.GOMAXPROCS(0) < 2 {
		for j := range out {
			out[j] = sc.judge(j, cf)
		}
		return out
	}
	sc.m.noiseCorrelation()
	var cf2 *dsp.CFAR
	if cf != nil {
		cf.Spacing() // an ordered statistic's lattice, solved once (read by correlatedCells)
		cf2 = &dsp.CFAR{PFA: cf.PFA, Guard: cf.Guard, Train: cf.Train, Rank: cf.Rank, Rho: cf.Rho,
			Variant: cf.Variant, Censor: cf.Censor}
		cf2.Spacing()
	}
	var next atomic.Int64
	work := func(c *dsp.CFAR) {
		for {
			j := int(next.Add(1) - 1)
			if j >= n {
				return
			}
			out[j] = sc.judge(j, c)
		}
	}
	var wg sync.WaitGroup
	wg.Go(func() { work(cf2) })
	work(cf)
	wg.Wait()
	return out
}
