package dsp

import "math"

// Simpson returns the composite Simpson's rule of f over [a, a + n·h]:
//
//	h/3 · (f(x₀) + 4f(x₁) + 2f(x₂) + 4f(x₃) + … + 4f(xₙ₋₁) + f(xₙ)),
//
// xᵢ = a + i·h: the extended Simpson's rule (Abramowitz & Stegun,
// Handbook of Mathematical Functions, 25.4.6; the equation number from
// memory), exact for cubic polynomials. The result is in the units of f
// times those of h. f is called n + 1 times, in order of increasing i,
// and each point is computed as a + float64(i)·h (not by accumulating h),
// so the abscissae do not drift. n must be even and at least 2 and h
// finite; otherwise Simpson returns NaN without calling f.
func Simpson(f func(x float64) float64, a, h float64, n int) float64 {
	if n < 2 || n%2 != 0 || math.IsNaN(h) || math.IsInf(h, 0) {
		return math.NaN()
	}
	sum := 0.0
	for i := 0; i <= n; i++ {
		w := 2.0
		switch {
		case i == 0 || i == n:
			w = 1
		case i%2 == 1:
			w = 4
		}
		sum += w * f(a+float64(i)*h)
	}
	return sum * h / 3
}

// gk15Rule returns the 15-point Gauss–Kronrod rule on [−1, 1] and its
// embedded 7-point Gauss rule (the constants of QUADPACK's qk15, Piessens
// et al., QUADPACK, Springer 1983, as published there; checked by the
// exactness tests in quad_test.go): the Kronrod abscissae ±x[i] (x[7] = 0)
// with weights wk[i], and the Gauss weights wg[j] at x[2j+1]. A function,
// not a table, so that the package keeps no variables.
func gk15Rule() (x, wk [8]float64, wg [4]float64) {
	x = [8]float64{
		0.991455371120812639206854697526329, 0.949107912342758524526189684047851,
		0.864864423359769072789712788640926, 0.741531185599394439863864773280788,
		0.586087235467691130294144845693013, 0.405845151377397166906606412076961,
		0.207784955007898467600689403773245, 0,
	}
	wk = [8]float64{
		0.022935322010529224963732008058970, 0.063092092629978553290700663189204,
		0.104790010322250183839876322541518, 0.140653259715525918745189590510238,
		0.169004726639267902826583426598550, 0.190350578064785409913256402421014,
		0.204432940075298892414161999234649, 0.209482141084727828012999174891714,
	}
	wg = [4]float64{
		0.129484966168869693270611432679082, 0.279705391489276667901467771423780,
		0.381830050505118944950369775488975, 0.417959183673469387755102040816327,
	}
	return x, wk, wg
}

// gk15Panel returns the 15-point Kronrod estimate of ∫_a^b f and the
// absolute difference from the embedded 7-point Gauss estimate (a
// pessimistic bound on the Kronrod estimate's error for smooth f).
func gk15Panel(f func(float64) float64, a, b float64) (est, err float64) {
	x, wk, wg := gk15Rule()
	c, h := (a+b)/2, (b-a)/2
	fc := f(c)
	k := wk[7] * fc
	g := wg[3] * fc
	for i := range 7 {
		dx := h * x[i]
		s := f(c-dx) + f(c+dx)
		k += wk[i] * s
		if i%2 == 1 {
			g += wg[i/2] * s
		}
	}
	return k * h, math.Abs((k - g) * h)
}

// maxQuadPanels bounds adaptiveGK's panels (15 evaluations each).
const maxQuadPanels = 256

// adaptiveGK returns ∫ f over [edges[0], edges[len−1]], starting from the
// panels between consecutive edges (ascending; where the integrand changes
// fast, so that no feature falls inside a panel unseen) and halving the
// panel of largest error estimate until the estimates sum to at most
// rel·|∫| or maxQuadPanels panels are in use. Deterministic; it allocates
// nothing (the panels live on the stack). At most len(edges) − 1 ≤
// maxQuadPanels initial panels.
func adaptiveGK(f func(float64) float64, edges []float64, rel float64) float64 {
	type panel struct{ a, b, est, err float64 }
	var ps [maxQuadPanels]panel
	n := 0
	for i := 0; i+1 < len(edges) && n < maxQuadPanels; i++ {
		if !(edges[i+1] > edges[i]) {
			continue
		}
		e, r := gk15Panel(f, edges[i], edges[i+1])
		ps[n] = panel{edges[i], edges[i+1], e, r}
		n++
	}
	for {
		total, errSum, worst := 0.0, 0.0, 0
		for i := range n {
			total += ps[i].est
			errSum += ps[i].err
			if ps[i].err > ps[worst].err {
				worst = i
			}
		}
		if n == 0 || errSum <= rel*math.Abs(total) || errSum == 0 || n == maxQuadPanels {
			return total
		}
		p := ps[worst]
		m := (p.a + p.b) / 2
		if !(m > p.a && m < p.b) { // the panel cannot be halved in float64
			return total
		}
		e1, r1 := gk15Panel(f, p.a, m)
		e2, r2 := gk15Panel(f, m, p.b)
		ps[worst] = panel{p.a, m, e1, r1}
		ps[n] = panel{m, p.b, e2, r2}
		n++
	}
}
