package dsp

import "math"

// fftPlan is an unnormalised forward complex DFT of a fixed length n whose
// prime factors are 2, 3 and 5,
//
//	X[k] = Σ_{t=0}^{n−1} x[t]·exp(−j2π·k·t/n),
//
// the same transform as gonum's fourier.CmplxFFT.Coefficients. It is a
// Stockham autosort decimation-in-frequency FFT (radix 4, then 2, 3 and 5
// stages) with every twiddle factor precomputed, ping-ponging between the
// data and a caller-owned scratch buffer, so no bit reversal is needed.
// The inverse is conj(FFT(conj(X))), which the Correlator folds into its
// spectral product. The tables are read-only after construction, so one
// plan may serve several goroutines that each own their scratch.
type fftPlan struct {
	n      int
	stages []fftStage
}

// fftStage is one pass: the current sub-transform length is radix·m and the
// stride between interleaved sub-transforms is s (s·radix·m = n).
type fftStage struct {
	radix, s, m int
	// tw[p·(radix−1)+j−1] = exp(−j2π·p·j/(radix·m)), p < m, 1 ≤ j < radix.
	tw []complex128
}

// newFFTPlan returns the plan for length n ≥ 1. It panics when n has a prime
// factor other than 2, 3 or 5 (a programmer error: lengths come from
// fftSize).
func newFFTPlan(n int) *fftPlan {
	if n < 1 {
		panic("dsp: fft length must be positive")
	}
	var radices []int
	r := n
	for r%4 == 0 {
		radices = append(radices, 4)
		r /= 4
	}
	for _, p := range []int{2, 3, 5} {
		for r%p == 0 {
			radices = append(radices, p)
			r /= p
		}
	}
	if r != 1 {
		panic("dsp: fft length must have no prime factor above 5")
	}
	f := &fftPlan{n: n}
	root := roots(n)
	cur, s := n, 1
	for _, p := range radices {
		m := cur / p
		st := fftStage{radix: p, s: s, m: m, tw: make([]complex128, m*(p-1))}
		for q := range m {
			for j := 1; j < p; j++ {
				// exp(−j2π·q·j/cur) = exp(−j2π·q·j·s/n), with q·j·s < s·m·p = n.
				st.tw[q*(p-1)+j-1] = root[q*j*s]
			}
		}
		f.stages = append(f.stages, st)
		cur, s = m, s*p
	}
	return f
}

// roots returns exp(−j2π·k/n) for 0 ≤ k < n, each the product of two
// exactly rounded factors exp(−j2π·a·b/n)·exp(−j2π·c/n), k = a·b + c,
// b ≈ √n: 2√n calls to Sincos instead of n, and an error of a few units
// in the last place.
func roots(n int) []complex128 {
	b := int(math.Sqrt(float64(n))) + 1
	w := -2 * math.Pi / float64(n)
	lo := make([]complex128, b)
	for c := range lo {
		sin, cos := math.Sincos(w * float64(c))
		lo[c] = complex(cos, sin)
	}
	r := make([]complex128, n)
	for a := 0; a*b < n; a++ {
		sin, cos := math.Sincos(w * float64(a*b))
		hi := complex(cos, sin)
		blk := r[a*b : min(a*b+b, n)]
		for c := range blk {
			blk[c] = hi * lo[c]
		}
	}
	return r
}

// transform replaces x (len n) by its DFT, using work (len n) as scratch.
func (f *fftPlan) transform(x, work []complex128) {
	if len(x) != f.n || len(work) != f.n {
		panic("dsp: fft buffer length mismatch")
	}
	if r := f.run(x, work, x, nil); &r[0] != &x[0] {
		copy(x, r)
	}
}

// run computes the DFT of src, or of conj(src[i]·pre[i]) when pre is not
// nil, and returns the buffer holding it: a or b (all of length n). The
// first stage reads src and writes a, the next ones alternate between b
// and a, so src may be b (in place) or a buffer that must not be written
// (when src is neither a nor b). Folding the spectral product and the
// conjugation of the inverse into the first stage, and reading the input
// where it lies, saves the correlator three passes over each block.
func (f *fftPlan) run(src, a, b, pre []complex128) []complex128 {
	if len(f.stages) == 0 { // n = 1
		a[0] = src[0]
		if pre != nil {
			a[0] = conjMul(src[0], pre[0])
		}
		return a
	}
	in, out := src, a
	for i := range f.stages {
		st := &f.stages[i]
		if i == 0 && pre != nil {
			switch st.radix {
			case 4:
				st.pass4pre(in, out, pre)
			default:
				for j, v := range pre {
					out[j] = conjMul(in[j], v)
				}
				in = out
				if &in[0] == &a[0] {
					out = b
				} else {
					out = a
				}
				st.pass(in, out)
			}
		} else {
			st.pass(in, out)
		}
		if &out[0] == &a[0] {
			in, out = a, b
		} else {
			in, out = b, a
		}
	}
	return in
}

