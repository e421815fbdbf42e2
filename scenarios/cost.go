package scenarios

import (
	"errors"
	"fmt"
	"math"
	"math/bits"
	"runtime"
	"sort"
)

// Cost is the estimated peak memory of evaluating a scenario (Evaluate,
// with plot series and suggestions), computed from its sizes alone
// before anything is allocated, and the share each field has in it.
//
// The estimate is a sum of terms, each a size times bytes per element,
// with the per-element figures calibrated against the heap measured with
// runtime/metrics while real evaluations ran (TestCostBoundsMeasuredHeap
// states the measured ratios: the estimate stays above the measured peak
// and within a few times of it).
type Cost struct {
	Bytes int64 // estimated peak heap of one evaluation, bytes
	// Drivers lists the terms, largest first: the JSON path of the field
	// that sets each term's size, and the term's bytes.
	Drivers []CostDriver
}

// CostDriver is one term of a Cost.
type CostDriver struct {
	Path  string // the field whose value sets the size (radar.window_stop_m, waveform.pulse_width_s, …)
	What  string // what grows with it, in words
	Bytes int64
}

// Bytes per element of each term, from the calibration in cost_test.go
// (measured on linux/amd64, Go 1.25; common practice for the safety
// margin: the estimate is meant to stay above the measured peak).
const (
	costPerFFTPoint     = 96   // window compression: FFT buffers and plan, per FFT point
	costPerWindowSample = 64   // noisy window, profiles and thresholds, per window sample
	costPerPulseSample  = 3200 // pulse, reference, interpolated response and figures, Doppler plan, per pulse or reference sample
	costPerCell         = 40   // pulse trains: data cube, range-Doppler maps (noisy, clean, linear), per pulse × window sample
	costPerSpread       = 80   // a distributed target: density, response and clutter realisation, per sample it covers
	costPerPoint        = 24   // a point target: its local response, per pulse + reference sample
	costBase            = 4 << 20
)

// nextPow2 returns the least power of two ≥ n (n ≥ 1).
func nextPow2(n int) int {
	if n <= 1 {
		return 1
	}
	return 1 << bits.Len(uint(n-1))
}

