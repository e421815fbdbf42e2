package scenarios

import (
	"context"
	"fmt"
	"math"
	"math/cmplx"
	"math/rand/v2"
	"runtime"
	"slices"
	"sync"

	"github.com/pulsewright/pulsewright/dsp"
)

// Monte Carlo trials (docs/detection-probability.md §8): N noisy
// realisations of a scenario through the evaluation's own synthesis,
// compression and detector, each with new thermal noise and new
// fluctuation draws, counted against the analytic Pd of the report.
//
// Trial i is the scenario evaluated with the seed TrialSeed(seed, i): its
// receive window (or pulse train) is the one Evaluate computes for that
// seed (the same draws; a single pulse's window from cached echoes,
// trialEchoes, equals it to rounding), so any trial can be opened on the
// page by setting the seed. A trial's draws depend on the scenario's seed
// and its index only, never on the worker that runs it, so counts are
// sums that any split of the trials (workers, machines) reproduces
// exactly.

// MaxTrials bounds the trials of one run.
const MaxTrials = 10_000_000

// trialMemory bounds the memory the workers of a run may hold at once:
// each holds one evaluation's buffers (EstimateCost), so a long pulse
// train runs on fewer workers than processors.
const trialMemory = 2 << 30

// quietPower is the noise-free scene power (re noise) below which a cell
// counts as noise only for the false-alarm count: −30 dB changes a
// cell's false-alarm probability by well under 1 %.
const quietPower = 1e-3

// TrialSeed returns the scenario seed of trial i (i ≥ 0) of a scenario
// whose seed is seed: the SplitMix64 finaliser (Steele, Lea & Flood,
// "Fast splittable pseudorandom number generators", OOPSLA 2014) of the
// seed and the index, kept to 0 … MaxSeed so that it is a valid scenario
// seed.
func TrialSeed(seed int64, i int) int64 {
	z := uint64(seed) + (uint64(i)+1)*0x9e3779b97f4a7c15
	z = (z ^ z>>30) * 0xbf58476d1ce4e5b9
	z = (z ^ z>>27) * 0x94d049bb133111eb
	z ^= z >> 31
	return int64(z & MaxSeed)
}

// Trials is a scenario prepared for Monte Carlo runs: its model, its
// noise-free scene, its analytic report and the cell each target is
// tested at. It is safe for concurrent use by Run.
type Trials struct {
	s      *Scenario
	m      *model
	sc     *scene
	report *Report
	cells  [][2]int  // per target: range gate and Doppler bin of its test; gate −1 when it has none
	tested []float64 // per target: its own noise-free power at that cell, re noise (the SNR its Pd test sees)
	quiet  []bool    // per range gate: noise only, its training cells too (false-alarm count)
	nQuiet int       // quiet cells per trial (gates, or gates × Doppler bins)
	// Single pulses: the gates a trial tests (targets' and quiet ones),
	// ascending, and whether they are few enough to take their thresholds
	// one by one (dsp.CFAR.LevelsAt) rather than the whole profile's.
	testGates []int
	fewGates  bool
	// randomPhase draws each point echo's carrier phase anew per trial
	// (SetRandomPhase).
	randomPhase bool
	// Single coherent pulses: what every worker of every run shares,
	// made once as the reference makes its set-up once: the cached
	// echoes (read-only), and a warmed detector and correlator that
	// workers clone (their multipliers and tables solved once).
	ech  *trialEchoes
	cf   *dsp.CFAR
	corr *dsp.Correlator
	// Workers of finished runs, kept for the next run (a worker's
	// buffers and plans are reset by each trial): as many as a run has
	// used at once.
	mu   sync.Mutex
	idle []*trialWorker
}

// worker returns an idle worker of an earlier run, or a new one.
func (t *Trials) worker() *trialWorker {
	t.mu.Lock()
	defer t.mu.Unlock()
	if n := len(t.idle); n > 0 {
		w := t.idle[n-1]
		t.idle = t.idle[:n-1]
		return w
	}
	return t.newWorker()
}

// release keeps w for a later run.
func (t *Trials) release(w *trialWorker) {
	t.mu.Lock()
	t.idle = append(t.idle, w)
	t.mu.Unlock()
}

