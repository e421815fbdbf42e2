package scenarios

import (
	"fmt"
	"math"
	"strings"

	"github.com/pulsewright/pulsewright/dsp"
)

// The dynamic-range view (docs/detection.md §15): for one target, the
// noise-free floors its echo and the receiver lay against range, in the
// range profile's units (dB re the thermal noise power at the
// compression filter's output), read from the same noise-free scene the
// statuses are decided on, and for every other target the floor that
// hides it.

// Floor ids: FloorCurve.ID and FloorMark.Floor.
const (
	FloorResponse  = "response"     // the target's own compressed response: main lobe and range sidelobes (window, Doppler and clipping included)
	FloorUnclipped = "unclipped"    // the same echo had the ADC not clipped it (only when it clips)
	FloorSkirt     = "skirt"        // its phase-noise skirt
	FloorImage     = "image"        // its I/Q image
	FloorQuantise  = "quantisation" // the ADC's quantisation noise
	FloorDC        = "dc"           // the receiver's DC offset
	FloorOthers    = "others"       // the rest of the scene: the other targets, clutter and their impairments
	FloorOwn       = "own"          // a marked target's own response (it masks itself through the CFAR)
	FloorThermal   = "thermal"      // thermal noise, 0 dB
	FloorThreshold = "threshold"    // the detection threshold
)

// FloorCurve is one floor against range: DB[k] at window sample k
// (range RangeM0 + k·RangeStepM of the Floors), dB re output noise,
// −100 where it holds no power or the gate is not processed.
type FloorCurve struct {
	ID   string
	Name string // legend text
	DB   []float64
}

// FloorMark is another target's peak and the floor at its cell.
type FloorMark struct {
	ID     string
	RangeM float64 // range of its peak cell, m
	PeakDB float64 // its own noise-free power there, dB re output noise
	Status string  // its status in the report
	// Floor names what hides it when it is masked (the engine's masked_by
	// and cause: FloorResponse, FloorSkirt or FloorImage of the selected
	// target, FloorQuantise or FloorDC of the receiver, FloorOwn when it
	// masks itself, FloorOthers for anything else, then Source names it)
	// or too weak (FloorThermal);
	// for any other status, the highest floor at its cell, thermal noise
	// included. FloorDB is that floor's power at its cell, dB re output
	// noise.
	Floor   string
	FloorDB float64
	Hidden  bool   // masked or too_weak: Floor hides it
	Source  string // with FloorOthers: the target (and impairment) that masks it
	OnRow   bool   // pulse trains: its peak is on the map row the curves follow (always true for a single pulse)
	RateMPS float64
}

// Floors is the dynamic-range view of one target.
type Floors struct {
	Target     string  // the selected target
	PeakDB     float64 // its own noise-free peak, dB re output noise
	RangeM0    float64 // m, as Series
	RangeStepM float64
	// Pulse trains: the curves follow the range–Doppler map's row Row
	// (Doppler RowHz, range rate RowRateMPS), through RowTarget's peak;
	// Row is −1 for a single pulse.
	Row        int
	RowHz      float64
	RowRateMPS float64
	RowTarget  string
	Curves     []FloorCurve // response first, threshold last
	Marks      []FloorMark  // the other targets with a peak in the window, in scenario order
}

