package dsp

import (
	"math"
	"math/bits"
)

// convPlan is the FFT the Correlator multiplies spectra with when its block
// length L is a power of two: an in-place decimation-in-frequency FFT
// (radix-4 levels, and one radix-2 level at the bottom when L is an odd
// power of two) that leaves the spectrum in digit-reversed order, and its
// mirror image, a decimation-in-time inverse that takes the spectrum in that
// order and gives the signal back in natural order. A correlation needs the
// spectrum only to multiply it by another one in the same order, so no
// reordering is ever done.
//
// Level i splits segments of lens[i] points into radix[i] segments of
// lens[i]/radix[i] points, in place:
//
//	forward, k < q = lens[i]/r:  x[k+j·q] ← w^{j·k} · Σ_l x[k+l·q]·exp(−j2π·j·l/r)
//	inverse:                     x[k+l·q] ← Σ_j conj(w^{j·k})·x[k+j·q]·exp(+j2π·j·l/r)
//
// with w = exp(−j2π/lens[i]). The transform runs depth first: once a
// segment fits the leaf size (a core's L1 cache) its remaining forward
// levels, the spectral product and its inverse levels all run before the
// next segment is touched, so a long block goes through main memory twice
// (its first forward level reads the input, its last inverse level writes
// the output) instead of twice per level. The tables are read-only after
// construction: one plan may serve several goroutines, each with its own
// buffer.
type convPlan struct {
	n     int
	radix []int             // radix of each level, from the whole length down
	lens  []int             // segment length at each level
	tw    [][][3]complex128 // tw[i][k][j−1] = w^{j·k}, k < lens[i]/4, 1 ≤ j < 4 (radix-4 levels above the bottom; not the top when top is set)
	top   []complex128      // top[k] = w_n^k, k < n/4: the top level's compact table when leaf > 0
	leaf  int               // first level whose segments fit convLeaf
	// simd: run the AVX2/FMA kernels (fftconv_amd64.s) instead of the
	// pure Go ones; set when the processor has them.
	simd bool
}

// convLeaf is the segment length (points) below which the levels run
// breadth first over the segment: 1 024 points are 16 KiB, half of a core's
// L1 data cache, leaving room for the spectrum and the twiddles.
const convLeaf = 1024

// isPow2 reports whether n ≥ 1 is a power of two.
func isPow2(n int) bool { return n >= 1 && n&(n-1) == 0 }

// newConvPlan returns the plan for the power of two n ≥ 1. It panics for
// any other n (a programmer error).
func newConvPlan(n int) *convPlan {
	if !isPow2(n) {
		panic("dsp: conv fft length must be a power of two")
	}
	p := &convPlan{n: n, simd: simdAvailable()}
	lg := bits.TrailingZeros(uint(n))
	for s := n; s > 1; {
		r := 4
		if lg%2 == 1 && s == 2 {
			r = 2
		}
		p.radix = append(p.radix, r)
		p.lens = append(p.lens, s)
		s /= r
	}
	p.leaf = len(p.lens)
	for i, s := range p.lens {
		if s <= convLeaf {
			p.leaf = i
			break
		}
	}
	if n == 1 {
		return p
	}
	// Every level above the bottom is radix 4. A level of length s needs
	// w_s^{j·k} for k < s/4, 1 ≤ j < 4. When the top level runs alone
	// (p.leaf > 0: only through fwd4FromRange and inv4ToRange, which
	// stream the whole block through memory and have cycles to spare) its
	// table is compact: w_n^k alone, its square and cube made in the
	// loop, a third of the memory. The first full table holds the three
	// factors per butterfly, each the product of two exactly rounded
	// factors (as roots does, without its n-point table); a lower level
	// needs w_s^{j·k} = w_{4s}^{j·4k}: every fourth entry of the level
	// above's table. The full tables share one allocation.
	if n <= 4 {
		return p // one level, the bottom: unit twiddles
	}
	first := 0
	if p.leaf > 0 {
		first = 1
		p.top = make([]complex128, n/4)
		lo, hi, b := rootParts(n)
		a, c := 0, 0
		for k := range p.top {
			p.top[k] = hi[a] * lo[c]
			if c++; c == b {
				c, a = 0, a+1
			}
		}
	}
	size := 0
	for i := first; i < len(p.lens); i++ {
		if l := p.lens[i]; l != p.radix[i] {
			size += l / 4
		}
	}
	p.tw = make([][][3]complex128, len(p.lens))
	if size == 0 {
		return p
	}
	all := make([][3]complex128, size)
	s0 := p.lens[first]
	t0 := all[:s0/4]
	all = all[len(t0):]
	lo, hi, b := rootParts(s0)
	// w^{j·k} = hi[a]·lo[c] with j·k = a·b + c, stepped without division.
	var a, c [3]int
	for k := range t0 {
		for j := range 3 {
			t0[k][j] = hi[a[j]] * lo[c[j]]
			if c[j] += j + 1; c[j] >= b {
				c[j] -= b
				a[j]++
			}
		}
	}
	p.tw[first] = t0
	for i := first + 1; i < len(p.lens); i++ {
		s := p.lens[i]
		if s == p.radix[i] {
			continue // the bottom level: unit twiddles
		}
		t := all[:s/4]
		all = all[len(t):]
		prev := p.tw[i-1] // w_s^{j·k} = w_{4s}^{j·4k}: every fourth of the level above
		for k := range t {
			t[k] = prev[4*k]
		}
		p.tw[i] = t
	}
	return p
}

