package scenarios

import (
	"fmt"
	"math"
	"slices"
	"strings"

	"github.com/pulsewright/pulsewright/dsp"
)

// Clutter (docs/detection.md §10): extended and volume targets are
// clutter unless their role says "target". A clutter object is never
// detected: the cells where it crosses the threshold are false alarms
// (breakthrough). The report states the detector's false-alarm rate, the
// clutter-to-noise ratio per cell and the signal-to-clutter ratio at each
// target's cell. Surface clutter may be given physically: σ⁰ directly or
// by the constant-γ model with the grazing angle from the antenna height.

// Roles of extended and volume targets (added in format version 2).
const (
	RoleClutter = "clutter"
	RoleTarget  = "target"
)

// StatusClutter is the status of a clutter object inside the window.
const StatusClutter = "clutter"

var roles = []string{RoleClutter, RoleTarget}

// roleNotes is the upgrade step of the clutter role (version 1 to 2): one
// note naming the extended and volume targets of a version 1 document,
// which read with the new default role, clutter. The evaluation then warns
// for each whose verdict changes (clutterChange).
func roleNotes(doc map[string]any) []string {
	ts, _ := doc["targets"].([]any)
	var ids []string
	for _, x := range ts {
		t, _ := x.(map[string]any)
		kind, _ := t["kind"].(string)
		if _, has := t["role"]; has || (kind != TargetExtended && kind != TargetVolume) {
			continue
		}
		id, _ := t["id"].(string)
		ids = append(ids, id)
	}
	if len(ids) == 0 {
		return nil
	}
	return []string{fmt.Sprintf("extended and volume targets now have a role, clutter by default: %s read as clutter, never reported as detected, with the cells where they cross the threshold reported as false alarms; give one role \"target\" to judge it as before", strings.Join(ids, ", "))}
}

// clutterChange is why a version 1 scenario's extended or volume target
// changes verdict in version 2 (the upgrade's note, upgrade.go).
const clutterChange = ": extended and volume targets are clutter by default in version 2 (role \"clutter\"): never reported as detected, the cells where it crosses the threshold are false alarms; set its role to \"target\" to judge it as version 1 did"

// Ways of giving an extended target's reflectivity (Target.Level).
const (
	LevelPerMetre = "rcs_dbsm_per_m"
	LevelSigma0   = "sigma0_db"
	LevelGamma    = "gamma_db"
	LevelSeaState = "sea_state" // σ⁰ of the NRL sea model (sea.go)
)

var levelFields = []string{LevelPerMetre, LevelSigma0, LevelGamma, LevelSeaState}

// Limits of the surface inputs.
const (
	MaxAntennaHeightM = 1e5   // m
	MaxBreakSpans     = 64    // breakthrough spans listed per clutter object
	lowGrazingDeg     = 10.0  // above it the pulse-limited patch overstates clutter (warning)
	minCNR            = 1e-10 // clutter power re noise below which a cell holds no clutter (−100 dB, the dB floor; FFT rounding leaves about 1e-16 of the peak)
	minSigma0DB       = -100. // dB, sigma0_db and gamma_db
	maxSigma0DB       = 30.   // dB
)

// IsClutter reports whether a target is clutter: an extended or volume
// target whose role is not "target".
func (t Target) IsClutter() bool { return t.Kind != TargetPoint && t.Role != RoleTarget }

// levelField returns the field that gives an extended target's
// reflectivity.
func (t Target) levelField() string {
	if t.Level == "" {
		return LevelPerMetre
	}
	return t.Level
}

// levelValue returns the value of levelField.
func (t Target) levelValue() float64 {
	switch t.Level {
	case LevelSigma0:
		return t.Sigma0DB
	case LevelGamma:
		return t.GammaDB
	case LevelSeaState:
		return t.SeaState
	}
	return t.RCSDBsmPerM
}