// EstimateCost returns the estimated peak memory of evaluating a valid
// scenario (as Decode returns it). For pulse trains it depends on the
// number of processors (runtime.GOMAXPROCS), one simulation worker each.
func EstimateCost(s *Scenario) Cost {
	n := s.WindowSamples()
	np := s.PulseSamples()
	nr := np // the reference: a matched filter spans the pulse
	if f := s.Receiver.Filter; f == FilterLeastSquares || f == FilterMinimax {
		nr = max(1, s.Receiver.FilterLengthFactor) * np
	}
	p := max(1, s.Radar.Pulses)
	var c Cost
	add := func(path, what string, b float64) {
		if b > 0 {
			c.Drivers = append(c.Drivers, CostDriver{Path: path, What: what, Bytes: int64(math.Min(b, 1<<62))})
		}
	}
	nfft := nextPow2(n + 2*nr + 2)
	add("radar.window_stop_m", fmt.Sprintf("a receive window of %d samples", n),
		float64(costPerFFTPoint)*float64(nfft)+float64(costPerWindowSample)*float64(n))
	add("waveform.pulse_width_s", fmt.Sprintf("a pulse of %d samples and a reference of %d", np, nr),
		float64(costPerPulseSample)*float64(np+nr)/2)
	if p > 1 {
		add("radar.pulses", fmt.Sprintf("%d pulses × %d window samples", p, n),
			float64(costPerCell)*float64(p)*float64(n))
	}
	if sc := s.Radar.Schedule; sc != nil {
		// Every later CPI of more than one pulse keeps its own maps
		// (Result.CPISeries) while the next is simulated.
		cells := 0.0
		for k := 1; k < sc.N(); k++ {
			if c := s.cpiScenario(k); c.Radar.Pulses > 1 {
				cells += float64(c.Radar.Pulses) * float64(c.WindowSamples())
			}
		}
		add("radar.schedule", fmt.Sprintf("range–Doppler maps of %d more CPIs", sc.N()-1), float64(costPerCell)*cells)
	}
	nDist := 0
	for _, t := range s.Targets {
		if t.Kind != TargetPoint {
			nDist++
		}
	}
	if p > 1 {
		// Each of the simulation's workers (one per processor) compresses
		// whole pulses and keeps its own copy of every clutter field's
		// buffers.
		w := runtime.GOMAXPROCS(0)
		add("radar.pulses", fmt.Sprintf("%d simulation workers' buffers for %d window samples", w, n),
			float64(w)*(float64(costPerFFTPoint)*float64(nfft)+float64(nDist)*float64(costPerSpread)*float64(n+2*np)))
	}
	var spread, points float64
	nDist = 0
	for _, t := range s.Targets {
		if t.Kind == TargetPoint {
			points += float64(np + nr)
			continue
		}
		nDist++
		k := math.Abs(t.RangeStopM-t.RangeStartM) * 2 / C * s.Radar.SampleRateHz
		spread += math.Min(k, float64(n)) + float64(2*np)
	}
	if nDist > 0 {
		add("targets", fmt.Sprintf("%d extended or volume targets covering %.0f samples", nDist, spread),
			float64(costPerSpread)*spread)
	}
	if points > 0 {
		add("targets", fmt.Sprintf("%d point targets", len(s.Targets)-nDist), float64(costPerPoint)*points)
	}
	sort.SliceStable(c.Drivers, func(i, j int) bool { return c.Drivers[i].Bytes > c.Drivers[j].Bytes })
	c.Bytes = costBase
	for _, d := range c.Drivers {
		c.Bytes += d.Bytes
	}
	if c.Bytes < 0 {
		c.Bytes = math.MaxInt64
	}
	return c
}

// ErrTooCostly marks a valid scenario whose evaluation would need more
// memory than the evaluator allows.
var ErrTooCostly = errors.New("too costly")

// CostError refuses a scenario whose estimated cost is over a limit. It
// matches ErrTooCostly under errors.Is and names the fields that drive
// the cost.
type CostError struct {
	Cost  Cost
	Limit int64 // bytes one evaluation may use
}

func (e *CostError) Error() string {
	return fmt.Sprintf("evaluating this scenario needs about %s of memory, over the limit of %s for one evaluation; %s",
		MiB(e.Cost.Bytes), MiB(e.Limit), e.hint())
}

func (e *CostError) hint() string {
	if len(e.Cost.Drivers) == 0 {
		return "reduce its size"
	}
	d := e.Cost.Drivers[0]
	return fmt.Sprintf("most of it (%s) comes from %s (%s)", MiB(d.Bytes), d.What, d.Path)
}

// Is reports whether target is ErrTooCostly.
func (e *CostError) Is(target error) bool { return target == ErrTooCostly }

// Fields returns one problem per driving field, largest first: the
// message names the size, its memory and the limit.
func (e *CostError) Fields() []FieldError {
	out := []FieldError{}
	for _, d := range e.Cost.Drivers {
		if d.Bytes < e.Cost.Bytes/20 {
			continue // under 5 %: not worth changing
		}
		out = append(out, FieldError{Path: d.Path, Message: fmt.Sprintf("%s need about %s (the limit for a whole evaluation is %s)", d.What, MiB(d.Bytes), MiB(e.Limit))})
	}
	return out
}

// MiB formats a byte count in MiB or GiB.
func MiB(b int64) string {
	if b >= 1<<30 {
		return fmt.Sprintf("%.1f GiB", float64(b)/(1<<30))
	}
	return fmt.Sprintf("%.0f MiB", math.Ceil(float64(b)/(1<<20)))
}