// rootParts returns the factors of the powers of w = exp(−j2π/s): w^m =
// hi[m/b]·lo[m%b] for 0 ≤ m < 3s/4 + b, each factor exactly rounded.
func rootParts(s int) (lo, hi []complex128, b int) {
	b = int(math.Sqrt(float64(s))) + 1
	ang := -2 * math.Pi / float64(s)
	lo = make([]complex128, b)
	for c := range lo {
		sin, cos := math.Sincos(ang * float64(c))
		lo[c] = complex(cos, sin)
	}
	hi = make([]complex128, 3*(s/4)/b+2)
	for a := range hi {
		sin, cos := math.Sincos(ang * float64(a*b))
		hi[a] = complex(cos, sin)
	}
	return lo, hi, b
}

// forward replaces x (len n) by its DFT in the plan's digit-reversed order.
func (p *convPlan) forward(x []complex128) {
	if len(x) != p.n {
		panic("dsp: conv fft buffer length mismatch")
	}
	if p.n > 1 {
		p.fwdRec(x, 0)
	}
}

func (p *convPlan) fwdRec(seg []complex128, lvl int) {
	last := len(p.lens) - 1
	if lvl >= p.leaf {
		for i := lvl; i < last; i++ {
			p.fwd4(seg, p.lens[i], p.tw[i])
		}
		if p.radix[last] == 4 {
			bottom4(seg, nil)
		} else {
			bottom2(seg, nil)
		}
		return
	}
	q := len(seg) / 4
	if lvl == 0 && p.top != nil {
		p.fwd4FromRange(seg, seg, 0, q)
	} else {
		p.fwd4(seg, len(seg), p.tw[lvl])
	}
	for j := range 4 {
		p.fwdRec(seg[j*q:(j+1)*q], lvl+1)
	}
}

// convolve computes IDFT(DFT(src)·spec) where spec is in the plan's order:
// the circular convolution of src with the sequence whose DFT is spec,
// written into dst[:len(dst)] (len(dst) ≤ n), using buf (len n) as the
// work space. src (len n) is only read; it may be buf.
func (p *convPlan) convolve(dst, src, buf, spec []complex128) {
	n := p.n
	if len(src) != n || len(buf) != n || len(spec) != n || len(dst) > n {
		panic("dsp: conv fft buffer length mismatch")
	}
	if n <= convLeaf || p.leaf == 0 {
		if &src[0] != &buf[0] {
			copy(buf, src)
		}
		p.convRec(buf, spec, 0)
		copy(dst, buf)
		return
	}
	// The top level reads src and writes buf; its inverse writes dst.
	q := n / 4
	p.fwd4FromRange(buf, src, 0, q)
	for j := range 4 {
		p.convRec(buf[j*q:(j+1)*q], spec[j*q:(j+1)*q], 1)
	}
	p.inv4ToRange(dst, buf, 0, q)
}