// surfaceLevel reads the one reflectivity field of an extended target.
func (o *object) surfaceLevel(t *Target) {
	var given []string
	for _, f := range levelFields {
		if o.has(f) {
			given = append(given, f)
		}
	}
	switch len(given) {
	case 0:
		o.errs.add(o.sub(LevelPerMetre), "required: one of rcs_dbsm_per_m (RCS per metre of range, dBsm/m), sigma0_db (surface reflectivity σ⁰, dB m²/m²), gamma_db (γ of σ⁰ = γ·sin ψ, dB) or sea_state (0 … 6, σ⁰ of the NRL sea model)")
	case 1:
		t.Level = given[0]
		if t.Level == LevelPerMetre {
			t.Level = ""
		}
	default:
		o.errs.add(o.sub(given[1]), "give one of rcs_dbsm_per_m, sigma0_db, gamma_db and sea_state, not %s", strings.Join(given, " and "))
	}
	o.float(LevelPerMetre, &t.RCSDBsmPerM)
	o.float(LevelSigma0, &t.Sigma0DB)
	o.float(LevelGamma, &t.GammaDB)
	o.seaState(t)
}

// validateDistributed checks an extended or volume target's level and
// role; p is its path prefix ("targets[i].").
func (s *Scenario) validateDistributed(c checker, p string, t Target) {
	switch {
	case t.Kind == TargetVolume:
		c.between(p+"reflectivity_dbz", t.ReflectivityDBZ, -40, 80)
	case t.Level == LevelSigma0:
		c.between(p+LevelSigma0, t.Sigma0DB, minSigma0DB, maxSigma0DB)
	case t.Level == LevelGamma:
		if c.between(p+LevelGamma, t.GammaDB, minSigma0DB, maxSigma0DB) && s.Radar.AntennaHeightM == 0 {
			c.errs.add(p+LevelGamma, "needs radar.antenna_height_m (above 0, at most %g m): the grazing angle ψ of σ⁰ = γ·sin ψ comes from the antenna's height", MaxAntennaHeightM)
		}
	case t.Level == LevelSeaState:
		s.validateSea(c, p, t)
	case t.Level == "":
		c.between(p+LevelPerMetre, t.RCSDBsmPerM, -150, 60)
	default:
		c.errs.add(p+LevelPerMetre, "%s is not one of %s", clipQ(t.Level), strings.Join(levelFields, ", "))
	}
	if t.Role != "" && t.Role != RoleClutter && t.Role != RoleTarget {
		c.errs.add(p+"role", "%s is not one of %s", clipQ(t.Role), strings.Join(roles, ", "))
	}
}

// sigma0 returns the surface reflectivity σ⁰ (linear) of an extended
// target given by sigma0_db or gamma_db at slant range r, with the
// grazing angle ψ (rad) on the 4/3 Earth from radar.antenna_height_m
// (ψ = 0 without it); ok is false where no surface is seen (nearer than
// the antenna's height, or beyond the horizon).
func (m *model) sigma0(t Target, r float64) (s0, psi float64, ok bool) {
	if h := m.s.Radar.AntennaHeightM; h > 0 {
		if psi, ok = dsp.GrazingAngle(h, r, dsp.EffectiveEarthRadius); !ok {
			return 0, 0, false
		}
	}
	switch t.Level {
	case LevelGamma:
		return dsp.ConstantGammaSigma0(dsp.FromDB(t.GammaDB), psi), psi, true
	case LevelSeaState:
		return m.seaSigma0(t, psi), psi, true
	}
	return dsp.FromDB(t.Sigma0DB), psi, true
}

// perMetre returns a distributed target's radar cross-section per metre
// of range at range r, m²/m: rcs_dbsm_per_m as given; for σ⁰ and γ the
// pulse-limited surface patch σ⁰·r·θ_az·sec ψ per metre of depth; for a
// volume, η times the Gaussian beam's cross-section.
func (m *model) perMetre(t Target, r float64) float64 {
	rd := m.s.Radar
	az, el := rd.BeamwidthAzDeg*math.Pi/180, rd.BeamwidthElDeg*math.Pi/180
	switch {
	case t.Kind == TargetVolume:
		return dsp.VolumeReflectivity(t.ReflectivityDBZ, m.lambda) * dsp.BeamArea(r, az, el)
	case t.surfaceModel():
		s0, psi, ok := m.sigma0(t, r)
		if !ok {
			return 0
		}
		return dsp.SurfacePatchRCS(s0, r, m.clutterWidth(), 1, psi)
	}
	return dsp.FromDB(t.RCSDBsmPerM)
}

