package dsp

import (
	"math"
	"runtime"
	"sync"
	"sync/atomic"
)

// Correlator is a fast-correlation plan: it compresses windows of n
// samples with a fixed reference h of m samples,
//
//	y[k] = Σ_{i=0}^{m−1} x[k+i]·conj(h[i]),  k = 0 … n−1,
//
// with x taken as zero beyond its end (the package convention: an echo
// whose leading edge is at sample d peaks at y[d]). It multiplies spectra
// at a length L whose prime factors are 2, 3 and 5: one block of
// L ≥ n+m−1 when that is cheapest, otherwise overlap-save blocks of
// L−m+1 outputs each, L chosen by a cost model of the package's FFTs
// (fftCost, measured). A power-of-two L runs on the in-place depth-first
// plan (fftconv.go), others on the Stockham FFT (fft.go). A Correlator
// owns its scratch space; Apply does not allocate when dst is given,
// whatever its worker count. It is not safe for concurrent use.
type Correlator struct {
	n, m    int
	nIn     int            // input length: n, or more for NewCorrelatorOutputs
	step    int            // outputs per block, L−m+1
	fft     *fftPlan       // length L, shared read-only by the workers (L not a power of two)
	conv    *convPlan      // length L, when L is a power of two (fftconv.go)
	l       int            // the FFT length L
	spec    []complex128   // conj(FFT(h zero-padded to L)) / L, in conv's order with conv
	scratch [][]complex128 // one buffer per worker: 2L points, or L with conv
	wg      sync.WaitGroup
	next    atomic.Int64 // next block to take, with several workers
	par     int          // goroutines per Apply (1: Apply runs serially)
	// With several workers: the goroutine bodies, made once so that Apply
	// does not allocate, and the arguments of the Apply in progress.
	workers []func()
	dst, x  []complex128
	// With conv, several workers and blocks mod workers = 1, the last
	// block is shared by all workers (coopBlock), first, in worker 0's
	// buffer; the blocks before it are then taken whole (whole of them;
	// all blocks otherwise).
	coop  bool
	whole int
	// NewCorrelatorOutputs, one worker, power-of-two blocks: the last
	// block on a shorter power-of-two plan when its outputs fit one (the
	// outputs past the last whole block rarely need a block of L).
	tail     *convPlan
	tailSpec []complex128
	phase    [3]coopPhase // the shared block's phases' claimed and finished units
}

// coopPhase counts the units of one phase of the shared block that have
// been claimed and finished.
type coopPhase struct{ claim, done atomic.Int64 }

// coopUnits is the number of pieces the shared block's copy, first
// forward level and last inverse level are cut into.
const coopUnits = 16

// NewCorrelator returns a plan for windows of n samples (n ≥ 1) and the
// reference ref (len(ref) ≥ 1), which is copied. It panics on empty
// arguments (programmer errors). Its Apply starts no goroutines.
func NewCorrelator(ref []complex128, n int) *Correlator {
	return NewCorrelatorWorkers(ref, n, 1)
}

// NewCorrelatorWorkers is NewCorrelator for a plan whose Apply may run its
// overlap-save blocks on up to workers goroutines (workers ≥ 1; the caller
// chooses, typically runtime.GOMAXPROCS(0)). It is the package's one,
// approved, exception to "no goroutines": the goroutines live only for the
// duration of an Apply call and share nothing but read-only tables and
// disjoint parts of dst. Apply does not allocate (the goroutines' bodies
// are made with the plan). The block length is chosen for that worker count; the
// result does not depend on it beyond rounding (the same blocks are
// computed in any order). It panics on empty arguments or workers < 1.
func NewCorrelatorWorkers(ref []complex128, n, workers int) *Correlator {
	if n < 1 || len(ref) < 1 || workers < 1 {
		panic("dsp: correlator needs n ≥ 1, a non-empty reference and workers ≥ 1")
	}
	l := bestBlockLen(n, len(ref), workers, simdAvailable())
	return newCorrelatorLen(ref, n, l, workers)
}