// SetRandomPhase makes every trial draw each point target's carrier phase
// uniformly (a stream of its own per target and trial) instead of the
// phase its range gives: echoes that share a cell then add with a random
// relative phase, as they do from look to look when the targets move by
// fractions of a wavelength. Trial i is then no longer the engine's window
// for its seed. Single pulses only: a pulse train's phase follows each
// target's motion from pulse to pulse. Call it before Run.
func (t *Trials) SetRandomPhase(on bool) error {
	if on && t.sc.train != nil {
		return fmt.Errorf("random phase: radar.pulses is %d; it applies to single pulses, whose echoes keep no phase history: %w", t.s.Radar.Pulses, ErrInvalid)
	}
	if on != t.randomPhase {
		t.mu.Lock()
		t.idle = nil // their echoes and targets are for the other setting
		t.mu.Unlock()
	}
	if on != t.randomPhase && t.ech != nil {
		t.randomPhase = on
		t.ech = t.newWorker().echoCache() // the point echoes with or without their range's phase
	}
	t.randomPhase = on
	return nil
}

// TrialCounts are the raw counts of trials First … First+Trials−1. Counts
// of disjoint runs of one scenario add (Add).
type TrialCounts struct {
	First  int `json:"first_trial"`
	Trials int `json:"trials"`
	// Detections per target, in the scenario's order.
	Detections []int64 `json:"detections"`
	// FalseAlarms is the number of noise-only cells that crossed the
	// threshold, over NoiseCells cells tested.
	FalseAlarms int64 `json:"false_alarms"`
	NoiseCells  int64 `json:"noise_cells"`
}

// Add adds the counts of o, a run of the same scenario, to c. The runs
// must be adjacent (o starts where c ends, or c where o does) for the
// result to be a range of trials; Add reports an error otherwise.
func (c *TrialCounts) Add(o TrialCounts) error {
	if len(c.Detections) != len(o.Detections) {
		return fmt.Errorf("add trial counts: %d targets and %d targets", len(c.Detections), len(o.Detections))
	}
	switch {
	case c.Trials == 0:
		c.First = o.First
	case o.Trials == 0:
	case o.First == c.First+c.Trials:
	case c.First == o.First+o.Trials:
		c.First = o.First
	default:
		return fmt.Errorf("add trial counts: trials %d…%d and %d…%d are not adjacent", c.First, c.First+c.Trials-1, o.First, o.First+o.Trials-1)
	}
	c.Trials += o.Trials
	for j, d := range o.Detections {
		c.Detections[j] += d
	}
	c.FalseAlarms += o.FalseAlarms
	c.NoiseCells += o.NoiseCells
	return nil
}

// NewTrials prepares s (valid, as Decode returns it) for Monte Carlo
// runs: it evaluates the noise-free scene and the analytic report once.
func NewTrials(ctx context.Context, s *Scenario) (*Trials, error) {
	m, err := newModel(s, nil)
	if err != nil {
		return nil, err
	}
	sc, err := newScene(ctx, m)
	if err != nil {
		return nil, err
	}
	rep := &Report{Version: ReportVersion, Scenario: s.Name, Waveform: m.waveformReport()}
	rep.Targets = sc.targetReports(ctx, m, false)
	rep.Warnings = append([]string{}, m.warnings...)
	if err := ctx.Err(); err != nil {
		return nil, err
	}
	m.noiseCorrelation() // filled once here: workers share it read-only
	t := &Trials{s: s, m: m, sc: sc, report: rep, cells: make([][2]int, len(sc.targets)), tested: make([]float64, len(sc.targets))}
	for j, g := range sc.targets {
		t.cells[j] = [2]int{-1, -1}
		if rep.Targets[j].Status == StatusOutOfWindow || g.rejected {
			continue
		}
		if sc.train != nil {
			if k, d, p := sc.train.peak(j); k >= 0 && p > 0 {
				t.cells[j], t.tested[j] = [2]int{k, d}, p/sc.train.noise[d] // re its bin's noise
			}
		} else if k, p := g.resp.peakIn(m.processed); k >= 0 && p > 0 {
			t.cells[j], t.tested[j] = [2]int{k, 0}, p
		}
	}
	t.findQuiet()
	for k, q := range t.quiet {
		if q || slices.ContainsFunc(t.cells, func(c [2]int) bool { return c[0] == k }) {
			t.testGates = append(t.testGates, k)
		}
	}
	// A whole profile costs a few ns per gate; one gate's training cells
	// about Train adds.
	t.fewGates = len(t.testGates)*max(s.Receiver.Detector.TrainingCells, 1) < m.n
	if sc.train == nil && !s.NonCoherent() {
		w := t.newWorker()
		t.ech, t.corr = w.ech, w.corr
		if w.cf != nil {
			// Every multiplier of the processed gates' pattern, solved once.
			w.cf.ThresholdsValid(w.th, w.p, m.processed)
			t.cf = w.cf
		}
	}
	return t, nil
}