// Floors computes the dynamic-range view of the target with id target
// ("" picks the strongest: the highest noise-free peak) from the scene
// the result was evaluated on. For a pulse train the curves follow the
// map row through target row's peak; with row "", the row of the first
// other target the selected one masks, else its own row. It needs a
// result from Evaluate (an error otherwise) and an id of the scenario's
// targets.
func (r *Result) Floors(target, row string) (*Floors, error) {
	sc := r.sc
	if sc == nil {
		return nil, fmt.Errorf("dynamic range: the result holds no noise-free scene (only Evaluate keeps it): %w", ErrInvalid)
	}
	m := sc.m
	ids := make([]string, len(sc.targets))
	for i, g := range sc.targets {
		ids[i] = g.t.ID
	}
	find := func(field, id string) (int, error) {
		for i, v := range ids {
			if v == id {
				return i, nil
			}
		}
		return -1, fmt.Errorf("dynamic range: %s %q is not a target of the scenario (targets: %s): %w", field, id, strings.Join(ids, ", "), ErrInvalid)
	}
	fv := &floorView{sc: sc, tr: sc.train, d: -1}
	s := -1
	if target != "" {
		var err error
		if s, err = find("target", target); err != nil {
			return nil, err
		}
	} else {
		best := 0.0
		for j := range sc.targets {
			if _, _, p := fv.peak(j); p > best {
				best, s = p, j
			}
		}
		if s < 0 {
			return nil, fmt.Errorf("dynamic range: no target has a noise-free peak in the receive window: %w", ErrInvalid)
		}
	}
	fv.s = s
	out := &Floors{Target: ids[s], RangeM0: m.rangeOf(0), RangeStepM: C / (2 * m.fs), Row: -1}
	_, sd, sp := fv.peak(s)
	out.PeakDB = toDB(sp)
	// The other targets' verdicts: what hides the hidden ones.
	verdicts := make([]*verdict, len(sc.targets))
	status := func(j int) string {
		if j < len(r.Report.Targets) {
			return r.Report.Targets[j].Status
		}
		return ""
	}
	for j := range sc.targets {
		if j == s || status(j) != StatusMasked {
			continue
		}
		var v verdict
		if sc.train != nil {
			v, _ = sc.train.judge(j, sc.train.cfar())
		} else {
			v = sc.judge(j, m.detector())
		}
		verdicts[j] = &v
	}
	if sc.train != nil {
		fv.d = sd
		out.RowTarget = ids[s]
		rowOf := -1
		if row != "" {
			var err error
			if rowOf, err = find("row", row); err != nil {
				return nil, err
			}
		} else {
			for j, v := range verdicts {
				if v != nil && v.culprit == s {
					rowOf = j
					break
				}
			}
		}
		if rowOf >= 0 {
			if k, d, _ := fv.peak(rowOf); k >= 0 {
				fv.d, out.RowTarget = d, ids[rowOf]
			}
		}
		if fv.d < 0 {
			fv.d = 0
		}
		out.Row = fv.d
		out.RowHz = sc.train.binHz(fv.d)
		out.RowRateMPS = tidy(-out.RowHz * m.lambda / 2)
	}
	out.Curves = fv.curves(r)
	for j, g := range sc.targets {
		if j == s {
			continue
		}
		k, d, p := fv.peak(j)
		if k < 0 || !(p > 0) {
			continue
		}
		mk := FloorMark{ID: ids[j], RangeM: m.rangeOf(float64(k)), PeakDB: toDB(p), Status: status(j), OnRow: sc.train == nil || d == fv.d}
		if sc.train != nil {
			mk.RateMPS = tidy(-sc.train.binHz(d) * m.lambda / 2)
		}
		parts := fv.parts(k, d, j)
		switch {
		case verdicts[j] != nil:
			v := verdicts[j]
			mk.Floor, mk.Hidden = fv.name(v.culprit, v.cause), true
			if v.culprit == j {
				mk.Floor = FloorOwn
			}
			if mk.Floor == FloorOthers && v.culprit >= 0 {
				mk.Source = ids[v.culprit]
				if v.cause != "" {
					mk.Source += "'s " + v.cause
				}
			}
		case mk.Status == StatusTooWeak:
			mk.Floor, mk.Hidden = FloorThermal, true
		default:
			best := 0.0
			for _, id := range floorOrder {
				if parts[id] > best {
					best, mk.Floor = parts[id], id
				}
			}
		}
		if mk.Floor == FloorOwn {
			parts[FloorOwn] = fv.power(j, k, d)
		}
		mk.FloorDB = toDB(parts[mk.Floor])
		_ = g
		out.Marks = append(out.Marks, mk)
	}
	return out, nil
}

// DropScene lets go of the noise-free scene (and the model it holds)
// that Floors reads, for a result kept only for its report and plots:
// Floors then returns an error.
func (r *Result) DropScene() { r.sc = nil }

// floorOrder lists the floors that compete at a cell; ties go to the
// first.
var floorOrder = []string{FloorResponse, FloorSkirt, FloorImage, FloorQuantise, FloorDC, FloorOthers, FloorThermal}

// floorView reads the scene for one selected target s, on a single
// pulse (d < 0) or on the map's Doppler bin d.
type floorView struct {
	sc *scene
	tr *train
	s  int
	d  int
}

// peak returns target j's peak cell (range gate k, bin d; d −1 for a
// single pulse) and its own power there; k −1 when it has none.
func (fv *floorView) peak(j int) (k, d int, p float64) {
	if fv.tr != nil {
		return fv.tr.peak(j)
	}
	k, p = fv.sc.targets[j].resp.peakIn(fv.sc.m.processed)
	return k, -1, p
}

// power is target j's response at (k, d).
func (fv *floorView) power(j, k, d int) float64 {
	if d >= 0 {
		return fv.tr.power(j, k, d)
	}
	return fv.sc.targets[j].resp.at(k)
}

// extraAt is extra i's power at (k, d).
func (fv *floorView) extraAt(i, k, d int) float64 {
	if d >= 0 {
		return fv.tr.extraPower(i, k, d)
	}
	return fv.sc.extras[i].resp.at(k)
}

// name maps an engine culprit and cause to a floor id.
func (fv *floorView) name(culprit int, cause string) string {
	switch {
	case culprit == fv.s && cause == "":
		return FloorResponse
	case culprit == fv.s && cause == causeSkirt:
		return FloorSkirt
	case culprit == fv.s && cause == causeImage:
		return FloorImage
	case culprit < 0 && cause == causeQuantise:
		return FloorQuantise
	case culprit < 0 && cause == causeDC:
		return FloorDC
	}
	return FloorOthers
}