// surfaceWarnings warns when a surface target given physically lies
// partly beyond the horizon or at grazing angles where the pulse-limited
// patch no longer holds.
func (m *model) surfaceWarnings(t Target) {
	if t.Kind != TargetExtended || !t.surfaceModel() {
		return
	}
	h := m.s.Radar.AntennaHeightM
	if h == 0 {
		return
	}
	if horizon := math.Sqrt(2*dsp.EffectiveEarthRadius*h + h*h); t.RangeStopM > horizon {
		m.warn("target %s: the surface beyond the radar horizon at %s (antenna %.0f m high, 4/3 Earth) is shadowed and returns no clutter", t.ID, km(horizon), h)
	}
	if psi, ok := dsp.GrazingAngle(h, math.Max(t.RangeStartM, h), dsp.EffectiveEarthRadius); ok && psi*180/math.Pi > lowGrazingDeg {
		m.warn("target %s: its grazing angle reaches %.0f° at %s; the surface patch σ⁰·R·θ·ΔR·sec ψ holds at low grazing angles and overstates the clutter above about %.0f°", t.ID, psi*180/math.Pi, km(math.Max(t.RangeStartM, h)), lowGrazingDeg)
	}
}

// ClutterFigures are the clutter fields of a target's report (added in
// report format version 2); each is omitted where it does not apply.
type ClutterFigures struct {
	Role string `json:"role,omitempty"` // extended, volume: clutter or target
	// At the target's peak cell: clutter power (every clutter object)
	// over noise, and the target's own power over that clutter; on a
	// range–Doppler map also at its map cell.
	CNRDB           *float64 `json:"cnr_db,omitempty"`
	SCRDB           *float64 `json:"scr_db,omitempty"`
	CNRIntegratedDB *float64 `json:"cnr_integrated_db,omitempty"`
	SCRIntegratedDB *float64 `json:"scr_integrated_db,omitempty"`
	// Extended and volume: the radar cross-section of one range cell
	// c/(2B) at range_m; for σ⁰ and γ also σ⁰ and the grazing angle there.
	CellRCSDBsm *float64 `json:"cell_rcs_dbsm,omitempty"`
	Sigma0DB    *float64 `json:"sigma0_db,omitempty"`
	GrazingDeg  *float64 `json:"grazing_deg,omitempty"`
	// Clutter objects: the cells where they cross the threshold.
	Breakthrough *Breakthrough `json:"breakthrough,omitempty"`
}

// Breakthrough is where a clutter object crosses the detection threshold
// on the noise-free scene: false alarms.
type Breakthrough struct {
	Cells int    `json:"cells"` // range gates (single pulse) or range–Doppler cells that cross
	Spans []Span `json:"spans"` // runs of adjacent crossing gates, at most MaxBreakSpans, nearest first
}

// Span is a run of range gates, m.
type Span struct {
	StartM float64 `json:"start_m"`
	StopM  float64 `json:"stop_m"`
}

// FalseAlarms is the detector's false-alarm rate against noise alone
// (added in report format version 2).
type FalseAlarms struct {
	PFA              float64 `json:"pfa"`               // per tested cell
	TestedCells      int     `json:"tested_cells"`      // processed gates (× Doppler bins) per look
	IndependentCells float64 `json:"independent_cells"` // per look, docs/detection.md §10
	LookS            float64 `json:"look_s"`            // one look: the PRI, or pulses × PRI for a map
	CellsPerS        float64 `json:"cells_per_s"`       // independent cells per second
	RatePerS         float64 `json:"rate_per_s"`        // pfa × cells_per_s
	MeanIntervalS    float64 `json:"mean_interval_s"`   // 1 / rate_per_s
}

