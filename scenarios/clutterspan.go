package scenarios

import (
	"iter"
	"slices"
)

// clutterGates yields, ascending and once each, the gates 0 … n−1 that lie
// in the support of some clutter object's single-pulse response. Outside
// them every clutter object's power is 0, so no clutter object can be the
// dominant object there (dominant needs power above 0) and the clutter
// power there is 0: the loops over gates that look for clutter
// (breakthrough, the CNR peak) visit only these and give the same result,
// bit for bit, as a loop over every gate. A scene of a 65 593-gate window
// with one 3 km rain band visits about 1 200 gates instead of all of them.
func (sc *scene) clutterGates() iter.Seq[int] {
	n := sc.m.n
	var spans [][2]int
	for _, g := range sc.targets {
		if !g.t.IsClutter() {
			continue
		}
		lo, hi := max(g.resp.lo, 0), min(g.resp.lo+len(g.resp.pow), n)
		if lo < hi {
			spans = append(spans, [2]int{lo, hi})
		}
	}
	slices.SortFunc(spans, func(a, b [2]int) int { return a[0] - b[0] })
	return func(yield func(int) bool) {
		next := 0 // the first gate not yet yielded
		for _, s := range spans {
			for k := max(s[0], next); k < s[1]; k++ {
				if !yield(k) {
					return
				}
			}
			next = max(next, s[1])
		}
	}
}