// Workers returns how many workers a run of t uses when want are asked
// for (0: one per processor): fewer when their buffers together would
// exceed 2 GiB, with the reason in words ("" when none are taken away).
func (t *Trials) Workers(want int) (int, string) {
	if want <= 0 {
		want = runtime.GOMAXPROCS(0)
	}
	per := max(EstimateCost(t.s).Bytes, 1)
	if fit := int(max(trialMemory/per, 1)); fit < want {
		return fit, fmt.Sprintf("%d at once, not %d: each needs about %d MB and a run keeps to %d MB", fit, want, per>>20, trialMemory>>20)
	}
	return want, ""
}

// Report returns the analytic report of the scenario (as Analyse).
func (t *Trials) Report() *Report { return t.report }

// TestedGate returns the range (m) of the cell target j is tested at, and
// false when it has none (outside the window, no echo).
func (t *Trials) TestedGate(j int) (float64, bool) {
	k := t.cells[j][0]
	if k < 0 {
		return 0, false
	}
	return t.m.rangeOf(float64(k)), true
}

// TestedSNRDB returns the SNR (dB) target j's test sees at its cell: its
// own noise-free power there over the noise (the single-pulse SNR after
// every loss, or the integrated SNR on a range–Doppler map), and false
// when it has no cell.
func (t *Trials) TestedSNRDB(j int) (float64, bool) {
	if t.cells[j][0] < 0 {
		return 0, false
	}
	return dsp.DB(t.tested[j]), true
}

// findQuiet marks the range gates whose cell and training cells hold the
// full thermal noise and no scene power above quietPower: there the
// detector's false-alarm probability is the scenario's pfa.
func (t *Trials) findQuiet() {
	m, sc := t.m, t.sc
	// full[k]: every raw sample gate k's compression reads (window
	// samples k−lead … k−lead+len(ref)−1) is recorded.
	rec := make([]int, m.recLen+1) // prefix count of blanked raw samples
	blanked := make([]bool, m.recLen)
	for _, b := range m.blanks {
		for k := max(b[0], 0); k < min(b[1], m.recLen); k++ {
			blanked[k] = true
		}
	}
	for i, b := range blanked {
		rec[i+1] = rec[i]
		if b {
			rec[i+1]++
		}
	}
	full := make([]bool, m.n)
	for k := range full {
		lo, hi := k-m.lead, k-m.lead+len(m.ref)
		full[k] = lo >= 0 && hi <= m.recLen && rec[hi]-rec[lo] == 0
	}
	span, gain := 0, 1.0
	d := m.s.Receiver.Detector
	if d.Kind != DetectorFixed {
		span = d.GuardCells + d.TrainingCells/2
	}
	if tr := sc.train; tr != nil {
		gain = 0
		for _, gj := range tr.gain {
			for _, v := range gj {
				gain = max(gain, v)
			}
		}
	}
	t.quiet = make([]bool, m.n)
	bins := 1
	if sc.train != nil {
		bins = sc.train.plan.Bins()
	}
	for k := range t.quiet {
		if !m.processed[k] || !full[k] {
			continue
		}
		ok := true
		for i := max(k-span, 0); i <= min(k+span, m.n-1) && ok; i++ {
			ok = (!m.processed[i] || full[i]) && sc.total[i]*gain <= quietPower
		}
		if ok {
			t.quiet[k] = true
			t.nQuiet += bins
		}
	}
}