// ClutterSummary is the scene's clutter (added in report format version
// 2): present when the scene holds a clutter object.
type ClutterSummary struct {
	CNRPeakDB           *float64 `json:"cnr_peak_db,omitempty"`            // largest clutter power per range gate over noise, single pulse
	CNRPeakRangeM       *float64 `json:"cnr_peak_range_m,omitempty"`       // where
	CNRPeakIntegratedDB *float64 `json:"cnr_peak_integrated_db,omitempty"` // largest over the range–Doppler map
	BreakthroughCells   int      `json:"breakthrough_cells"`               // false alarms from clutter, all objects
}

// clutterScene is the clutter analysis of a scene: which gates (or
// range–Doppler cells) each clutter object breaks through at.
type clutterScene struct {
	any   bool
	cells []int   // per target: crossing cells (clutter objects only)
	gates [][]int // per target: gates with a crossing, ascending
	// th is the single-pulse scene level at every gate (ThresholdsValid
	// of 1 + the scene's power, processed gates training), linear, when
	// the breakthrough test needed it; the plotted threshold is the same
	// computation and reuses it (levels).
	th []float64
}

// clutterAt returns the clutter power at gate k re noise, single pulse,
// leaving out target skip (-1: none).
func (sc *scene) clutterAt(k, skip int) float64 {
	s := 0.0
	for i, g := range sc.targets {
		if i != skip && g.t.IsClutter() {
			s += g.resp.at(k)
		}
	}
	return s
}

// clutterMapAt is clutterAt on the range–Doppler map, at cell (k, d).
func (sc *scene) clutterMapAt(k, d, skip int) float64 {
	s := 0.0
	for i, g := range sc.targets {
		if i != skip && g.t.IsClutter() {
			s += sc.train.power(i, k, d)
		}
	}
	return s
}

// dominant returns the index of the object with the most power at gate
// k (map: cell (k, d) when d ≥ 0); ties go to the first.
func (sc *scene) dominant(k, d int) int {
	best, bi := 0.0, -1
	for i, g := range sc.targets {
		p := g.resp.at(k)
		if d >= 0 {
			p = sc.train.power(i, k, d)
		}
		if p > best {
			best, bi = p, i
		}
	}
	return bi
}

// analyseClutter finds each clutter object's breakthrough (docs/detection.md
// §10): the processed cells where the noise-free scene power reaches the
// detector's level with the whole scene in its training cells, and the
// clutter object that puts the most power there is the one that breaks
// through. On a range–Doppler map only cells whose scene power exceeds
// the noise power (1) are tested, and the scene level only where the
// power reaches the level against noise alone (scene power only raises
// a level).
func (sc *scene) analyseClutter(cf *dsp.CFAR, cf2 *dsp.CFAR2D) *clutterScene {
	m := sc.m
	cs := &clutterScene{cells: make([]int, len(sc.targets)), gates: make([][]int, len(sc.targets))}
	for _, g := range sc.targets {
		cs.any = cs.any || g.t.IsClutter()
	}
	if !cs.any {
		return cs
	}
	if sc.train == nil {
		var th []float64
		for k := range sc.clutterGates() { // elsewhere no clutter object is dominant
			if !m.processed[k] {
				continue
			}
			j := sc.dominant(k, -1)
			if j < 0 || !sc.targets[j].t.IsClutter() {
				continue
			}
			level := m.fixedLevel()
			if cf != nil {
				if th == nil {
					p := make([]float64, m.n)
					for i := range p {
						p[i] = 1 + sc.total[i]
					}
					th = cf.ThresholdsValid(nil, p, m.processed)
					cs.th = th
				}
				level = th[k]
			}
			if sc.total[k] >= level {
				cs.cells[j]++
				cs.gates[j] = append(cs.gates[j], k)
			}
		}
		return cs
	}
	tr := sc.train
	nb := tr.plan.Bins()
	if cf2 != nil && m.n*nb <= levelsKeptCells && m.memo != nil {
		return sc.analyseMapClutter(cs, cf2)
	}
	// The scene's power at a cell is asked for again by every level whose
	// training cells hold it: keep the columns near the cell under test.
	cols := newPowerColumns(sc, cf2)
	scenePow := cols.at
	nl := newNoiseLevels(tr, cf2)
	for k := range m.n {
		if !m.processed[k] {
			continue
		}
		crossed := make(map[int]bool)
		for d := range nb {
			s := scenePow(k, d)
			if s <= tr.noise[d] { // under its own bin's noise (an MTI canceller's bins hold unequal noise)
				continue
			}
			j := sc.dominant(k, d)
			if j < 0 || !sc.targets[j].t.IsClutter() {
				continue
			}
			if s >= nl.at(k, d) && s >= tr.level(cf2, k, d, scenePow) {
				cs.cells[j]++
				crossed[j] = true
			}
		}
		for j := range crossed {
			cs.gates[j] = append(cs.gates[j], k)
		}
	}
	return cs
}

