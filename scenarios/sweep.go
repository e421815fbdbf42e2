package scenarios

import (
	"context"
	"encoding/json"
	"errors"
	"fmt"
	"math"
	"strconv"
	"strings"
	"sync"
)

// MaxSweepPoints bounds the points of one sweep grid.
const MaxSweepPoints = 100000

// Axis is one swept path and the values it takes, as JSON values.
type Axis struct {
	Path   string
	Values []json.RawMessage
}

// ParseAxis reads PATH=START:STOP:STEP (STOP included when the steps land
// on it within a millionth of a step), PATH=V1,V2,… or PATH=VALUE (one
// value: a fixed setting such as receiver.window.kind=taylor). Values
// that are not numbers are strings.
func ParseAxis(spec string) (Axis, error) {
	return parseAxis(spec, false)
}

// CountAxes returns the number of points of the grid the specs (as
// ParseAxis reads them) span, without making their values, so that an
// oversized grid is refused before any work: the product is checked at
// each factor and never overflows. The error wraps ErrInvalid.
func CountAxes(specs []string) (int, error) {
	g := &Grid{}
	for _, spec := range specs {
		a, err := parseAxis(spec, true)
		if err != nil {
			return 0, err
		}
		g.Axes = append(g.Axes, a)
	}
	return g.Count()
}

// parseAxis is ParseAxis; with countOnly, Values has the right length
// but holds nil values.
func parseAxis(spec string, countOnly bool) (Axis, error) {
	path, vals, ok := strings.Cut(spec, "=")
	if !ok || path == "" || vals == "" {
		return Axis{}, fmt.Errorf("sweep %q: want PATH=START:STOP:STEP, PATH=V1,V2,… or PATH=VALUE: %w", spec, ErrInvalid)
	}
	a := Axis{Path: path}
	if _, err := parsePath(path); err != nil {
		return Axis{}, err
	}
	parts := strings.Split(vals, ":")
	switch {
	case len(parts) == 3:
		var f [3]float64
		for i, p := range parts {
			v, err := strconv.ParseFloat(strings.TrimSpace(p), 64)
			if err != nil || math.IsInf(v, 0) || math.IsNaN(v) {
				return Axis{}, fmt.Errorf("sweep %s: %q in %s is not a number: %w", path, p, vals, ErrInvalid)
			}
			f[i] = v
		}
		start, stop, step := f[0], f[1], f[2]
		if step == 0 || (stop-start)*step < 0 {
			return Axis{}, fmt.Errorf("sweep %s: step %g does not lead from %g to %g: %w", path, step, start, stop, ErrInvalid)
		}
		n := math.Floor((stop-start)/step+1e-6) + 1
		if !(n <= MaxSweepPoints) { // NaN too
			return Axis{}, fmt.Errorf("sweep %s: %g points is over the limit of %d: %w", path, n, MaxSweepPoints, ErrInvalid)
		}
		if countOnly {
			a.Values = make([]json.RawMessage, int(n))
			return a, nil
		}
		for i := 0; i < int(n); i++ {
			v := start + float64(i)*step
			// Round off the binary noise of i·step (0.1·3 = 0.30000000000000004).
			v, _ = strconv.ParseFloat(strconv.FormatFloat(v, 'g', 12, 64), 64)
			a.Values = append(a.Values, json.RawMessage(strconv.FormatFloat(v, 'g', -1, 64)))
		}
	case len(parts) == 1:
		list := strings.Split(vals, ",")
		if len(list) > MaxSweepPoints {
			return Axis{}, fmt.Errorf("sweep %s: %d values is over the limit of %d: %w", path, len(list), MaxSweepPoints, ErrInvalid)
		}
		if countOnly {
			a.Values = make([]json.RawMessage, len(list))
			return a, nil
		}
		for _, v := range list {
			a.Values = append(a.Values, ParseValue(v))
		}
	default:
		return Axis{}, fmt.Errorf("sweep %s: %q is not START:STOP:STEP: %w", path, vals, ErrInvalid)
	}
	return a, nil
}