// convRec runs the forward levels from lvl, the product by spec and the
// inverse levels back to lvl, on seg (len lens[lvl]).
func (p *convPlan) convRec(seg, spec []complex128, lvl int) {
	if len(seg) == 1 {
		seg[0] *= spec[0]
		return
	}
	last := len(p.lens) - 1
	if lvl >= p.leaf {
		for i := lvl; i < last; i++ {
			p.fwd4(seg, p.lens[i], p.tw[i])
		}
		if p.radix[last] == 4 {
			p.bottom4(seg, spec)
		} else {
			bottom2(seg, spec)
		}
		for i := last - 1; i >= lvl; i-- {
			p.inv4(seg, p.lens[i], p.tw[i])
		}
		return
	}
	p.fwd4(seg, len(seg), p.tw[lvl])
	q := len(seg) / 4
	for j := range 4 {
		p.convRec(seg[j*q:(j+1)*q], spec[j*q:(j+1)*q], lvl+1)
	}
	p.inv4(seg, len(seg), p.tw[lvl])
}

// fwd4 runs a forward radix-4 level on every segment of s points of x
// (s ≥ 8, a level above the bottom), on the plan's kernels.
func (p *convPlan) fwd4(x []complex128, s int, tw [][3]complex128) {
	if p.simd && s >= 8 && len(x) >= s && len(x)%s == 0 && len(tw) >= s/4 {
		fwd4AVX(&x[0], &x[0], &tw[0], s/4, s/4, len(x)/s)
		return
	}
	fwd4(x, s, tw)
}

// inv4 is fwd4's inverse level, on the plan's kernels.
func (p *convPlan) inv4(x []complex128, s int, tw [][3]complex128) {
	if p.simd && s >= 8 && len(x) >= s && len(x)%s == 0 && len(tw) >= s/4 {
		inv4AVX(&x[0], &x[0], &tw[0], s/4, s/4, len(x)/s)
		return
	}
	inv4(x, s, tw)
}

// bottom4 is bottom4 with a spectrum, on the plan's kernels.
func (p *convPlan) bottom4(x, spec []complex128) {
	if p.simd && len(x) >= 4 && len(x)%4 == 0 && len(spec) >= len(x) {
		bottom4AVX(&x[0], &spec[0], len(x))
		return
	}
	bottom4(x, spec)
}

// fwd4FromRange runs the top level (its compact table, p.top) forward
// on one block read from src and written to dst (len n; src may be dst),
// butterflies k0 ≤ k < k1, on the plan's kernels: the SIMD kernel takes
// them two at a time from an even k0, the pure Go one an odd last one.
func (p *convPlan) fwd4FromRange(dst, src []complex128, k0, k1 int) {
	q := p.n / 4
	if len(dst) != p.n || len(src) != p.n || k0 < 0 || k1 > q || len(p.top) != q {
		panic("dsp: conv fft top level out of range")
	}
	if p.simd && k0%2 == 0 && k1-k0 >= 2 {
		e := k1 - (k1-k0)%2
		fwd4TopAVX(&dst[k0], &src[k0], &p.top[k0], q, e-k0)
		k0 = e
	}
	if k0 < k1 {
		fwd4Top(dst, src, p.top, k0, k1)
	}
}

// inv4ToRange runs the top level inverse on one block (src, len n),
// writing its outputs below len(dst) to dst (the others are not
// computed), butterflies k0 ≤ k < k1, on the plan's kernels (its whole
// butterflies as fwd4FromRange's).
func (p *convPlan) inv4ToRange(dst, src []complex128, k0, k1 int) {
	q := p.n / 4
	if len(src) != p.n || len(dst) > p.n || k0 < 0 || k1 > q || len(p.top) != q {
		panic("dsp: conv fft top level out of range")
	}
	if p.simd && k0%2 == 0 {
		// The butterflies whose four outputs are all wanted.
		full := min(k1, max(len(dst)-3*q, 0))
		if e := full - (full-k0)%2; e-k0 >= 2 {
			inv4TopAVX(&dst[k0], &src[k0], &p.top[k0], q, e-k0)
			k0 = e
		}
	}
	if k0 < k1 {
		inv4Top(dst, src, p.top, k0, k1)
	}
}