// analyseMapClutter is analyseClutter's range–Doppler part behind a CFAR
// with the levels kept across evaluations (reuse.go): the scene power of
// every cell is computed first (the values powerColumns gives), then each
// level that analyseClutter asks for is taken from the kept analysis when
// the settings are the same and none of the columns its training cells
// may read changed bit for bit (a drag changes the columns near the
// dragged target), and computed otherwise. The result is analyseClutter's
// without the kept levels, bit for bit.
func (sc *scene) analyseMapClutter(cs *clutterScene, cf2 *dsp.CFAR2D) *clutterScene {
	m, tr := sc.m, sc.train
	n, nb := m.n, tr.plan.Bins()
	cur := m.memo.newLevels(cf2, n, nb, tr.noise, m.processed)
	// changed[k+1] − changed[lo] counts the columns lo … k that differ
	// from the kept analysis (all of them without one).
	changed := make([]int, n+1)
	// A kept analysis whose objects differ from these in a few range cells
	// only (an edit of one target) gives the scene power of the others.
	var prev *keptLevels
	if sc.recordInputs(cur) {
		diff := make([]bool, n)
		if prev = m.memo.levelsByInputs(cf2, n, nb, tr.noise, m.processed, cur.resp, cur.gain, diff); prev != nil {
			for k := range n {
				row := cur.pow[k*nb : (k+1)*nb]
				c := 0
				if diff[k] {
					sc.scenePowerRow(k, row)
					c = 1
				} else {
					copy(row, prev.pow[k*nb:(k+1)*nb])
				}
				changed[k+1] = changed[k] + c
			}
		}
	}
	if prev == nil {
		for k := range n {
			sc.scenePowerRow(k, cur.pow[k*nb:(k+1)*nb])
		}
		prev = m.memo.levelsFor(cf2, n, nb, tr.noise, m.processed, cur.pow)
		for k := range n {
			c := 1
			if prev != nil && sameFloatBits(prev.pow[k*nb:(k+1)*nb], cur.pow[k*nb:(k+1)*nb]) {
				c = 0
			}
			changed[k+1] = changed[k] + c
		}
	}
	hr := cf2.GuardR + cf2.TrainR/2
	scenePow := func(k, d int) float64 { return cur.pow[k*nb+d] }
	level := func(k, d int) float64 {
		i := k*nb + d
		if prev != nil && prev.has[i] && changed[min(k+hr, n-1)+1]-changed[max(k-hr, 0)] == 0 {
			cur.level[i], cur.has[i] = prev.level[i], true
			return cur.level[i]
		}
		cur.level[i], cur.has[i] = tr.level(cf2, k, d, scenePow), true
		return cur.level[i]
	}
	nl := newNoiseLevels(tr, cf2)
	crossed := make([]bool, len(sc.targets))
	for k := range n {
		if !m.processed[k] {
			continue
		}
		clear(crossed)
		for d := range nb {
			s := scenePow(k, d)
			if s <= tr.noise[d] { // under its own bin's noise (an MTI canceller's bins hold unequal noise)
				continue
			}
			j := sc.dominant(k, d)
			if j < 0 || !sc.targets[j].t.IsClutter() {
				continue
			}
			if s >= nl.at(k, d) && s >= level(k, d) {
				cs.cells[j]++
				crossed[j] = true
			}
		}
		for j, c := range crossed {
			if c {
				cs.gates[j] = append(cs.gates[j], k)
			}
		}
	}
	m.memo.doneLevels(prev)
	m.memo.keepLevels(cur)
	return cs
}