// Label returns the text of one value of the axis: a number as written,
// a string without its quotes.
func (a Axis) Label(i int) string {
	var s string
	if json.Unmarshal(a.Values[i], &s) == nil {
		return s
	}
	return string(a.Values[i])
}

// Grid is a base scenario and the axes swept over it. Points run in
// row-major order: the first axis varies slowest.
type Grid struct {
	Base *Scenario
	Axes []Axis
}

// Len returns the number of points, or -1 when it is over
// MaxSweepPoints (Count says by how much).
func (g *Grid) Len() int {
	n, err := g.Count()
	if err != nil {
		return -1
	}
	return n
}

// Count returns the number of points, the product of the axes' lengths,
// computed with a check at each factor so that no product overflows: a
// grid over MaxSweepPoints (or with an empty axis) is an error wrapping
// ErrInvalid that gives each axis's length. It costs nothing but the
// multiplications, so a caller can refuse a grid before doing anything.
func (g *Grid) Count() (int, error) {
	n := 1
	lens := make([]string, len(g.Axes))
	over := false
	for k, a := range g.Axes {
		lens[k] = fmt.Sprintf("%s: %d", a.Path, len(a.Values))
		if len(a.Values) == 0 {
			return 0, fmt.Errorf("sweep %s has no values: %w", a.Path, ErrInvalid)
		}
		if !over && n > MaxSweepPoints/len(a.Values) {
			over = true
		}
		if !over {
			n *= len(a.Values)
		}
	}
	if over || n > MaxSweepPoints {
		what := fmt.Sprint(n)
		if over {
			what = "more than " + strconv.Itoa(MaxSweepPoints)
		}
		return 0, fmt.Errorf("sweep grid of %s points (%s) is over the limit of %d: %w", what, strings.Join(lens, " × "), MaxSweepPoints, ErrInvalid)
	}
	return n, nil
}

// prevalidate is the largest grid whose points are all validated before
// the first is evaluated; larger grids validate each axis's values alone
// up front and each point as it is evaluated.
const prevalidate = 2000

// Validate checks the grid before anything runs: its size (Count), each
// axis's values (the two ends of one longer than 100) with the other axes
// at their first value, and, for grids
// of up to prevalidate points, every point. It stops with ctx.Err() when ctx is
// cancelled.
func (g *Grid) Validate(ctx context.Context) error {
	n, err := g.Count()
	if err != nil {
		return err
	}
	// The cross through point 0: each axis's values, the others at their
	// first value. A long axis is checked at its ends only (a range's
	// values are monotonic, so its ends meet any bound first).
	idx := make([]int, len(g.Axes))
	for k, a := range g.Axes {
		for i := range a.Values {
			if len(a.Values) > 100 && i != 0 && i != len(a.Values)-1 {
				continue
			}
			if err := ctx.Err(); err != nil {
				return err
			}
			idx[k] = i
			if _, err := g.scenarioAt(idx); err != nil {
				return err
			}
		}
		idx[k] = 0
	}
	if n <= prevalidate {
		for i := range n {
			if err := ctx.Err(); err != nil {
				return err
			}
			if _, err := g.Scenario(i); err != nil {
				return err
			}
		}
	}
	return nil
}

// Index returns the value index on each axis of point i.
func (g *Grid) Index(i int) []int {
	idx := make([]int, len(g.Axes))
	for k := len(g.Axes) - 1; k >= 0; k-- {
		n := len(g.Axes[k].Values)
		idx[k] = i % n
		i /= n
	}
	return idx
}

// Scenario returns the scenario of point i, validated.
func (g *Grid) Scenario(i int) (*Scenario, error) {
	return g.scenarioAt(g.Index(i))
}

func (g *Grid) scenarioAt(idx []int) (*Scenario, error) {
	sets := make([]Assignment, len(g.Axes))
	for k, a := range g.Axes {
		sets[k] = Assignment{Path: a.Path, Value: a.Values[idx[k]]}
	}
	s, err := With(g.Base, sets...)
	if err != nil {
		return nil, fmt.Errorf("sweep point %s: %w", g.describe(idx), err)
	}
	return s, nil
}