// Run runs trials first … first+count−1 on workers goroutines (0: one
// per processor) and returns their counts. progress, when not nil, is
// called after each trial with the number done so far (one call at a
// time). When ctx is cancelled, no new trial starts, the trials under
// way finish, and Run returns the counts of the trials done, which are
// always first … first+Trials−1, with ctx's error.
func (t *Trials) Run(ctx context.Context, first, count, workers int, progress func(done int)) (TrialCounts, error) {
	if first < 0 || count < 0 || count > MaxTrials || first > math.MaxInt-count {
		return TrialCounts{}, fmt.Errorf("trials %d … %d: want 0 ≤ first and 0 ≤ count ≤ %d: %w", first, first+count-1, MaxTrials, ErrInvalid)
	}
	workers, _ = t.Workers(workers)
	workers = max(min(workers, count), 1)
	var (
		mu      sync.Mutex
		claimed int
		done    int
		wg      sync.WaitGroup
	)
	total := TrialCounts{First: first, Detections: make([]int64, len(t.cells))}
	for range workers {
		wg.Add(1)
		go func() {
			defer wg.Done()
			w := t.worker()
			defer t.release(w)
			own := TrialCounts{Detections: make([]int64, len(t.cells))}
			for {
				mu.Lock()
				if claimed >= count || ctx.Err() != nil {
					mu.Unlock()
					break
				}
				i := first + claimed
				claimed++
				mu.Unlock()
				// A claimed trial always finishes, so the trials done are
				// a contiguous range.
				w.trial(i, &own)
				mu.Lock()
				done++
				if progress != nil {
					progress(done)
				}
				mu.Unlock()
			}
			mu.Lock()
			total.Trials += own.Trials
			for j, d := range own.Detections {
				total.Detections[j] += d
			}
			total.FalseAlarms += own.FalseAlarms
			total.NoiseCells += own.NoiseCells
			mu.Unlock()
		}()
	}
	wg.Wait()
	if total.Trials < count {
		return total, ctx.Err()
	}
	return total, nil
}

// trialWorker holds one goroutine's copies of the model, scene and
// detector plans (which cache and are not safe for concurrent use) and
// its buffers. Its scenario copy takes each trial's seed.
type trialWorker struct {
	t   *Trials
	s   Scenario
	m   model
	sc  scene
	tr  train
	cf  *dsp.CFAR
	cf2 *dsp.CFAR2D
	p   []float64
	th  []float64
	// Single pulses: the window and its compression (windowPower), and
	// the profile's floor, linear.
	x, y  []complex128
	floor float64
	pm    [][]float64 // pulse trains: linear map [bin][cell]
	// Single coherent pulses: the echoes that do not change from trial
	// to trial, made once (echoCache); nil for non-coherent trains.
	ech  *trialEchoes
	corr *dsp.Correlator // the window's first n outputs only (with ech)
	// A stream of its own, reseeded per draw (streamOf without the
	// allocations).
	pcg rand.PCG
	rng *rand.Rand
}

// trialEchoes are a worker's noise-free echoes of a single coherent pulse,
// as the reference does it: the steady point targets' echoes summed once,
// each fluctuating (or, under SetRandomPhase, each) point target's echo at
// unit RCS and its range's phase (phase 1 under SetRandomPhase) kept
// apart and scaled per trial by √(its RCS draw) (and its phase draw), so
// a trial synthesises no waveform. Volume targets and echoes with phase
// noise are still drawn per trial as windowPower draws them. The window
// equals windowPower's to rounding (the sums are taken in another order).
type trialEchoes struct {
	steady  []complex128 // len recLen: the steady echoes, STC applied; nil when none
	points  []trialPoint
	dynamic []int // targets windowPower's way, per trial (volume, phase noise)
}

// trialPoint is one point target's echo at unit RCS, STC applied.
type trialPoint struct {
	rcsKey, phaseKey uint64 // streamKey of its RCS and phase draws
	model            int    // Swerling case
	lo               int    // window sample of echo[0]
	echo             []complex128
}

func (t *Trials) newWorker() *trialWorker {
	w := &trialWorker{t: t, s: *t.s}
	w.m = *t.m
	w.m.s, w.m.cfar, w.m.winCorr, w.m.warnings = &w.s, nil, nil, nil
	// Workers run at once: none shares the memo's detectors (pdmemo.go).
	w.m.memo = nil
	w.sc = *t.sc
	w.sc.m = &w.m
	if t.sc.train != nil {
		w.tr = *t.sc.train
		w.tr.m, w.tr.sc, w.tr.cf2, w.tr.cfOK = &w.m, &w.sc, nil, false
		// A slow-time plan keeps scratch buffers: one of its own.
		w.tr.plan = w.tr.newPlan()
		w.sc.train = &w.tr
		w.cf2 = w.tr.cfar()
		w.pm = make([][]float64, w.tr.plan.Bins())
		for d := range w.pm {
			w.pm[d] = make([]float64, t.m.n)
		}
		return w
	}
	if t.cf != nil {
		w.m.cfar = t.cf.Clone()
	}
	w.cf = w.m.detector()
	if t.randomPhase {
		// Targets of its own, whose phases it sets per trial.
		w.sc.targets = make([]*tgt, len(t.sc.targets))
		for j, g := range t.sc.targets {
			c := *g
			w.sc.targets[j] = &c
		}
	}
	w.rng = rand.New(&w.pcg)
	w.p = make([]float64, t.m.n)
	w.th = make([]float64, t.m.n)
	w.x = make([]complex128, t.m.recLen+t.m.lead)
	w.y = make([]complex128, len(w.x))
	if !t.s.NonCoherent() {
		w.ech, w.corr = t.ech, t.corr
		if w.ech == nil {
			w.ech = w.echoCache()
		}
		if w.corr == nil {
			// The detector reads gates 0 … n−1 only.
			w.corr = dsp.NewCorrelatorOutputs(t.m.ref, len(w.x), t.m.n, 1)
		} else {
			w.corr = w.corr.Clone()
		}
		w.y = w.y[:t.m.n]
	}
	w.floor = dsp.FromDB(dbFloor)
	return w
}