// conjMul returns conj(a·b).
func conjMul(a, b complex128) complex128 {
	return complex(real(a)*real(b)-imag(a)*imag(b), -(real(a)*imag(b) + imag(a)*real(b)))
}

// pass runs the stage from x into y.
func (st *fftStage) pass(x, y []complex128) {
	switch st.radix {
	case 4:
		st.pass4(x, y)
	case 2:
		st.pass2(x, y)
	case 3:
		st.pass3(x, y)
	case 5:
		st.pass5(x, y)
	}
}

// inverse replaces X (len n) by its unnormalised inverse DFT,
// x[t] = Σ_k X[k]·exp(+j2π·k·t/n) (gonum's CmplxFFT.Sequence), as
// conj(FFT(conj(X))).
func (f *fftPlan) inverse(x, work []complex128) {
	conjInPlace(x)
	f.transform(x, work)
	conjInPlace(x)
}

func conjInPlace(x []complex128) {
	for i, v := range x {
		x[i] = complex(real(v), -imag(v))
	}
}

// Below this stride the passes index directly instead of slicing per
// butterfly group: the inner loops are too short to repay the slicing.
const shortStride = 8

func (st *fftStage) pass2(x, y []complex128) {
	s, m, tw := st.s, st.m, st.tw
	if s < shortStride {
		for p := range m {
			w := tw[p]
			xb, yb := s*p, 2*s*p
			for q := range s {
				a, b := x[xb+q], x[xb+q+s*m]
				y[yb+q] = a + b
				y[yb+s+q] = (a - b) * w
			}
		}
		return
	}
	for p := range m {
		w := tw[p]
		x0 := x[s*p : s*p+s]
		x1 := x[s*(p+m) : s*(p+m)+s]
		y0 := y[2*s*p : 2*s*p+s]
		y1 := y[2*s*p+s : 2*s*p+2*s]
		x1 = x1[:len(x0)]
		y0 = y0[:len(x0)]
		y1 = y1[:len(x0)]
		if p == 0 {
			for q, a := range x0 {
				b := x1[q]
				y0[q] = a + b
				y1[q] = a - b
			}
			continue
		}
		for q, a := range x0 {
			b := x1[q]
			y0[q] = a + b
			y1[q] = (a - b) * w
		}
	}
}

func (st *fftStage) pass4(x, y []complex128) {
	s, m, tw := st.s, st.m, st.tw
	if s < shortStride {
		for p := range m {
			w := tw[3*p : 3*p+3]
			xb, yb, sm := s*p, 4*s*p, s*m
			for q := range s {
				a0, a1, a2, a3 := x[xb+q], x[xb+q+sm], x[xb+q+2*sm], x[xb+q+3*sm]
				t0, t1 := a0+a2, a0-a2
				t2, d := a1+a3, a1-a3
				t3 := complex(imag(d), -real(d)) // −j·(a1−a3)
				y[yb+q] = t0 + t2
				y[yb+s+q] = (t1 + t3) * w[0]
				y[yb+2*s+q] = (t0 - t2) * w[1]
				y[yb+3*s+q] = (t1 - t3) * w[2]
			}
		}
		return
	}
	for p := range m {
		x0 := x[s*p : s*p+s]
		x1 := x[s*(p+m) : s*(p+m)+s]
		x2 := x[s*(p+2*m) : s*(p+2*m)+s]
		x3 := x[s*(p+3*m) : s*(p+3*m)+s]
		o := y[4*s*p : 4*s*p+4*s]
		y0, y1, y2, y3 := o[:s], o[s:2*s], o[2*s:3*s], o[3*s:4*s]
		x1, x2, x3 = x1[:len(x0)], x2[:len(x0)], x3[:len(x0)]
		y0, y1, y2, y3 = y0[:len(x0)], y1[:len(x0)], y2[:len(x0)], y3[:len(x0)]
		if p == 0 { // unit twiddles: the whole last stage, and a share of the others
			for q, a0 := range x0 {
				a1, a2, a3 := x1[q], x2[q], x3[q]
				t0, t1 := a0+a2, a0-a2
				t2, d := a1+a3, a1-a3
				t3 := complex(imag(d), -real(d))
				y0[q] = t0 + t2
				y1[q] = t1 + t3
				y2[q] = t0 - t2
				y3[q] = t1 - t3
			}
			continue
		}
		w1, w2, w3 := tw[3*p], tw[3*p+1], tw[3*p+2]
		for q, a0 := range x0 {
			a1, a2, a3 := x1[q], x2[q], x3[q]
			t0, t1 := a0+a2, a0-a2
			t2, d := a1+a3, a1-a3
			t3 := complex(imag(d), -real(d))
			y0[q] = t0 + t2
			y1[q] = (t1 + t3) * w1
			y2[q] = (t0 - t2) * w2
			y3[q] = (t1 - t3) * w3
		}
	}
}