// fwd4 runs a forward radix-4 level on every segment of s points of x.
func fwd4(x []complex128, s int, tw [][3]complex128) {
	q := s / 4
	tw = tw[:q]
	for off := 0; off+s <= len(x); off += s {
		seg := x[off : off+s : off+s]
		x0, x1, x2, x3 := seg[:q], seg[q:2*q], seg[2*q:3*q], seg[3*q:]
		x1, x2, x3 = x1[:len(x0)], x2[:len(x0)], x3[:len(x0)]
		for k := range x0 {
			w := &tw[k]
			a0, a1, a2, a3 := x0[k], x1[k], x2[k], x3[k]
			t0, t1 := a0+a2, a0-a2
			t2, d := a1+a3, a1-a3
			// t1 ∓ j·d written out by parts (no negation to compute).
			x0[k] = t0 + t2
			x1[k] = complex(real(t1)+imag(d), imag(t1)-real(d)) * w[0]
			x2[k] = (t0 - t2) * w[1]
			x3[k] = complex(real(t1)-imag(d), imag(t1)+real(d)) * w[2]
		}
	}
}

// fwd4Top is fwd4 on one segment (len(dst) points) read from src and
// written to dst (src may be dst), for the butterflies k0 ≤ k < k1 only,
// with the compact table top[k] = w^k (w^{2k}, w^{3k} its square and
// cube).
func fwd4Top(dst, src, top []complex128, k0, k1 int) {
	q := len(dst) / 4
	tw := top[k0:k1]
	x0, x1, x2, x3 := src[k0:k1], src[q+k0:q+k1], src[2*q+k0:2*q+k1], src[3*q+k0:3*q+k1]
	y0, y1, y2, y3 := dst[k0:k1], dst[q+k0:q+k1], dst[2*q+k0:2*q+k1], dst[3*q+k0:3*q+k1]
	x0, x1, x2, x3 = x0[:len(tw)], x1[:len(tw)], x2[:len(tw)], x3[:len(tw)]
	y0, y1, y2, y3 = y0[:len(tw)], y1[:len(tw)], y2[:len(tw)], y3[:len(tw)]
	for k, w1 := range tw {
		w2 := w1 * w1
		w3 := w2 * w1
		a0, a1, a2, a3 := x0[k], x1[k], x2[k], x3[k]
		t0, t1 := a0+a2, a0-a2
		t2, d := a1+a3, a1-a3
		y0[k] = t0 + t2
		y1[k] = complex(real(t1)+imag(d), imag(t1)-real(d)) * w1
		y2[k] = (t0 - t2) * w2
		y3[k] = complex(real(t1)-imag(d), imag(t1)+real(d)) * w3
	}
}

// mulConj returns a·conj(w).
func mulConj(a, w complex128) complex128 {
	return complex(real(a)*real(w)+imag(a)*imag(w), imag(a)*real(w)-real(a)*imag(w))
}

// inv4 runs an inverse radix-4 level on every segment of s points of x.
func inv4(x []complex128, s int, tw [][3]complex128) {
	q := s / 4
	tw = tw[:q]
	for off := 0; off+s <= len(x); off += s {
		seg := x[off : off+s : off+s]
		x0, x1, x2, x3 := seg[:q], seg[q:2*q], seg[2*q:3*q], seg[3*q:]
		x1, x2, x3 = x1[:len(x0)], x2[:len(x0)], x3[:len(x0)]
		for k := range x0 {
			w := &tw[k]
			b0, b1, b2, b3 := x0[k], mulConj(x1[k], w[0]), mulConj(x2[k], w[1]), mulConj(x3[k], w[2])
			t0, t1 := b0+b2, b0-b2
			t2, d := b1+b3, b1-b3
			x0[k] = t0 + t2
			x1[k] = complex(real(t1)-imag(d), imag(t1)+real(d))
			x2[k] = t0 - t2
			x3[k] = complex(real(t1)+imag(d), imag(t1)-real(d))
		}
	}
}