// trial runs trial i and adds its outcome to c.
func (w *trialWorker) trial(i int, c *TrialCounts) {
	w.s.Seed = TrialSeed(w.t.s.Seed, i)
	c.Trials++
	if w.sc.train != nil {
		w.mapTrial(c)
		return
	}
	m := &w.m
	// The compressed power, linear, as window's ProfileDB would give it
	// after dsp.FromDB (its floor and unprocessed gates included).
	if w.ech != nil {
		w.windowPower() // floor applied
	} else {
		if w.t.randomPhase {
			for _, g := range w.sc.targets {
				g.phase = cmplx.Rect(1, 2*math.Pi*streamOf(w.s.Seed, g.t.ID, 0x9a5e).Float64())
			}
		}
		w.sc.windowPower(1, w.x, w.y, w.p)
		for k, ok := range m.processed {
			if !ok || w.p[k] < w.floor {
				w.p[k] = w.floor
			}
		}
	}
	switch {
	case w.cf != nil && w.t.fewGates:
		w.cf.LevelsAt(w.th, w.p, m.processed, w.t.testGates)
	case w.cf != nil:
		w.cf.ThresholdsValid(w.th, w.p, m.processed)
	default:
		fixed := m.fixedLevel()
		for _, k := range w.t.testGates {
			w.th[k] = fixed
		}
	}
	// Only the tested gates' thresholds are set (testGates).
	hit := func(k int) bool { return !math.IsInf(w.th[k], 1) && w.p[k] > w.th[k] }
	for j, cell := range w.t.cells {
		if k := cell[0]; k >= 0 && hit(k) {
			c.Detections[j]++
		}
	}
	for _, k := range w.t.testGates {
		if w.t.quiet[k] {
			c.NoiseCells++
			if hit(k) {
				c.FalseAlarms++
			}
		}
	}
}

// echoCache makes the worker's trialEchoes (single coherent pulses).
func (w *trialWorker) echoCache() *trialEchoes {
	m, sc := &w.m, &w.sc
	e := &trialEchoes{}
	nrec := m.recLen
	for j, g := range sc.targets {
		switch {
		case g.t.Kind == TargetPoint && g.amp > 0 && sc.fe.newPNEcho(m, g, 1, m.s.Seed) == nil:
			model := swerling(g.t.Fluctuation)
			if model == dsp.SwerlingNone && !w.t.randomPhase {
				if e.steady == nil {
					e.steady = make([]complex128, nrec)
				}
				// windowPower's amplitude for a steady target: g.amp·√1.
				m.addPointEcho(e.steady, g.delay, complex(g.amp, 0)*g.phase, g.fd)
				continue
			}
			buf := make([]complex128, nrec)
			ph := g.phase
			if w.t.randomPhase {
				ph = 1
			}
			m.addPointEcho(buf, g.delay, complex(g.amp, 0)*ph, g.fd)
			sc.fe.stcShape(m, buf, 0)
			lo, hi := 0, len(buf)
			for lo < hi && buf[lo] == 0 {
				lo++
			}
			for hi > lo && buf[hi-1] == 0 {
				hi--
			}
			e.points = append(e.points, trialPoint{
				rcsKey: streamKey(g.t.ID, 0x5157), phaseKey: streamKey(g.t.ID, 0x9a5e),
				model: model, lo: lo, echo: slices.Clip(buf[lo:hi]),
			})
		case g.t.Kind == TargetPoint && g.amp > 0, g.density != nil:
			e.dynamic = append(e.dynamic, j)
		}
	}
	if e.steady != nil {
		sc.fe.stcShape(m, e.steady, 0)
	}
	return e
}

// draw reseeds the worker's stream to streamOf(seed, ·, ·) of key.
func (w *trialWorker) draw(key uint64) *rand.Rand {
	w.pcg.Seed(uint64(w.s.Seed), key)
	return w.rng
}