// NewCorrelatorOutputs is NewCorrelatorWorkers for a plan that computes
// only the first n outputs of windows of nIn ≥ n samples (x zero beyond
// nIn): y[k], k = 0 … n−1, as NewCorrelator(ref, nIn) gives them (to
// rounding: the block length is chosen for n outputs), at the cost of n
// outputs. Its Apply takes len(x) = nIn and len(dst) = n. It panics on
// empty arguments, nIn < n or workers < 1.
func NewCorrelatorOutputs(ref []complex128, nIn, n, workers int) *Correlator {
	if n < 1 || nIn < n || len(ref) < 1 || workers < 1 {
		panic("dsp: correlator needs 1 ≤ n ≤ nIn, a non-empty reference and workers ≥ 1")
	}
	c := newCorrelatorLen(ref, n, bestBlockLen(n, len(ref), workers, simdAvailable()), workers)
	c.nIn = nIn
	if c.conv != nil && c.par == 1 && !c.coop && c.whole > 1 {
		r := n - (c.whole-1)*c.step // the last block's outputs
		lt := 1
		for lt < r+c.m-1 {
			lt *= 2
		}
		if lt < c.l {
			c.tail = newConvPlan(lt)
			c.tailSpec = make([]complex128, lt)
			copy(c.tailSpec, ref)
			c.tail.forward(c.tailSpec)
			inv := 1 / float64(lt)
			for i, v := range c.tailSpec {
				c.tailSpec[i] = complex(real(v)*inv, -imag(v)*inv)
			}
		}
	}
	return c
}

// newCorrelatorLen builds the plan with FFT length l ≥ len(ref).
func newCorrelatorLen(ref []complex128, n, l, workers int) *Correlator {
	m := len(ref)
	c := &Correlator{
		n:    n,
		nIn:  n,
		m:    m,
		step: l - m + 1,
		l:    l,
		spec: make([]complex128, l),
	}
	if isPow2(l) {
		c.conv = newConvPlan(l)
	} else {
		c.fft = newFFTPlan(l)
	}
	blocks := (n + c.step - 1) / c.step
	size := 2 * l // the Stockham plan ping-pongs between two buffers
	if c.conv != nil {
		size = l // the power-of-two plan works in place
	}
	c.par, c.whole = min(workers, blocks), blocks
	if shareLast(l, blocks, workers) {
		c.coop, c.par, c.whole = true, workers, blocks-1
	}
	nbuf := c.par
	if c.whole == 0 {
		nbuf = 1 // the shared block's
	}
	for range nbuf {
		c.scratch = append(c.scratch, make([]complex128, size))
	}
	for i := 1; i < c.par; i++ {
		c.workers = append(c.workers, func() {
			defer c.wg.Done()
			c.blocks(i, c.dst, c.x)
		})
	}
	copy(c.spec, ref)
	if c.conv != nil {
		c.conv.forward(c.spec)
	} else {
		c.fft.transform(c.spec, c.scratch[0][:l])
	}
	inv := 1 / float64(l)
	for i, v := range c.spec {
		c.spec[i] = complex(real(v)*inv, -imag(v)*inv)
	}
	return c
}

// Clone returns a plan for the same reference, lengths and workers that
// shares c's read-only tables (the FFT plan and the reference's spectrum)
// and has scratch space of its own, for another goroutine. Clone only
// reads c: clones may be taken while c is in use.
func (c *Correlator) Clone() *Correlator {
	d := &Correlator{n: c.n, m: c.m, nIn: c.nIn, step: c.step, fft: c.fft, conv: c.conv, l: c.l,
		spec: c.spec, par: c.par, coop: c.coop, whole: c.whole, tail: c.tail, tailSpec: c.tailSpec}
	for _, b := range c.scratch {
		d.scratch = append(d.scratch, make([]complex128, len(b)))
	}
	for i := 1; i < d.par; i++ {
		d.workers = append(d.workers, func() {
			defer d.wg.Done()
			d.blocks(i, d.dst, d.x)
		})
	}
	return d
}

// Relative cost per point of one FFT stage, by radix, from the best of
// repeated BenchmarkFFTRadix runs (amd64): a radix-4 stage covers two
// halvings for the price of a radix-2 one.
func stageCost(radix int) float64 {
	switch radix {
	case 4, 2:
		return 1.0
	case 3:
		return 1.3
	}
	return 2.0 // radix 5
}

