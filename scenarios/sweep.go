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
		if n > MaxSweepPoints {
			return Axis{}, fmt.Errorf("sweep %s: %g points is over the limit of %d: %w", path, n, MaxSweepPoints, ErrInvalid)
		}
		for i := 0; i < int(n); i++ {
			v := start + float64(i)*step
			// Round off the binary noise of i·step (0.1·3 = 0.30000000000000004).
			v, _ = strconv.ParseFloat(strconv.FormatFloat(v, 'g', 12, 64), 64)
			a.Values = append(a.Values, json.RawMessage(strconv.FormatFloat(v, 'g', -1, 64)))
		}
	case len(parts) == 1:
		for _, v := range strings.Split(vals, ",") {
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

// Len returns the number of points.
func (g *Grid) Len() int {
	n := 1
	for _, a := range g.Axes {
		n *= len(a.Values)
	}
	return n
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
	idx := g.Index(i)
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
// calling goroutine. Every point is decoded and validated before any is
// evaluated, so a value outside a field's range fails at once. When ctx is
// cancelled, Run stops handing out points, emits the completed points that
// precede the first missing one, and returns ctx.Err(). An error from
// emit stops the run and is returned.
func (g *Grid) Run(ctx context.Context, workers int, emit func(Point) error) error {
	n := g.Len()
	if n > MaxSweepPoints {
		return fmt.Errorf("sweep of %d points is over the limit of %d: %w", n, MaxSweepPoints, ErrInvalid)
	}
	scens := make([]*Scenario, n)
	for i := range scens {
		s, err := g.Scenario(i)
		if err != nil {
			return err
		}
		scens[i] = s
	}
	workers = max(1, min(workers, n))
	ctx, cancel := context.WithCancel(ctx)
	defer cancel()

	type done struct {
		i   int
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
			for i := range jobs {
				rep, err := e.Analyse(ctx, scens[i])
				select {
				case results <- done{i, rep, err}:
				case <-ctx.Done():
					return
				}
			}
		}()
	}
	go func() {
		defer close(jobs)
		for i := range n {
			select {
			case jobs <- i:
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
			runErr = fmt.Errorf("sweep point %s: %w", g.describe(g.Index(d.i)), d.err)
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
			if err := emit(Point{Index: next, Values: g.Index(next), Report: rep}); err != nil {
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