// windowPower is scene.windowPower for a single coherent pulse from the
// worker's cached echoes (trialEchoes): the noisy window into w.x, its
// compression into w.y, the compressed power re noise into w.p, with the
// profile's floor at unprocessed gates and below it.
func (w *trialWorker) windowPower() {
	m, sc, e := &w.m, &w.sc, w.ech
	x := w.x
	clear(x[:m.lead])
	echo := x[m.lead:]
	if len(e.dynamic) > 0 {
		clear(echo)
		for _, j := range e.dynamic {
			g := sc.targets[j]
			if w.t.randomPhase {
				g.phase = cmplx.Rect(1, 2*math.Pi*w.draw(streamKey(g.t.ID, 0x9a5e)).Float64())
			}
			pn := sc.fe.newPNEcho(m, g, 1, m.s.Seed)
			switch {
			case g.t.Kind == TargetPoint && g.amp > 0:
				amp := g.amp * math.Sqrt(dsp.SwerlingRCS(w.draw(streamKey(g.t.ID, 0x5157)), 1, swerling(g.t.Fluctuation)))
				m.addPointEchoPN(echo, pn, g.t.ID, 0, g.delay, complex(amp, 0)*g.phase, g.fd)
			case g.density != nil:
				f := sc.newClutterField(g)
				f.pn = pn
				f.add(echo, 0)
			}
		}
		sc.fe.stcShape(m, echo, 0)
		if e.steady != nil {
			for i, v := range e.steady {
				echo[i] += v
			}
		}
	} else if e.steady != nil {
		copy(echo, e.steady)
	} else {
		clear(echo)
	}
	for _, pt := range e.points {
		a := math.Sqrt(dsp.SwerlingRCS(w.draw(pt.rcsKey), 1, pt.model))
		dst := echo[pt.lo : pt.lo+len(pt.echo)]
		if w.t.randomPhase {
			c := complex(a, 0) * cmplx.Rect(1, 2*math.Pi*w.draw(pt.phaseKey).Float64())
			for i, v := range pt.echo {
				dst[i] += c * v
			}
			continue
		}
		for i, v := range pt.echo {
			dst[i] += complex(a*real(v), a*imag(v))
		}
	}
	addNoise(echo, m.s.Seed, 0x4e01)
	sc.fe.receive(echo)
	// sc.blank(echo, 0): echo is the whole record (recLen samples from 0).
	for _, bl := range m.blanks {
		if lo, hi := max(bl[0], 0), min(bl[1], len(echo)); lo < hi {
			clear(echo[lo:hi])
		}
	}
	// As scene.windowPower: an echo at window sample d peaks at y[d].
	y := w.corr.Apply(w.y, x)
	inv := 1 / m.noiseGain
	proc := m.processed[:len(w.p)]
	for k, v := range y[:len(w.p)] {
		pk := (real(v)*real(v) + imag(v)*imag(v)) * inv
		if !proc[k] || pk < w.floor {
			pk = w.floor
		}
		w.p[k] = pk
	}
}

// mapTrial is trial for a pulse train: the range–Doppler map of the
// train's pulses, tested by the map's detector.
func (w *trialWorker) mapTrial(c *TrialCounts) {
	m := &w.m
	rd, _, _, err := w.tr.simulate(context.Background())
	if err != nil {
		panic("scenarios: simulate without a context cannot fail: " + err.Error())
	}
	for d, row := range rd.DB {
		for k, db := range row {
			w.pm[d][k] = dsp.FromDB(float64(db))
		}
	}
	nb := len(w.pm)
	p := func(k, d int) float64 { return w.pm[d][k] }
	fixed := dsp.FixedMultiplier(m.s.Receiver.Detector.PFA)
	hit := func(k, d int) bool {
		th := fixed * w.tr.noise[d] // a fixed threshold holds Pfa in each bin's own noise (train.level)
		if w.cf2 != nil {
			th = w.cf2.LevelValid(p, w.tr.valid, k, d, m.n, nb)
		}
		return !math.IsInf(th, 1) && w.pm[d][k] > th
	}
	for j, cell := range w.t.cells {
		if cell[0] >= 0 && hit(cell[0], cell[1]) {
			c.Detections[j]++
		}
	}
	for k, q := range w.t.quiet {
		if !q {
			continue
		}
		for d := range nb {
			c.NoiseCells++
			if hit(k, d) {
				c.FalseAlarms++
			}
		}
	}
}