// fftCost models the time of one block of length l (forward transform,
// spectral product, inverse transform) in units of one radix-4 pass over
// l points. A power of two runs on the depth-first in-place plan
// (fftconv.go): one pass per level (radix 4, and one radix-2 level for
// an odd power) and a quarter pass for the product and the block's
// input and output, with a penalty of 3 % per doubling beyond 2¹⁴
// (BenchmarkCorrelatorLen, CPU time per Apply: 1.2–1.3 ns per point and
// pass at 2¹⁴–2¹⁷, 1.3–1.6 at 2¹⁸–2¹⁹). Other lengths run on the
// Stockham plan (fft.go): per-radix stage costs plus half a stage for the
// copies, with a penalty of 17 % per doubling beyond 2¹⁴, where its two
// buffers spill out of a core's cache (BenchmarkFFTRadix; and
// BenchmarkCorrelatorLen: 1.2 ns per unit at 15 360 points, 1.7–1.8 at
// 196 608 and 327 680). With simd (the power-of-two plan's AVX2/FMA
// kernels, fftconv_amd64.s) a power of two costs 0.37 of that
// (BenchmarkConvolve, CPU per block at 4 096–262 144 points: 0.33–0.43),
// plus 0.15 pass for an odd power's radix-2 bottom level, which stays in
// Go (BenchmarkCorrelatorLen at 65 536 × 5 000: 7.3 ns per point and
// block at 8 192, 7.0 at 16 384).
func fftCost(l int, simd bool) float64 {
	lg := math.Log2(float64(l))
	if isPow2(l) {
		c := math.Ceil(lg/2) + 0.25
		if lg > 14 {
			c *= 1 + 0.03*(lg-14)
		}
		if simd {
			c *= 0.37
			if int(lg)%2 == 1 {
				c += 0.15
			}
		}
		return c * float64(l)
	}
	c := 0.5
	r := l
	for r%4 == 0 {
		c += stageCost(4)
		r /= 4
	}
	for _, p := range []int{2, 3, 5} {
		for r%p == 0 {
			c += stageCost(p)
			r /= p
		}
	}
	if lg > 14 {
		c *= 1 + 0.17*(lg-14)
	}
	return c * float64(l)
}

// bestBlockLen picks the FFT length minimising the modelled time of the
// busiest worker, over 2,3,5-smooth L from the smallest useful block to
// twice one block of n+m−1 (a longer single block of cheaper radices can
// win); simd: whether the power-of-two plan runs its SIMD kernels.
func bestBlockLen(n, m, workers int, simd bool) int {
	best, bestCost := 0, math.Inf(1)
	for l := fftSize(m + 1); l <= 2*(n+m-1); l = fftSize(l + 1) {
		if c := blockCost(n, m, l, workers, simd); c < bestCost {
			best, bestCost = l, c
		}
	}
	return best
}

func blockCost(n, m, l, workers int, simd bool) float64 {
	blocks := (n + l - m) / (l - m + 1) // ceil(n / (l−m+1))
	if shareLast(l, blocks, workers) {
		// The last block is shared: each worker does 1/workers of it
		// (and a little more for the waits between its phases).
		return (float64(blocks-1)/float64(workers) + 1.1/float64(workers)) * fftCost(l, simd)
	}
	perWorker := (blocks + workers - 1) / workers
	return float64(perWorker) * fftCost(l, simd)
}

// shareLast reports whether the last of the blocks of length l is shared
// by the workers: with several workers, blocks mod workers = 1 (one block
// would be left to a single worker), and a power-of-two l above the conv
// plan's leaf size (its first level and its four quarters can be shared).
func shareLast(l, blocks, workers int) bool {
	return workers > 1 && blocks%workers == 1 && isPow2(l) && l > convLeaf
}

// Len returns n, the output length (and the input length but for a plan
// of NewCorrelatorOutputs).
func (c *Correlator) Len() int { return c.n }

// InLen returns the input length (Len but for NewCorrelatorOutputs).
func (c *Correlator) InLen() int { return c.nIn }

// RefLen returns the reference length m.
func (c *Correlator) RefLen() int { return c.m }

// Apply compresses x (len(x) = InLen()) into dst (len Len()) and returns
// dst; a nil dst is allocated. dst must not overlap x. Apply panics if
// len(x) differs from InLen() or a non-nil len(dst) from Len().
func (c *Correlator) Apply(dst, x []complex128) []complex128 {
	if len(x) != c.nIn {
		panic("dsp: correlator input length mismatch")
	}
	if dst == nil {
		dst = make([]complex128, c.n)
	} else if len(dst) != c.n {
		panic("dsp: correlator destination length mismatch")
	}
	if c.par == 1 {
		c.blocks(0, dst, x)
		return dst
	}
	c.parallel(dst, x)
	return dst
}

// parallel runs the blocks on one goroutine per scratch buffer; each takes
// the next block not yet taken, so a goroutine that waits for a core
// leaves its share to the others.
func (c *Correlator) parallel(dst, x []complex128) {
	c.next.Store(0)
	for i := range c.phase {
		c.phase[i].claim.Store(0)
		c.phase[i].done.Store(0)
	}
	c.dst, c.x = dst, x
	c.wg.Add(len(c.workers))
	for _, f := range c.workers {
		go f()
	}
	c.blocks(0, dst, x)
	c.wg.Wait()
	c.dst, c.x = nil, nil
}

