package server

import (
	"context"
	"fmt"
	"net/http"
	"os"
	"strconv"
	"strings"
	"sync"
	"time"

	"github.com/pulsewright/pulsewright/scenarios"
)

// admission is the one limit on evaluations in flight, shared by REST
// requests and websocket sessions: a number of compute slots (one per
// processor) and a memory budget that the estimated cost of each running
// evaluation (scenarios.EstimateCost) is taken from.
type admission struct {
	slots chan struct{}
	limit int64 // bytes of the budget

	mu    sync.Mutex
	used  int64
	freed chan struct{} // closed and replaced whenever bytes are returned
}

func newAdmission(slots int, limit int64) *admission {
	return &admission{slots: make(chan struct{}, slots), limit: limit, freed: make(chan struct{})}
}

// errBusy answers an evaluation that waited for the budget until its
// deadline.
var errBusy = &statusError{http.StatusServiceUnavailable, "the server is busy with other evaluations and this one could not start before its deadline; try again shortly"}

// check refuses at once a scenario whose estimated cost is over the
// whole budget, with a *scenarios.CostError naming the fields that drive
// it.
func (a *admission) check(c scenarios.Cost) error {
	if c.Bytes > a.limit {
		return &scenarios.CostError{Cost: c, Limit: a.limit}
	}
	return nil
}

// reserve waits until c.Bytes fit in the budget and takes them; release
// returns them. It fails with the check's error, or errBusy when ctx ends
// first.
func (a *admission) reserve(ctx context.Context, c scenarios.Cost) (release func(), err error) {
	if err := a.check(c); err != nil {
		return nil, err
	}
	for {
		a.mu.Lock()
		if a.used+c.Bytes <= a.limit {
			a.used += c.Bytes
			a.mu.Unlock()
			var once sync.Once
			return func() {
				once.Do(func() {
					a.mu.Lock()
					a.used -= c.Bytes
					close(a.freed)
					a.freed = make(chan struct{})
					a.mu.Unlock()
				})
			}, nil
		}
		freed := a.freed
		a.mu.Unlock()
		select {
		case <-freed:
		case <-ctx.Done():
			return nil, fmt.Errorf("%w: %w", errBusy, ctx.Err())
		}
	}
}

// slot waits for a compute slot; the returned func gives it back.
func (a *admission) slot(ctx context.Context) (func(), error) {
	select {
	case a.slots <- struct{}{}:
		return func() { <-a.slots }, nil
	case <-ctx.Done():
		return nil, fmt.Errorf("%w: %w", errBusy, ctx.Err())
	}
}

// inUse returns the bytes reserved now.
func (a *admission) inUse() int64 {
	a.mu.Lock()
	defer a.mu.Unlock()
	return a.used
}

// defaultMemoryLimit is half the machine's memory as /proc/meminfo
// reports it, at most 4 GiB; 2 GiB where it cannot be read.
func defaultMemoryLimit() int64 {
	const fallback, most = 2 << 30, 4 << 30
	data, err := os.ReadFile("/proc/meminfo")
	if err != nil {
		return fallback
	}
	for _, line := range strings.Split(string(data), "\n") {
		if rest, ok := strings.CutPrefix(line, "MemTotal:"); ok {
			f := strings.Fields(rest)
			if len(f) >= 1 {
				if kb, err := strconv.ParseInt(f[0], 10, 64); err == nil && kb > 0 {
					return min(kb<<10/2, most)
				}
			}
		}
	}
	return fallback
}

// evaluate runs eval on sc under the admission: the cost check, a slot
// (unless the caller holds one), the memory reservation and the
// evaluation deadline.
func (s *Server) admitted(ctx context.Context, sc *scenarios.Scenario, haveSlot bool, eval Evaluator) (*scenarios.Result, error) {
	c := scenarios.EstimateCost(sc)
	if err := s.adm.check(c); err != nil {
		return nil, err
	}
	if !haveSlot {
		rel, err := s.adm.slot(ctx)
		if err != nil {
			return nil, err
		}
		defer rel()
	}
	rel, err := s.adm.reserve(ctx, c)
	if err != nil {
		return nil, err
	}
	defer rel()
	ctx, cancel := context.WithTimeoutCause(ctx, s.cfg.EvalTimeout, errEvalTimeout{s.cfg.EvalTimeout})
	defer cancel()
	res, err := eval(ctx, sc)
	if err != nil && context.Cause(ctx) != nil && ctx.Err() == context.DeadlineExceeded {
		if _, ok := context.Cause(ctx).(errEvalTimeout); ok {
			return nil, context.Cause(ctx)
		}
	}
	return res, err
}

// errEvalTimeout stops an evaluation that ran past Config.EvalTimeout.
type errEvalTimeout struct{ d time.Duration }

func (e errEvalTimeout) Error() string {
	return fmt.Sprintf("the evaluation took longer than the limit of %s and was stopped; a shorter window, fewer pulses or fewer extended targets make it quicker", e.d)
}