// powerColumns keeps the noise-free scene power of the range–Doppler
// map's columns (all bins of a range cell) near the cell under test, in
// a ring of slots: a detector's level reads its training cells' power
// from here instead of summing every target's again. The values are
// those of scenePower, bit for bit.
type powerColumns struct {
	sc   *scene
	nb   int
	tag  []int       // range cell held by each slot, -1: none
	cols [][]float64 // slot → power per bin
}

// newPowerColumns makes the ring for a detector's training window (nil
// cf2: a fixed threshold, which reads no training cell).
func newPowerColumns(sc *scene, cf2 *dsp.CFAR2D) *powerColumns {
	slots := 1
	if cf2 != nil {
		slots = 2*(cf2.GuardR+cf2.TrainR/2) + 2
	}
	pc := &powerColumns{sc: sc, nb: sc.train.plan.Bins(), tag: make([]int, slots), cols: make([][]float64, slots)}
	for i := range pc.tag {
		pc.tag[i] = -1
		pc.cols[i] = make([]float64, pc.nb)
	}
	return pc
}

// at returns the scene power at range cell k, Doppler bin d.
func (pc *powerColumns) at(k, d int) float64 {
	i := k % len(pc.tag)
	if pc.tag[i] != k {
		pc.sc.scenePowerRow(k, pc.cols[i])
		pc.tag[i] = k
	}
	return pc.cols[i][d]
}

// noiseLevels keeps the map detector's level against noise alone. It
// depends on the cell under test only through its bin and which range
// cells around it are processed (a level reads no power but its bins'
// noise): kept per bin while that pattern holds, bit for bit the level
// computed afresh.
type noiseLevels struct {
	tr     *train
	cf2    *dsp.CFAR2D
	hr     int
	k      int    // the cell the pattern was last taken at
	around []bool // processed range cells k−hr … k+hr
	level  []float64
	known  []bool
}

func newNoiseLevels(tr *train, cf2 *dsp.CFAR2D) *noiseLevels {
	hr := 0
	if cf2 != nil {
		hr = cf2.GuardR + cf2.TrainR/2
	}
	nb := tr.plan.Bins()
	return &noiseLevels{tr: tr, cf2: cf2, hr: hr, k: -1, around: make([]bool, 2*hr+1), level: make([]float64, nb), known: make([]bool, nb)}
}

// at returns the level against noise at range cell k, Doppler bin d.
func (nl *noiseLevels) at(k, d int) float64 {
	if k != nl.k {
		nl.k = k
		m := nl.tr.m
		for dk := -nl.hr; dk <= nl.hr; dk++ {
			kk := k + dk
			use := kk >= 0 && kk < m.n && m.processed[kk]
			if nl.around[dk+nl.hr] != use {
				nl.around[dk+nl.hr] = use
				clear(nl.known)
			}
		}
	}
	if !nl.known[d] {
		nl.level[d], nl.known[d] = nl.tr.level(nl.cf2, k, d, func(int, int) float64 { return 0 }), true
	}
	return nl.level[d]
}

// scenePower returns the noise-free power of every object of a pulse
// train's scene at range cell k, Doppler bin d.
func (sc *scene) scenePower(k, d int) float64 {
	s := 0.0
	for i := range sc.targets {
		s += sc.train.power(i, k, d)
	}
	return s
}

// recordInputs copies into l the inputs of scenePowerRow, each object's
// response and power per bin, and reports whether it did: not for a
// stagger's echo groups, nor when the responses hold more samples than
// the map has cells (the copies stay within the kept analyses' bounds).
func (sc *scene) recordInputs(l *keptLevels) bool {
	tr := sc.train
	size := 0
	for i, g := range sc.targets {
		if tr.groups[i] != nil {
			return false
		}
		size += len(g.resp.pow)
	}
	if size > l.n*l.nb {
		return false
	}
	l.resp = make([]response, len(sc.targets))
	l.gain = make([][]float64, len(sc.targets))
	for i, g := range sc.targets {
		l.resp[i] = response{lo: g.resp.lo, pow: slices.Clone(g.resp.pow)}
		l.gain[i] = slices.Clone(tr.gain[i][:l.nb])
	}
	return true
}