// blocks computes overlap-save blocks with the scratch of worker i: all of
// them in order for a one-worker plan, else those it takes from c.next.
// The inverse transform is conj(FFT(conj(·))): the spectral product and
// the first conjugation are folded into the first pass of the second
// transform (fftPlan.run), the last conjugation into the copy out. A
// whole block is transformed from where it lies in x; only the last,
// zero-padded one is copied.
func (c *Correlator) blocks(i int, dst, x []complex128) {
	if c.conv != nil {
		c.convBlocks(i, dst, x)
		return
	}
	l := c.l
	s := c.scratch[i]
	buf, work := s[:l], s[l:]
	spec := c.spec[:l]
	serial := len(c.scratch) == 1
	for b := 0; ; b += c.step {
		if !serial {
			b = int(c.next.Add(1)-1) * c.step
		}
		if b >= c.n {
			return
		}
		src := buf
		if b+l <= c.nIn {
			src = x[b : b+l]
		} else {
			k := copy(buf, x[b:])
			clear(buf[k:])
		}
		y := c.fft.run(src, work, buf, nil)
		other := buf
		if &y[0] == &buf[0] {
			other = work
		}
		z := c.fft.run(y, other, y, spec)
		out := dst[b:min(b+c.step, c.n)]
		z = z[:len(out)]
		for i, v := range z {
			out[i] = complex(real(v), -imag(v))
		}
	}
}

// convBlocks is blocks on the power-of-two plan: each block's first
// forward level reads x where it lies, and its last inverse level writes
// the block's outputs straight into dst (fftconv.go).
func (c *Correlator) convBlocks(i int, dst, x []complex128) {
	l := c.l
	if c.coop {
		c.coopBlock(dst, x)
	}
	var buf []complex128
	if c.whole > 0 {
		buf = c.scratch[i][:l]
	}
	serial := c.par == 1
	for k := 0; ; k++ {
		if !serial {
			k = int(c.next.Add(1) - 1)
		}
		if k >= c.whole {
			break
		}
		b := k * c.step
		plan, spec, l := c.conv, c.spec, l
		if c.tail != nil && k == c.whole-1 {
			plan, spec, l = c.tail, c.tailSpec, c.tail.n
		}
		buf := buf[:l]
		src := buf
		if b+l <= c.nIn {
			src = x[b : b+l]
		} else {
			k := copy(buf, x[b:])
			clear(buf[k:])
		}
		plan.convolve(dst[b:min(b+c.step, c.n)], src, buf, spec)
	}
}

// coopBlock computes the last block with every worker, in worker 0's
// buffer (no worker takes a whole block before the shared one is done):
// its copy into the buffer with its first forward level, its four
// quarters (each forward, product and inverse, as in convolve) and its
// last inverse level into dst, each phase cut into units that the
// workers claim in turn. A worker waits (yielding) for the others to
// finish a phase before it starts the next one; a worker that waits for
// a core leaves its share to the others.
func (c *Correlator) coopBlock(dst, x []complex128) {
	units := [3]int{coopUnits, 4, coopUnits}
	for ph := range c.phase {
		p := &c.phase[ph]
		for {
			u := int(p.claim.Add(1) - 1)
			if u >= units[ph] {
				break
			}
			c.coopUnit(ph, u, dst, x)
			p.done.Add(1)
		}
		for p.done.Load() < int64(units[ph]) {
			runtime.Gosched()
		}
	}
}

// coopUnit runs unit u of phase ph of the shared block: 0, the copy of
// x[b:] (zero-padded) into the buffer and the first forward level, for
// a range of butterflies (the four ranges of the buffer they read and
// write); 1, quarter u; 2, the last inverse level for a range of
// butterflies.
func (c *Correlator) coopUnit(ph, u int, dst, x []complex128) {
	l, q := c.l, c.l/4
	b := c.whole * c.step
	buf := c.scratch[0][:l]
	k0, k1 := u*q/coopUnits, (u+1)*q/coopUnits
	switch ph {
	case 0:
		for j := range 4 {
			lo, hi := j*q+k0, j*q+k1
			k := 0
			if b+lo < c.nIn {
				k = copy(buf[lo:hi], x[b+lo:min(b+hi, c.nIn)])
			}
			clear(buf[lo+k : hi])
		}
		c.conv.fwd4FromRange(buf, buf, k0, k1)
	case 1:
		c.conv.convRec(buf[u*q:(u+1)*q], c.spec[u*q:(u+1)*q], 1)
	case 2:
		c.conv.inv4ToRange(dst[b:min(b+c.step, c.n)], buf, k0, k1)
	}
}