// parts returns each floor's power at (k, d), leaving out target own's
// power (its response and its impairments; −1 leaves out none).
func (fv *floorView) parts(k, d, own int) map[string]float64 {
	sc := fv.sc
	p := map[string]float64{FloorThermal: 1}
	for j := range sc.targets {
		switch j {
		case own:
		case fv.s:
			p[FloorResponse] += fv.power(j, k, d)
		default:
			p[FloorOthers] += fv.power(j, k, d)
		}
	}
	for i := range sc.extras {
		e := &sc.extras[i]
		if e.owner == own && own >= 0 {
			continue
		}
		p[fv.extraName(e)] += fv.extraAt(i, k, d)
	}
	return p
}

func (fv *floorView) extraName(e *extra) string {
	if e.owner != fv.s && e.owner >= 0 {
		return FloorOthers
	}
	return fv.name(e.owner, e.cause)
}

// curves returns the floors against range: each of the selected
// target's and the receiver's that holds power, the rest of the scene,
// thermal noise and the threshold.
func (fv *floorView) curves(r *Result) []FloorCurve {
	sc, m := fv.sc, fv.sc.m
	n := m.n
	g := sc.targets[fv.s]
	lin := map[string][]float64{}
	get := func(id string) []float64 {
		if lin[id] == nil {
			lin[id] = make([]float64, n)
		}
		return lin[id]
	}
	d := fv.d
	resp := get(FloorResponse)
	for k := range n {
		resp[k] = fv.power(fv.s, k, d)
	}
	if g.unclipped.pow != nil {
		u := get(FloorUnclipped)
		scale := 1.0
		if d >= 0 {
			scale = fv.tr.gain[fv.s][d]
		}
		for k := range n {
			u[k] = g.unclipped.at(k) * scale
		}
	}
	for j := range sc.targets {
		if j == fv.s || !sc.reachesAny(j) {
			continue
		}
		o := get(FloorOthers)
		for k := range n {
			o[k] += fv.power(j, k, d)
		}
	}
	for i := range sc.extras {
		c := get(fv.extraName(&sc.extras[i]))
		for k := range n {
			c[k] += fv.extraAt(i, k, d)
		}
	}
	th := make([]float64, n)
	if d < 0 {
		copy(th, r.Series.ThresholdDB)
	} else {
		fv.rowThreshold(th)
	}
	names := map[string]string{
		FloorResponse:  g.t.ID + "'s response",
		FloorUnclipped: g.t.ID + " unclipped",
		FloorSkirt:     g.t.ID + "'s phase-noise skirt",
		FloorImage:     g.t.ID + "'s I/Q image",
		FloorQuantise:  "quantisation",
		FloorDC:        "DC offset",
		FloorOthers:    "rest of the scene",
		FloorThermal:   "thermal noise",
		FloorThreshold: "threshold",
	}
	var out []FloorCurve
	for _, id := range []string{FloorResponse, FloorUnclipped, FloorSkirt, FloorImage, FloorQuantise, FloorDC, FloorOthers} {
		v := lin[id]
		if v == nil || !anyPositive(v) {
			continue
		}
		db := make([]float64, n)
		dsp.PowersDB(db, v, dbFloor)
		for k, ok := range m.processed {
			if !ok {
				db[k] = dbFloor
			}
		}
		out = append(out, FloorCurve{ID: id, Name: names[id], DB: db})
	}
	thermal := make([]float64, n)
	for k, ok := range m.processed {
		if !ok {
			thermal[k], th[k] = dbFloor, dbFloor
		}
	}
	out = append(out, FloorCurve{ID: FloorThermal, Name: names[FloorThermal], DB: thermal},
		FloorCurve{ID: FloorThreshold, Name: names[FloorThreshold], DB: th})
	return out
}

// reachesAny reports whether target j has any response.
func (sc *scene) reachesAny(j int) bool { return len(sc.targets[j].resp.pow) > 0 }

func anyPositive(v []float64) bool {
	for _, x := range v {
		if x > 0 {
			return true
		}
	}
	return false
}

// rowThreshold fills th with the map detector's threshold (dB re noise)
// along the row fv.d, as the profile's threshold is computed at each
// cell's strongest bin (train.series): the expected map's rows around
// the row, one at a time.
func (fv *floorView) rowThreshold(th []float64) {
	tr, sc := fv.tr, fv.sc
	n, nb := sc.m.n, tr.plan.Bins()
	rows := map[int][]float64{}
	clean := func(k, d int) float64 {
		d = ((d % nb) + nb) % nb
		r := rows[d]
		if r == nil {
			r = make([]float64, n)
			for j := range sc.targets {
				for kk := range n {
					r[kk] += tr.power(j, kk, d)
				}
			}
			for i := range sc.extras {
				for kk := range n {
					r[kk] += tr.extraPower(i, kk, d)
				}
			}
			rows[d] = r
		}
		if k < 0 || k >= n {
			return 0
		}
		return r[k]
	}
	cf := tr.cfar()
	for k := range n {
		if !sc.m.processed[k] {
			th[k] = dbFloor
			continue
		}
		v := tr.level(cf, k, fv.d, clean)
		if math.IsInf(v, 1) {
			v = 0
		}
		th[k] = toDB(v)
	}
}