// scenePowerRow sets row[d] to scenePower(k, d) for every Doppler bin d,
// bit for bit: the same products added in the same order of objects,
// leaving out the objects whose response holds no power at k (their
// products are +0, which leaves a sum unchanged).
func (sc *scene) scenePowerRow(k int, row []float64) {
	tr := sc.train
	clear(row)
	for i := range sc.targets {
		if gs := tr.groups[i]; gs != nil {
			on := false
			for _, g := range gs {
				if sc.targets[i].resp.at(k-g.shift) != 0 {
					on = true
					break
				}
			}
			if on {
				for d := range row {
					row[d] += tr.power(i, k, d)
				}
			}
			continue
		}
		a := sc.targets[i].resp.at(k)
		if a == 0 {
			continue
		}
		gain := tr.gain[i][:len(row)]
		for d := range row {
			row[d] += a * gain[d]
		}
	}
}

// spans merges ascending gates into runs of adjacent gates.
func (m *model) spans(gates []int) []Span {
	var out []Span
	for i := 0; i < len(gates) && len(out) < MaxBreakSpans; {
		j := i
		for j+1 < len(gates) && gates[j+1] == gates[j]+1 {
			j++
		}
		out = append(out, Span{StartM: m.rangeOf(float64(gates[i])), StopM: m.rangeOf(float64(gates[j]))})
		i = j + 1
	}
	return out
}

// clutterVerdict makes a clutter object's verdict: inside the window it
// is never detected nor masked, whatever its power.
func clutterVerdict(g *tgt, v *verdict) {
	if !g.t.IsClutter() || v.status == StatusOutOfWindow || v.status == StatusEclipsed {
		return
	}
	v.status, v.culprit = StatusClutter, -1
}

func dbPtr(p float64) *float64 {
	v := toDB(p)
	return &v
}

// clutterFigures fills target j's clutter fields; single is its
// single-pulse verdict and v, bin its map verdict for pulse trains.
func (sc *scene) clutterFigures(cs *clutterScene, j int, single, v verdict, bin int, tr *TargetReport) {
	m, g := sc.m, sc.targets[j]
	out := &tr.ClutterFigures
	if g.t.Kind != TargetPoint {
		out.Role = RoleTarget
		if g.t.IsClutter() {
			out.Role = RoleClutter
		}
		if tr.RangeM > 0 {
			out.CellRCSDBsm = dbPtr(m.perMetre(g.t, tr.RangeM) * C / (2 * m.s.Waveform.Bandwidth()))
			if g.t.surfaceModel() {
				if s0, psi, ok := m.sigma0(g.t, tr.RangeM); ok {
					out.Sigma0DB = dbPtr(s0)
					deg := psi * 180 / math.Pi
					out.GrazingDeg = &deg
				}
			}
		}
	}
	if !cs.any {
		return
	}
	skip := j
	if g.t.IsClutter() {
		skip = -1 // its own power is clutter too
	}
	if k := single.peakK; k >= 0 {
		if c := sc.clutterAt(k, skip); c > minCNR {
			out.CNRDB = dbPtr(c)
			if !g.t.IsClutter() && single.peak > 0 {
				out.SCRDB = dbPtr(single.peak / c)
			}
		}
	}
	if sc.train != nil && v.peakK >= 0 && bin >= 0 {
		if c := sc.clutterMapAt(v.peakK, bin, skip) / sc.train.noise[bin]; c > minCNR {
			out.CNRIntegratedDB = dbPtr(c)
			if !g.t.IsClutter() && v.peak > 0 {
				out.SCRIntegratedDB = dbPtr(v.peak / c)
			}
		}
	}
	if g.t.IsClutter() && tr.Status == StatusClutter {
		out.Breakthrough = &Breakthrough{Cells: cs.cells[j], Spans: m.spans(cs.gates[j])}
		if out.Breakthrough.Spans == nil {
			out.Breakthrough.Spans = []Span{}
		}
	}
}