// sin(2π/3), for the radix-3 butterfly.
const sin3 = 0.86602540378443864676372317075293618347140262690519

func (st *fftStage) pass3(x, y []complex128) {
	s, m, tw := st.s, st.m, st.tw
	if s < shortStride {
		for p := range m {
			w1, w2 := tw[2*p], tw[2*p+1]
			xb, yb, sm := s*p, 3*s*p, s*m
			for q := range s {
				a0, a1, a2 := x[xb+q], x[xb+q+sm], x[xb+q+2*sm]
				t, d := a1+a2, a1-a2
				c := a0 - complex(0.5*real(t), 0.5*imag(t))
				e := complex(sin3*imag(d), -sin3*real(d))
				y[yb+q] = a0 + t
				y[yb+s+q] = (c + e) * w1
				y[yb+2*s+q] = (c - e) * w2
			}
		}
		return
	}
	for p := range m {
		x0 := x[s*p : s*p+s]
		x1 := x[s*(p+m) : s*(p+m)+s]
		x2 := x[s*(p+2*m) : s*(p+2*m)+s]
		o := y[3*s*p : 3*s*p+3*s]
		y0, y1, y2 := o[:s], o[s:2*s], o[2*s:3*s]
		x1, x2 = x1[:len(x0)], x2[:len(x0)]
		y0, y1, y2 = y0[:len(x0)], y1[:len(x0)], y2[:len(x0)]
		if p == 0 {
			for q, a0 := range x0 {
				a1, a2 := x1[q], x2[q]
				t, d := a1+a2, a1-a2
				c := a0 - complex(0.5*real(t), 0.5*imag(t))
				e := complex(sin3*imag(d), -sin3*real(d))
				y0[q] = a0 + t
				y1[q] = c + e
				y2[q] = c - e
			}
			continue
		}
		w1, w2 := tw[2*p], tw[2*p+1]
		for q, a0 := range x0 {
			a1, a2 := x1[q], x2[q]
			t, d := a1+a2, a1-a2
			c := a0 - complex(0.5*real(t), 0.5*imag(t))
			e := complex(sin3*imag(d), -sin3*real(d)) // −j·sin(2π/3)·(a1−a2)
			y0[q] = a0 + t
			y1[q] = (c + e) * w1
			y2[q] = (c - e) * w2
		}
	}
}

// Cosines and sines of 2π/5 and 4π/5, for the radix-5 butterfly.
const (
	cos5a = 0.30901699437494742410229341718281905886436439349376
	cos5b = -0.80901699437494742410229341718281905886436439349376
	sin5a = 0.95105651629515357211643933337938214340569863412575
	sin5b = 0.58778525229247312916870595463907276859765243764314
)

// bfly5 returns the five outputs of a radix-5 butterfly before twiddling.
func bfly5(a0, a1, a2, a3, a4 complex128) (b0, b1, b2, b3, b4 complex128) {
	t1, t2 := a1+a4, a2+a3
	d1, d2 := a1-a4, a2-a3
	c1 := complex(real(a0)+cos5a*real(t1)+cos5b*real(t2), imag(a0)+cos5a*imag(t1)+cos5b*imag(t2))
	c2 := complex(real(a0)+cos5b*real(t1)+cos5a*real(t2), imag(a0)+cos5b*imag(t1)+cos5a*imag(t2))
	// −j·(sin5a·d1 + sin5b·d2) and −j·(sin5b·d1 − sin5a·d2).
	u1r, u1i := sin5a*real(d1)+sin5b*real(d2), sin5a*imag(d1)+sin5b*imag(d2)
	u2r, u2i := sin5b*real(d1)-sin5a*real(d2), sin5b*imag(d1)-sin5a*imag(d2)
	e1 := complex(u1i, -u1r)
	e2 := complex(u2i, -u2r)
	return a0 + t1 + t2, c1 + e1, c2 + e2, c2 - e2, c1 - e1
}