// inv4Top is inv4 on one segment (len(src) points) whose outputs below
// len(dst) are written to dst (the others are not computed), for the
// butterflies k0 ≤ k < k1 only, with fwd4Top's compact table.
func inv4Top(dst, src, top []complex128, k0, k1 int) {
	q := len(src) / 4
	// Quarter j of the output is dst[j·q : j·q+q]; kq[j] of its points are
	// wanted: all four quarters for k < kq[3], three for k < kq[2], …
	var kq [4]int
	for j := range kq {
		kq[j] = min(max(len(dst)-j*q, 0), q)
	}
	for k := k0; k < min(k1, kq[0]); k++ {
		w1 := top[k]
		w2 := w1 * w1
		w3 := w2 * w1
		b0, b1, b2, b3 := src[k], mulConj(src[q+k], w1), mulConj(src[2*q+k], w2), mulConj(src[3*q+k], w3)
		t0, t1 := b0+b2, b0-b2
		t2, d := b1+b3, b1-b3
		dst[k] = t0 + t2
		if k < kq[1] {
			dst[q+k] = complex(real(t1)-imag(d), imag(t1)+real(d))
		}
		if k < kq[2] {
			dst[2*q+k] = t0 - t2
		}
		if k < kq[3] {
			dst[3*q+k] = complex(real(t1)+imag(d), imag(t1)-real(d))
		}
	}
}

// bottom4 runs the last forward level (segments of 4 points, unit
// twiddles) on x, then, when spec is not nil, multiplies by spec and runs
// the first inverse level.
func bottom4(x, spec []complex128) {
	if spec == nil {
		for g := 0; g+4 <= len(x); g += 4 {
			v := x[g : g+4 : g+4]
			a0, a1, a2, a3 := v[0], v[1], v[2], v[3]
			t0, t1 := a0+a2, a0-a2
			t2, d := a1+a3, a1-a3
			v[0], v[1], v[2], v[3] = t0+t2, complex(real(t1)+imag(d), imag(t1)-real(d)), t0-t2, complex(real(t1)-imag(d), imag(t1)+real(d))
		}
		return
	}
	spec = spec[:len(x)]
	for g := 0; g+4 <= len(x); g += 4 {
		v := x[g : g+4 : g+4]
		h := spec[g : g+4 : g+4]
		a0, a1, a2, a3 := v[0], v[1], v[2], v[3]
		t0, t1 := a0+a2, a0-a2
		t2, d := a1+a3, a1-a3
		b0, b1, b2, b3 := (t0+t2)*h[0], complex(real(t1)+imag(d), imag(t1)-real(d))*h[1], (t0-t2)*h[2], complex(real(t1)-imag(d), imag(t1)+real(d))*h[3]
		t0, t1 = b0+b2, b0-b2
		t2, d = b1+b3, b1-b3
		v[0], v[1], v[2], v[3] = t0+t2, complex(real(t1)-imag(d), imag(t1)+real(d)), t0-t2, complex(real(t1)+imag(d), imag(t1)-real(d))
	}
}

// bottom2 is bottom4 for a last level of radix 2.
func bottom2(x, spec []complex128) {
	if spec == nil {
		for g := 0; g+2 <= len(x); g += 2 {
			v := x[g : g+2 : g+2]
			v[0], v[1] = v[0]+v[1], v[0]-v[1]
		}
		return
	}
	spec = spec[:len(x)]
	for g := 0; g+2 <= len(x); g += 2 {
		v := x[g : g+2 : g+2]
		h := spec[g : g+2 : g+2]
		b0, b1 := (v[0]+v[1])*h[0], (v[0]-v[1])*h[1]
		v[0], v[1] = b0+b1, b0-b1
	}
}