func (g *Grid) describe(idx []int) string {
	parts := make([]string, len(idx))
	for k, j := range idx {
		parts[k] = g.Axes[k].Path + "=" + g.Axes[k].Label(j)
	}
	return strings.Join(parts, ", ")
}

// Point is the outcome of one grid point.
type Point struct {
	Index  int   // position in the grid, row-major
	Values []int // value index on each axis
	Report *Report
}

// Run evaluates every point of the grid on the given number of workers
// (at least 1) and calls emit once per point in grid order, from the
// calling goroutine. The grid is checked with Validate first, so an
// oversized grid or a value outside a field's range fails at once; a
// point of a large grid that is invalid only in combination stops the
// run when it is reached, with an error naming it. When ctx is
// cancelled, Run stops handing out points, emits the completed points that
// precede the first missing one, and returns ctx.Err(). An error from
// emit stops the run and is returned.
func (g *Grid) Run(ctx context.Context, workers int, emit func(Point) error) error {
	return g.RunShard(ctx, Whole, workers, emit)
}

// RunShard is Run for the points of one shard (Shard: points i with
// i mod N = K), emitted in grid order. Each point is the grid's point i
// whatever the shard (its scenario, seed included, depends on i alone),
// so the N shards together emit exactly the points of Run. The whole grid
// is validated, in every shard, so that all shards of an invalid grid
// fail alike; a shard that owns no point (N larger than the grid) emits
// nothing.
func (g *Grid) RunShard(ctx context.Context, sh Shard, workers int, emit func(Point) error) error {
	if err := g.Validate(ctx); err != nil {
		return err
	}
	total, _ := g.Count()
	if sh.N < 1 || sh.K < 0 || sh.K >= sh.N {
		return fmt.Errorf("sweep shard %d/%d: K must be in 0…N−1 and N at least 1: %w", sh.K, sh.N, ErrInvalid)
	}
	n := sh.Len(total) // this shard's points; the j-th is point sh.Item(j)
	workers = max(1, min(workers, n))
	ctx, cancel := context.WithCancel(ctx)
	defer cancel()

	type done struct {
		i   int // position within the shard
		rep *Report
		err error
	}
	jobs := make(chan int)
	results := make(chan done)
	var wg sync.WaitGroup
	for range workers {
		wg.Add(1)
		go func() {
			defer wg.Done()
			var e Engine
			for j := range jobs {
				i := sh.Item(j)
				s, err := g.Scenario(i)
				var rep *Report
				if err == nil {
					rep, err = e.Analyse(ctx, s)
				}
				select {
				case results <- done{j, rep, err}:
				case <-ctx.Done():
					return
				}
			}
		}()
	}
	go func() {
		defer close(jobs)
		for j := range n {
			select {
			case jobs <- j:
			case <-ctx.Done():
				return
			}
		}
	}()
	go func() {
		wg.Wait()
		close(results)
	}()

	pending := make(map[int]*Report)
	next := 0
	var runErr error
	for d := range results {
		if runErr != nil {
			continue // drain
		}
		if d.err != nil {
			if errors.Is(d.err, context.Canceled) || errors.Is(d.err, context.DeadlineExceeded) {
				continue
			}
			runErr = d.err
			if !strings.HasPrefix(d.err.Error(), "sweep point") {
				runErr = fmt.Errorf("sweep point %s: %w", g.describe(g.Index(sh.Item(d.i))), d.err)
			}
			cancel()
			continue
		}
		pending[d.i] = d.rep
		for ctx.Err() == nil { // once cancelled (by the caller too), emit no more
			rep, ok := pending[next]
			if !ok {
				break
			}
			delete(pending, next)
			i := sh.Item(next)
			if err := emit(Point{Index: i, Values: g.Index(i), Report: rep}); err != nil {
				runErr = err
				cancel()
				break
			}
			next++
		}
	}
	if runErr != nil {
		return runErr
	}
	if next < n {
		if err := ctx.Err(); err != nil {
			return err
		}
	}
	return nil
}