func (st *fftStage) pass5(x, y []complex128) {
	s, m, tw := st.s, st.m, st.tw
	if s < shortStride {
		for p := range m {
			w := tw[4*p : 4*p+4]
			xb, yb, sm := s*p, 5*s*p, s*m
			for q := range s {
				b0, b1, b2, b3, b4 := bfly5(x[xb+q], x[xb+q+sm], x[xb+q+2*sm], x[xb+q+3*sm], x[xb+q+4*sm])
				y[yb+q] = b0
				y[yb+s+q] = b1 * w[0]
				y[yb+2*s+q] = b2 * w[1]
				y[yb+3*s+q] = b3 * w[2]
				y[yb+4*s+q] = b4 * w[3]
			}
		}
		return
	}
	for p := range m {
		x0 := x[s*p : s*p+s]
		x1 := x[s*(p+m) : s*(p+m)+s]
		x2 := x[s*(p+2*m) : s*(p+2*m)+s]
		x3 := x[s*(p+3*m) : s*(p+3*m)+s]
		x4 := x[s*(p+4*m) : s*(p+4*m)+s]
		o := y[5*s*p : 5*s*p+5*s]
		y0, y1, y2, y3, y4 := o[:s], o[s:2*s], o[2*s:3*s], o[3*s:4*s], o[4*s:5*s]
		x1, x2, x3, x4 = x1[:len(x0)], x2[:len(x0)], x3[:len(x0)], x4[:len(x0)]
		y0, y1, y2, y3, y4 = y0[:len(x0)], y1[:len(x0)], y2[:len(x0)], y3[:len(x0)], y4[:len(x0)]
		if p == 0 {
			for q, a0 := range x0 {
				y0[q], y1[q], y2[q], y3[q], y4[q] = bfly5(a0, x1[q], x2[q], x3[q], x4[q])
			}
			continue
		}
		w := tw[4*p : 4*p+4]
		w1, w2, w3, w4 := w[0], w[1], w[2], w[3]
		for q, a0 := range x0 {
			a1, a2, a3, a4 := x1[q], x2[q], x3[q], x4[q]
			t1, t2 := a1+a4, a2+a3
			d1, d2 := a1-a4, a2-a3
			c1 := complex(real(a0)+cos5a*real(t1)+cos5b*real(t2), imag(a0)+cos5a*imag(t1)+cos5b*imag(t2))
			c2 := complex(real(a0)+cos5b*real(t1)+cos5a*real(t2), imag(a0)+cos5b*imag(t1)+cos5a*imag(t2))
			// −j·(sin5a·d1 + sin5b·d2) and −j·(sin5b·d1 − sin5a·d2).
			u1r, u1i := sin5a*real(d1)+sin5b*real(d2), sin5a*imag(d1)+sin5b*imag(d2)
			u2r, u2i := sin5b*real(d1)-sin5a*real(d2), sin5b*imag(d1)-sin5a*imag(d2)
			e1 := complex(u1i, -u1r)
			e2 := complex(u2i, -u2r)
			y0[q] = a0 + t1 + t2
			y1[q] = (c1 + e1) * w1
			y2[q] = (c2 + e2) * w2
			y3[q] = (c2 - e2) * w3
			y4[q] = (c1 - e1) * w4
		}
	}
}

// pass4pre is the first radix-4 stage (s = 1) applied to conj(x[i]·pre[i]).
func (st *fftStage) pass4pre(x, y, pre []complex128) {
	m, tw := st.m, st.tw
	x0, x1, x2, x3 := x[:m], x[m:2*m], x[2*m:3*m], x[3*m:4*m]
	p0, p1, p2, p3 := pre[:m], pre[m:2*m], pre[2*m:3*m], pre[3*m:4*m]
	for p := range x0 {
		o := y[4*p : 4*p+4 : 4*p+4]
		w := tw[3*p : 3*p+3 : 3*p+3]
		a0, a1 := conjMul(x0[p], p0[p]), conjMul(x1[p], p1[p])
		a2, a3 := conjMul(x2[p], p2[p]), conjMul(x3[p], p3[p])
		t0, t1 := a0+a2, a0-a2
		t2, d := a1+a3, a1-a3
		t3 := complex(imag(d), -real(d))
		o[0] = t0 + t2
		o[1] = (t1 + t3) * w[0]
		o[2] = (t0 - t2) * w[1]
		o[3] = (t1 - t3) * w[2]
	}
}
