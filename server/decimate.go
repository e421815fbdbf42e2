package server

import (
	"math"
	"slices"
	"strconv"
)

// Plot value limits. JSON has no NaN or infinity, and 10·log10(0) is −Inf,
// so every plotted value is clamped into [floorDB, ceilDB] (dB series) or
// [-maxAmp, maxAmp] (linear series) before it is encoded.
const (
	floorDB = -150.0
	ceilDB  = 400.0
	maxAmp  = 1e12
)

// points is a polyline as flat pairs x0, y0, x1, y1, …
type points []float64

// Decimal places of encoded plot values: range to 0.01 m, dB values to
// 0.01 dB, linear amplitudes (noise rms = 1) to 0.001. All are far below
// a pixel.
const (
	xDecimals   = 2
	dbDecimals  = 2
	ampDecimals = 3
)

// appendJSON appends p as the ECharts data array [[x0,y0],[x1,y1],…],
// with y to yDecimals places. It writes the bytes directly: encoding/json
// would re-scan a Marshaler's output, and fixed-point digits cost a
// fraction of general float formatting.
func (p points) appendJSON(b []byte, yDecimals int) []byte {
	b = slices.Grow(b, 20*len(p)/2+2)
	b = append(b, '[')
	for i := 0; i+1 < len(p); i += 2 {
		if i > 0 {
			b = append(b, ',')
		}
		b = append(b, '[')
		b = appendFixed(b, p[i], xDecimals)
		b = append(b, ',')
		b = appendFixed(b, p[i+1], yDecimals)
		b = append(b, ']')
	}
	return append(b, ']')
}

var pow10 = [...]int64{1, 10, 100, 1000, 10000}

// appendFixed appends v rounded to dec decimal places (dec ≤ 4), without
// trailing zeros. |v| must stay below 1e14, which the clamps ensure.
func appendFixed(b []byte, v float64, dec int) []byte {
	scale := pow10[dec]
	n := int64(math.Round(v * float64(scale)))
	if n < 0 {
		b = append(b, '-')
		n = -n
	}
	b = strconv.AppendInt(b, n/scale, 10)
	frac := n % scale
	if frac == 0 {
		return b
	}
	for frac%10 == 0 {
		frac /= 10
		dec--
	}
	b = append(b, '.')
	for d := dec - 1; d >= 0; d-- {
		b = append(b, byte('0'+frac/pow10[d]%10))
	}
	return b
}

// clampDB maps NaN and −Inf to floorDB and +Inf to ceilDB.
func clampDB(v float64) float64 {
	switch {
	case math.IsNaN(v) || v < floorDB:
		return floorDB
	case v > ceilDB:
		return ceilDB
	}
	return v
}

func clampAmp(v float64) float64 {
	switch {
	case math.IsNaN(v):
		return 0
	case v > maxAmp:
		return maxAmp
	case v < -maxAmp:
		return -maxAmp
	}
	return v
}

// grid is a uniform sample axis: sample k lies at x0 + k·dx.
// When xs is set, sample k lies at xs[k] instead (an axis that need not
// be uniform, used whole).
type grid struct {
	x0, dx float64
	n      int
	xs     []float64
}

func (g grid) x(k int) float64 {
	if g.xs != nil {
		return g.xs[k]
	}
	return g.x0 + float64(k)*g.dx
}

// index returns the sample nearest x, clamped into [0, n].
func (g grid) index(x float64) int {
	if g.dx <= 0 {
		return 0
	}
	k := math.Round((x - g.x0) / g.dx)
	switch {
	case !(k >= 0):
		return 0
	case k > float64(g.n):
		return g.n
	}
	return int(k)
}

// span is the part of a grid to plot and how finely.
type span struct {
	lo, hi  int // samples [lo, hi) inside the zoom
	columns int // pixel columns across the whole plot
}

// plan chooses the samples to plot for a view of range [a, b] (or the
// whole grid when view is nil) on a plot width pixels wide: inside the
// zoom, per-column min/max to about two points per pixel (every sample
// when there are fewer); outside it, the same at the density the whole
// window would get, so that panning shows an outline at once.
func plan(g grid, view *[2]float64, width int) span {
	sp := span{lo: 0, hi: g.n, columns: width}
	if view != nil {
		sp.lo = g.index(view[0])
		sp.hi = min(g.index(view[1])+1, g.n)
		if sp.hi <= sp.lo {
			sp.lo, sp.hi = 0, g.n
		}
	}
	return sp
}

// decimate returns the min/max decimation of y on grid g for span sp,
// with value clamped by clamp.
func decimate(g grid, y func(k int) float64, sp span) points {
	if g.n == 0 {
		return points{}
	}
	return decimateInto(make(points, 0, 8*sp.columns+8), g, y, sp)
}

// decimateInto is decimate appending to out, which it returns: with out's
// capacity reused, nothing is allocated.
func decimateInto(out points, g grid, y func(k int) float64, sp span) points {
	n := g.n
	if n == 0 {
		return out
	}
	// Outside the zoom, columns are as wide as a pixel of the whole window.
	outer := max(1, n/max(1, sp.columns))
	out = minmax(out, g, y, 0, sp.lo, outer)
	inner := max(1, (sp.hi-sp.lo)/max(1, sp.columns))
	out = minmax(out, g, y, sp.lo, sp.hi, inner)
	return minmax(out, g, y, sp.hi, n, outer)
}

// minmax appends, for each run of per samples in [lo, hi), the smallest
// and the largest value in sample order, so that no peak is lost. With
// per ≤ 2 it appends every sample.
func minmax(out points, g grid, y func(k int) float64, lo, hi, per int) points {
	if per <= 2 {
		for k := lo; k < hi; k++ {
			out = append(out, g.x(k), y(k))
		}
		return out
	}
	for start := lo; start < hi; start += per {
		end := min(start+per, hi)
		kmin, kmax := start, start
		vmin, vmax := y(start), y(start)
		for k := start + 1; k < end; k++ {
			v := y(k)
			if v < vmin {
				kmin, vmin = k, v
			}
			if v > vmax {
				kmax, vmax = k, v
			}
		}
		switch {
		case kmin == kmax:
			out = append(out, g.x(kmin), vmin)
		case kmin < kmax:
			out = append(out, g.x(kmin), vmin, g.x(kmax), vmax)
		default:
			out = append(out, g.x(kmax), vmax, g.x(kmin), vmin)
		}
	}
	return out
}