// clutterReason explains a clutter object's status.
func (sc *scene) clutterReason(g *tgt, tr TargetReport) string {
	m := sc.m
	det := detectorName(m.s.Receiver.Detector)
	b := tr.Breakthrough
	what := "range gates"
	if sc.train != nil {
		what = "range–Doppler cells"
	}
	var s string
	switch {
	case b == nil || b.Cells == 0:
		s = fmt.Sprintf("Clutter: the %s threshold holds it everywhere; no cell of it crosses.", det)
	default:
		s = fmt.Sprintf("Clutter breaking through: %d %s cross the %s threshold, each a false alarm, %s.", b.Cells, what, det, spanWords(b.Spans))
	}
	if tr.CNRDB != nil {
		s += fmt.Sprintf(" Its strongest cell is %.1f dB above noise.", *tr.CNRDB)
	}
	return s + " It is clutter, not a target (role \"clutter\"); set its role to \"target\" to judge it as one."
}

// spanWords lists breakthrough spans for a sentence.
func spanWords(sp []Span) string {
	if len(sp) == 0 {
		return ""
	}
	parts := make([]string, 0, 3)
	for i, s := range sp {
		if i == 3 {
			parts = append(parts, fmt.Sprintf("and %d more", len(sp)-3))
			break
		}
		if s.StopM-s.StartM < 0.5 {
			parts = append(parts, "at "+km(s.StartM))
		} else {
			parts = append(parts, km(s.StartM)+"–"+km(s.StopM))
		}
	}
	return "over " + strings.Join(parts, ", ")
}

// falseAlarms returns the detector's false-alarm rate against noise alone.
func (sc *scene) falseAlarms() *FalseAlarms {
	m := sc.m
	r := m.s.Radar
	gates := 0
	for _, ok := range m.processed {
		if ok {
			gates++
		}
	}
	fa := &FalseAlarms{PFA: m.s.Receiver.Detector.PFA, TestedCells: gates, LookS: r.PRIS}
	fa.IndependentCells = float64(gates) / m.noiseCorrelationLength()
	if sc.train != nil {
		cov := sc.train.noiseCov()
		nd := len(cov)
		fa.TestedCells *= nd
		fa.IndependentCells *= dsp.EffectiveCells(nd, func(i, j int) complex128 {
			return cov[i][j] / complex(math.Sqrt(real(cov[i][i])*real(cov[j][j])), 0)
		})
		fa.LookS *= float64(r.Pulses)
	} else if m.s.NonCoherent() {
		fa.LookS *= float64(r.Pulses) // one test per gate per integrated train
	}
	fa.IndependentCells = math.Min(fa.IndependentCells, float64(fa.TestedCells))
	fa.CellsPerS = fa.IndependentCells / fa.LookS
	fa.RatePerS = fa.PFA * fa.CellsPerS
	if fa.RatePerS > 0 {
		fa.MeanIntervalS = 1 / fa.RatePerS
	}
	return fa
}

// clutterSummary returns the scene's clutter figures, or nil without a
// clutter object.
func (sc *scene) clutterSummary(cs *clutterScene) *ClutterSummary {
	if cs == nil || !cs.any {
		return nil
	}
	m := sc.m
	out := &ClutterSummary{}
	for _, c := range cs.cells {
		out.BreakthroughCells += c
	}
	best, bk := 0.0, -1
	for k := range sc.clutterGates() { // elsewhere the clutter power is 0
		if !m.processed[k] {
			continue
		}
		if c := sc.clutterAt(k, -1); c > best {
			best, bk = c, k
		}
	}
	if bk >= 0 && best > minCNR {
		out.CNRPeakDB = dbPtr(best)
		r := m.rangeOf(float64(bk))
		out.CNRPeakRangeM = &r
	}
	if sc.train != nil {
		best := 0.0
		for k := range sc.clutterGates() {
			if !m.processed[k] || sc.clutterAt(k, -1) <= 0 {
				continue
			}
			for d := range sc.train.plan.Bins() {
				best = math.Max(best, sc.clutterMapAt(k, d, -1))
			}
		}
		if best > minCNR {
			out.CNRPeakIntegratedDB = dbPtr(best)
		}
	}
	return out
}
