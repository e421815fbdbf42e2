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
// start. The other detectors are kept across evaluations (pdMemo.cfar1)
// with the multipliers they have solved.
//
// side, when not nil, is work that reads the scene but no verdict (the
// clutter analysis): it runs first when judging is sequential, otherwise
// on a goroutine of its own, with a third detector of the same settings,
// while the targets are judged; judgeAll returns when both are done.
func (sc *scene) judgeAll(cf *dsp.CFAR, side func(*dsp.CFAR)) []verdict {
	n := len(sc.targets)
	out := make([]verdict, n)
	if n < 2 || runtime.GOMAXPROCS(0) < 2 {
		if side != nil {
			side(cf)
		}
		for j := range out {
			out[j] = sc.judge(j, cf)
		}
		return out
	}
	sc.m.noiseCorrelation()
	if cf != nil {
		cf.Spacing() // an ordered statistic's lattice, solved once (read by correlatedCells)
	}
	var wg sync.WaitGroup
	if side != nil {
		cf3 := sc.m.memo.cfar1(cf, 2)
		wg.Go(func() { side(cf3) })
	}
	cf2 := sc.m.memo.cfar1(cf, 1)
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
	wg.Go(func() { work(cf2) })
	work(cf)
	wg.Wait()
	return out
}

// sameDetector returns a new detector with the settings of cf (nil for
// nil): the multipliers it solves are those cf solves, bit for bit, but
// its scratch buffers and caches are its own.
func sameDetector(cf *dsp.CFAR) *dsp.CFAR {
	if cf == nil {
		return nil
	}
	c := &dsp.CFAR{PFA: cf.PFA, Guard: cf.Guard, Train: cf.Train, Rank: cf.Rank, Rho: cf.Rho,
		Variant: cf.Variant, Censor: cf.Censor, Pulses: cf.Pulses}
	c.Spacing()
	return c
}
