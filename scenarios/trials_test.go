package scenarios

import (
	"context"
	"encoding/json"
	"fmt"
	"hash/fnv"
	"math"
	"strconv"
	"strings"
	"testing"

	"github.com/pulsewright/pulsewright/dsp"
)

// The Monte Carlo checks below run a fixed number of trials with the
// scenarios' fixed seeds; each asserts that the closed form lies inside
// the exact 99 % binomial interval of the count (Clopper & Pearson 1934),
// so that an unrelated change of the noise streams does not flip them,
// while a 1 dB error in the detector lies far outside it
// (TestTrialsCatchOneDB).

const mcConf = 0.99

// mcTarget is a point target whose tested SNR is tuned to snrDB.
type mcTarget struct {
	id, fluct string
	rangeM    float64
	snrDB     float64
}

// tunedScene returns the scenario doc(det, targets JSON) with each
// target's RCS tuned (three passes) so that the SNR its Pd test sees at
// its cell is its snrDB.
func tunedScene(t *testing.T, doc func(det, targets string) string, det string, tg []mcTarget) *Scenario {
	t.Helper()
	rcs := make([]float64, len(tg))
	for i := range tg {
		rcs[i] = tg[i].snrDB - 40
	}
	js := func() string {
		var parts []string
		for i, g := range tg {
			b, _ := json.Marshal(map[string]any{"id": g.id, "kind": "point", "range_m": g.rangeM, "rcs_dbsm": rcs[i], "fluctuation": g.fluct})
			parts = append(parts, string(b))
		}
		return strings.Join(parts, ",")
	}
	for range 3 {
		tr, err := NewTrials(context.Background(), mustDecode(t, doc(det, js())))
		if err != nil {
			t.Fatal(err)
		}
		for i, g := range tg {
			db, ok := tr.TestedSNRDB(i)
			if !ok {
				t.Fatalf("target %s has no tested cell", g.id)
			}
			rcs[i] += g.snrDB - db
		}
	}
	return mustDecode(t, doc(det, js()))
}

// barkerScene is a Barker-13 scene sampled once per chip (150 m gates,
// 5–40 km): its compressed response is exactly zero beyond ±13 gates and
// the compressed noise of gates one chip or more apart is correlated by
// at most 1/13 in amplitude, so 13 guard cells leave a target's training
// cells free of its own echo and nearly independent.
func barkerScene(det, targets string) string {
	return `{"version":1,"seed":7,"radar":{"carrier_hz":9.5e9,"peak_power_w":5000,"antenna_gain_dbi":33,"noise_figure_db":4,"system_loss_db":6,
		"pri_s":5e-4,"sample_rate_hz":1e6,"window_start_m":5000,"window_stop_m":40000},
		"waveform":{"kind":"barker","length":13,"chip_s":1e-6},"receiver":{"detector":` + det + `},"targets":[` + targets + `]}`
}

func lfmDoc(det, targets string) string { return lfmScene(`{"kind":"none"}`, det, targets) }

// run runs n trials of s and returns the plan and the counts.
func runTrials(t *testing.T, s *Scenario, n int) (*Trials, TrialCounts) {
	t.Helper()
	tr, err := NewTrials(context.Background(), s)
	if err != nil {
		t.Fatal(err)
	}
	c, err := tr.Run(context.Background(), 0, n, 0, nil)
	if err != nil || c.Trials != n {
		t.Fatalf("run: %d of %d trials, %v", c.Trials, n, err)
	}
	return tr, c
}

// inside reports whether p lies inside the mcConf interval of k of n.
func inside(p float64, k int64, n int) (bool, float64, float64) {
	lo, hi := dsp.ClopperPearson(k, int64(n), mcConf)
	return p >= lo && p <= hi, lo, hi
}

// Closed forms of one square-law test at SNR chi against the threshold T
// (units of the noise power; T = −ln Pfa), known noise (Richards,
// Fundamentals of Radar Signal Processing, 2nd ed., §6.3 and Table 6.1):
// Swerling 1 and 2, exp(−T/(1+χ)); Swerling 3 and 4,
// exp(−T/(1+χ/2))·(1 + (χ/2)·T/(1+χ/2)²).
func pdSwerling1(chi, T float64) float64 { return math.Exp(-T / (1 + chi)) }
func pdSwerling3(chi, T float64) float64 {
	x := chi / 2
	return math.Exp(-T/(1+x)) * (1 + x*T/((1+x)*(1+x)))
}

// TestTrialsClosedFormsKnownNoise: one pulse, fixed threshold, Pfa 1e-6.
// Steady target at 12 dB: Pd 0.67939 (Marcum Q, scipy.stats.ncx2.sf(2T,
// 2, 2χ) with scipy 1.10.1); Swerling 1–4 at 16 and 19 dB from the closed
// forms above. 2000 trials: the 99 % interval is about ±0.03 wide.
func TestTrialsClosedFormsKnownNoise(t *testing.T) {
	fixed := `{"kind":"fixed","pfa":1e-6}`
	tg := []mcTarget{
		{"steady", "none", 3500, 12},
		{"sw1", "swerling1", 5500, 19},
		{"sw2", "swerling2", 7500, 16},
		{"sw3", "swerling3", 9500, 16},
		{"sw4", "swerling4", 11500, 19},
	}
	s := tunedScene(t, lfmDoc, fixed, tg)
	const n = 2000
	tr, c := runTrials(t, s, n)
	T := -math.Log(1e-6)
	want := map[string]float64{
		"steady": 0.6793878060884759,
		"sw1":    pdSwerling1(dsp.FromDB(19), T),
		"sw2":    pdSwerling1(dsp.FromDB(16), T),
		"sw3":    pdSwerling3(dsp.FromDB(16), T),
		"sw4":    pdSwerling3(dsp.FromDB(19), T),
	}
	for j, g := range tg {
		r := tr.Report().Targets[j]
		if r.Pd == nil || math.Abs(*r.Pd-want[g.id]) > 2e-3 {
			t.Errorf("%s: analytic pd %v, closed form %.4f", g.id, r.Pd, want[g.id])
		}
		ok, lo, hi := inside(want[g.id], c.Detections[j], n)
		t.Logf("%s at %g dB: Monte Carlo %d/%d = %.4f [%.4f, %.4f], closed form %.4f", g.id, g.snrDB, c.Detections[j], n, float64(c.Detections[j])/n, lo, hi, want[g.id])
		if !ok {
			t.Errorf("%s: closed form %.4f outside the Monte Carlo interval [%.4f, %.4f]", g.id, want[g.id], lo, hi)
		}
	}
	// False alarms: Pfa × the noise-only cells (the cells are correlated
	// at fs = 4B, so the count is checked against a wide band only).
	if c.NoiseCells < int64(n)*500 {
		t.Errorf("only %d noise-only cells in %d trials", c.NoiseCells, n)
	}
}

// TestTrialsCatchOneDB: the interval of TestTrialsClosedFormsKnownNoise's
// steady target is narrow enough that a detector 1 dB off in either
// direction (the Marcum Q Pd at 11 and 13 dB: 0.44404 and 0.87444, scipy
// ncx2 as above) would fall outside it.
func TestTrialsCatchOneDB(t *testing.T) {
	fixed := `{"kind":"fixed","pfa":1e-6}`
	s := tunedScene(t, lfmDoc, fixed, []mcTarget{{"steady", "none", 6000, 12}})
	const n = 2000
	_, c := runTrials(t, s, n)
	for _, wrong := range []float64{0.4440412605795588, 0.8744407275413658} {
		if ok, lo, hi := inside(wrong, c.Detections[0], n); ok {
			t.Errorf("a detector 1 dB off (Pd %.4f) lies inside the interval [%.4f, %.4f]: the test cannot see it", wrong, lo, hi)
		}
	}
	if ok, lo, hi := inside(0.6793878060884759, c.Detections[0], n); !ok {
		t.Errorf("Marcum Q 0.6794 outside [%.4f, %.4f]", lo, hi)
	}
}

// TestTrialsCACFARSwerling1: Swerling 1 behind a 16-cell CA-CFAR, one
// pulse, Pfa 1e-6: Pd = (1 + α/(N(1+χ)))^(−N), α = N(Pfa^(−1/N) − 1)
// (Richards, Fundamentals of Radar Signal Processing, 2nd ed., eq. 6.137
// and 6.135). At 23.15 dB it is 0.9 (the published check value); at
// 18 dB 0.7127. The Barker scene's training cells hold no echo and are
// nearly independent.
func TestTrialsCACFARSwerling1(t *testing.T) {
	ca := `{"kind":"ca_cfar","pfa":1e-6,"guard_cells":13,"training_cells":16}`
	tg := []mcTarget{{"a", "swerling1", 9950, 23.15}, {"b", "swerling1", 20000, 18}, {"c", "none", 29900, 15}}
	s := tunedScene(t, barkerScene, ca, tg)
	const n = 2000
	tr, c := runTrials(t, s, n)
	N := 16.0
	alpha := N * (math.Pow(1e-6, -1/N) - 1)
	cf := func(db float64) float64 { return math.Pow(1+alpha/(N*(1+dsp.FromDB(db))), -N) }
	for j, g := range tg {
		r := tr.Report().Targets[j]
		want := *r.Pd // steady: the exact series (dsp, checked against scipy in testdata/golden/pd.py)
		if g.fluct == "swerling1" {
			want = cf(g.snrDB)
			if math.Abs(*r.Pd-want) > 0.01 {
				t.Errorf("%s: analytic pd %.4f, closed form %.4f", g.id, *r.Pd, want)
			}
		}
		ok, lo, hi := inside(want, c.Detections[j], n)
		t.Logf("%s (%s, %g dB): Monte Carlo %.4f [%.4f, %.4f], closed form or series %.4f, report %.4f", g.id, g.fluct, g.snrDB, float64(c.Detections[j])/n, lo, hi, want, *r.Pd)
		if !ok {
			t.Errorf("%s: %.4f outside the Monte Carlo interval [%.4f, %.4f]", g.id, want, lo, hi)
		}
	}
}

// TestTrialsSplitAndEngine: counts do not depend on the split of the
// trials (workers, ranges), a stopped run covers a contiguous range, and
// trial i is the engine's own noisy window for seed TrialSeed(seed, i).
func TestTrialsSplitAndEngine(t *testing.T) {
	fixed := `{"kind":"fixed","pfa":1e-3}`
	doc := lfmDoc(fixed, `{"id":"a","kind":"point","range_m":6000,"rcs_dbsm":`+ftoa(rcsFor(12, 6000))+`,"fluctuation":"swerling1"}`)
	s := mustDecode(t, doc)
	tr, err := NewTrials(context.Background(), s)
	if err != nil {
		t.Fatal(err)
	}
	ctx := context.Background()
	whole, _ := tr.Run(ctx, 0, 120, 1, nil)
	a, _ := tr.Run(ctx, 0, 50, 2, nil)
	b, _ := tr.Run(ctx, 50, 70, 3, nil)
	if err := b.Add(a); err != nil {
		t.Fatal(err)
	}
	if fmt.Sprint(b) != fmt.Sprint(whole) {
		t.Errorf("split runs %+v, whole run %+v", b, whole)
	}
	if whole.FalseAlarms == 0 || whole.Detections[0] == 0 {
		t.Errorf("nothing counted: %+v", whole)
	}
	if err := a.Add(TrialCounts{First: 200, Trials: 5, Detections: []int64{1}}); err == nil {
		t.Error("adding a run that is not adjacent succeeded")
	}

	// A cancelled run stops early on a contiguous range.
	cctx, cancel := context.WithCancel(ctx)
	part, err := tr.Run(cctx, 0, 1000, 2, func(done int) {
		if done == 30 {
			cancel()
		}
	})
	if err == nil || part.Trials < 30 || part.Trials >= 1000 {
		t.Fatalf("cancelled run: %d trials, %v", part.Trials, err)
	}
	again, _ := tr.Run(ctx, 0, part.Trials, 1, nil)
	if fmt.Sprint(again) != fmt.Sprint(part) {
		t.Errorf("cancelled run %+v is not trials 0…%d %+v", part, part.Trials-1, again)
	}

	// Trial i against the engine's window for its seed.
	k := tr.cells[0][0]
	th := dsp.FixedMultiplier(1e-3)
	for i := range 20 {
		c, _ := tr.Run(ctx, i, 1, 1, nil)
		s2 := *s
		s2.Seed = TrialSeed(s.Seed, i)
		res := mustEvaluate(t, &s2)
		hit := dsp.FromDB(res.Series.ProfileDB[k]) > th
		if hit != (c.Detections[0] == 1) {
			t.Errorf("trial %d: counted %d, engine's window at seed %d has %.2f dB against %.2f dB", i, c.Detections[0], s2.Seed, res.Series.ProfileDB[k], dsp.DB(th))
		}
	}
	if TrialSeed(7, 0) == TrialSeed(7, 1) || TrialSeed(7, 0) == TrialSeed(8, 0) || TrialSeed(-1, 3) < 0 || TrialSeed(-1, 3) > MaxSeed {
		t.Error("trial seeds collide or leave 0…MaxSeed")
	}
}

// TestTrialsFalseAlarmRate: in a scene with no target, the noise-only
// cells of the fixed detector and of each CFAR cross at the scenario's
// Pfa (1e-3 here, so that the count is large): the expected count lies
// inside the 99 % interval. The Barker scene's gates are one chip apart,
// nearly independent. The greatest-of, smallest-of and censored CFARs'
// multipliers are exact for independent cells (Hansen & Sawyers 1980;
// Rickard & Dillard 1977), so this checks them without a Pd series.
func TestTrialsFalseAlarmRate(t *testing.T) {
	for _, kind := range []string{"fixed", "ca_cfar", "os_cfar", "go_cfar", "so_cfar", "censored_cfar"} {
		det := `{"kind":"` + kind + `","pfa":1e-3`
		if kind != "fixed" {
			det += `,"guard_cells":2,"training_cells":16`
		}
		det += `}`
		s := mustDecode(t, barkerScene(det, ""))
		const n = 400
		tr, c := runTrials(t, s, n)
		sum := tr.Summarise(c, n)
		ok, lo, hi := inside(1e-3, c.FalseAlarms, int(c.NoiseCells))
		t.Logf("%s: %d false alarms in %d cells (expected %.1f), rate interval [%.2e, %.2e]", kind, c.FalseAlarms, c.NoiseCells, sum.FalseAlarms.Expected, lo, hi)
		if !ok || c.NoiseCells < n*150 {
			t.Errorf("%s: Pfa 1e-3 outside [%.2e, %.2e] (%d of %d cells)", kind, lo, hi, c.FalseAlarms, c.NoiseCells)
		}
	}
}

// TestTrialsCFARVariants: the report's Pd behind greatest-of,
// smallest-of and censored CFARs (dsp.VariantPd) against the Monte Carlo
// trials, the reference there. For a Swerling 1 target one closed form holds
// for any CFAR whose threshold is α times a scale-equivariant statistic
// Z of the training cells: the cell under test is exponential of mean
// 1+χ, so Pd(χ) = Pfa(α/(1+χ)), the CFAR's false-alarm law at a smaller
// multiplier (Weiss, IEEE TAES 18(1), 1982; Gandhi & Kassam, IEEE TAES
// 24(4), 1988). It is checked for each variant (and OS) with dsp's Pfa
// laws, and the report's pd must equal it. A steady target behind a CFAR
// cannot beat the same target against a known noise level (the
// Neyman–Pearson test of its cell alone); its report pd (GO and SO:
// E_X[F(X)] by Simpson's rule, docs/detection-probability.md §3) must lie
// inside the trials' interval; behind the censored CFAR too (the race of
// the kept sum's exponential stages, dsp.VariantPd).
func TestTrialsCFARVariants(t *testing.T) {
	const (
		n   = 2000
		pfa = 1e-6
	)
	tg := []mcTarget{{"sw1", "swerling1", 9950, 20}, {"steady", "none", 20000, 14}}
	T := -math.Log(pfa)
	known := dsp.MarcumQ(1, math.Sqrt(2*dsp.FromDB(14)), math.Sqrt(2*T)) // scipy ncx2.sf: 0.9721 at 14 dB
	for _, kind := range []string{"go_cfar", "so_cfar", "censored_cfar", "os_cfar"} {
		det := `{"kind":"` + kind + `","pfa":1e-6,"guard_cells":13,"training_cells":16}`
		s := tunedScene(t, barkerScene, det, tg)
		tr, c := runTrials(t, s, n)
		cf := tr.m.detector()
		k := tr.cells[0][0]
		offs := cf.Cells(nil, k, tr.m.n, tr.m.processed)
		n1 := 0
		for _, o := range offs {
			if o < 0 {
				n1++
			}
		}
		n2 := len(offs) - n1
		chi := dsp.FromDB(20)
		var want float64
		switch kind {
		case "go_cfar":
			a := dsp.GOMultiplier(pfa, n1, n2)
			want, _ = dsp.GOSOPfa(a/(1+chi), n1, n2)
		case "so_cfar":
			a := dsp.SOMultiplier(pfa, n1, n2)
			_, want = dsp.GOSOPfa(a/(1+chi), n1, n2)
		case "censored_cfar":
			nc := len(offs)
			cens := int(math.Round(float64(s.Receiver.Detector.CensoredCells) * float64(nc) / 16))
			want = dsp.CensoredPfa(dsp.CensoredMultiplier(pfa, nc, cens)/(1+chi), nc, cens)
		case "os_cfar":
			nc := len(offs)
			rank := min(max(int(math.Round(float64(s.Receiver.Detector.Rank)*float64(nc)/16)), 1), nc)
			want = dsp.OSPfa(dsp.OSMultiplier(pfa, nc, rank)/(1+chi), nc, rank)
		}
		ok, lo, hi := inside(want, c.Detections[0], n)
		_, slo, shi := inside(0, c.Detections[1], n)
		t.Logf("%s (%d+%d cells): Swerling 1 at 20 dB, Monte Carlo %.4f [%.4f, %.4f], closed form %.4f; steady at 14 dB, Monte Carlo %.4f [%.4f, %.4f] (known noise %.4f, report %s)",
			kind, n1, n2, float64(c.Detections[0])/n, lo, hi, want, float64(c.Detections[1])/n, slo, shi, known, optPd(tr.Report().Targets[1].Pd))
		if !ok {
			t.Errorf("%s: Swerling 1 closed form %.4f outside [%.4f, %.4f]", kind, want, lo, hi)
		}
		rep := tr.Report()
		if r := rep.Targets[0].Pd; r == nil || math.Abs(*r-want) > 1e-9 {
			t.Errorf("%s: Swerling 1 report pd %s, want the closed form %.6f", kind, optPd(r), want)
		}
		r := rep.Targets[1].Pd
		switch {
		case r == nil:
			t.Errorf("%s: no pd for the steady target", kind)
		default:
			if ok, lo, hi := inside(*r, c.Detections[1], n); !ok {
				t.Errorf("%s: steady target's analytic pd %.4f outside [%.4f, %.4f]", kind, *r, lo, hi)
			}
		}
		if slo > known {
			t.Errorf("%s: steady target beats the known-noise detector: [%.4f, %.4f] above %.4f", kind, slo, shi, known)
		}
	}
}

func optPd(p *float64) string {
	if p == nil {
		return "none"
	}
	return strconv.FormatFloat(*p, 'f', 4, 64)
}

// TestTrialsMaskingCFAR: a steady neighbour in the weak target's CA-CFAR
// training cells raises its threshold. The report's Pd treats the
// neighbour's expected power as a raised threshold (the exact series at
// the smaller Pfa that threshold has against noise alone); the trials draw
// the training cells. For a Swerling 1 target the two agree inside the
// interval; for a steady one the analytic Pd is conservative (measured:
// analytic 0.833, trials 0.882 [0.862, 0.899] with the neighbour at
// 16 dB), so it is checked as a lower bound there.
func TestTrialsMaskingCFAR(t *testing.T) {
	det := `{"kind":"ca_cfar","pfa":1e-6,"guard_cells":13,"training_cells":16}`
	const n = 2000
	for _, c := range []struct {
		strong float64
		fluct  string
	}{{13, "swerling1"}, {16, "swerling1"}, {16, "none"}} {
		tg := []mcTarget{{"strong", "none", 9950, c.strong}, {"weak", c.fluct, 9950 + 16*150, 20}}
		s := tunedScene(t, barkerScene, det, tg)
		tr, cnt := runTrials(t, s, n)
		r := tr.Report().Targets[1]
		if r.Pd == nil || r.PdAlone == nil || !(*r.PdAlone-*r.Pd > 0.1) {
			t.Fatalf("neighbour at %g dB: want a masked Pd well below pd_alone, got %s and %s", c.strong, optPd(r.Pd), optPd(r.PdAlone))
		}
		ok, lo, hi := inside(*r.Pd, cnt.Detections[1], n)
		t.Logf("neighbour %g dB, %s at 20 dB: trials %.4f [%.4f, %.4f], analytic %.4f (alone %.4f)", c.strong, c.fluct, float64(cnt.Detections[1])/n, lo, hi, *r.Pd, *r.PdAlone)
		if c.fluct == "swerling1" && !ok || *r.Pd > hi {
			t.Errorf("neighbour %g dB, %s: analytic %.4f against trials [%.4f, %.4f]", c.strong, c.fluct, *r.Pd, lo, hi)
		}
	}
}

// TestTrialsCoherentNeighbour: a weak steady target on a strong one's
// range sidelobe shares its cell with that sidelobe. The engine adds the
// two echoes with the carrier phases their ranges give, so the trials
// see their coherent sum: 0.5 resolution cells of offset move the weak
// target from a sidelobe that adds in phase (it is always seen) to one
// that cancels it (it is almost never seen). The report's Pd is the
// Rician Pd of the sum averaged over a uniform relative phase
// (docs/detection-probability.md §7, §8): the same figure for both
// places. With the carrier phases drawn per trial (SetRandomPhase) the
// trials agree with it (0.786 and 0.750, where treating the sidelobe as a
// floor under the threshold gave an optimistic 0.972).
func TestTrialsCoherentNeighbour(t *testing.T) {
	fixed := `{"kind":"fixed","pfa":1e-6}`
	res := C / (2 * 1e7)
	const n = 1000
	pd := map[float64]float64{}
	for _, off := range []float64{3.47, 3.6} {
		tg := []mcTarget{{"strong", "none", 6000, 30}, {"weak", "none", 6000 + off*res, 14}}
		s := tunedScene(t, lfmDoc, fixed, tg)
		tr, c := runTrials(t, s, n)
		pd[off] = float64(c.Detections[1]) / n
		t.Logf("weak target %.2f cells from a 30 dB one: trials %.4f, analytic %s", off, pd[off], optPd(tr.Report().Targets[1].Pd))
	}
	if !(pd[3.47] > 0.99 && pd[3.6] < 0.1) {
		t.Errorf("want the in-phase sidelobe seen (> 0.99) and the cancelling one not (< 0.1): %v", pd)
	}
	// With the carrier phases drawn per trial both places see the same
	// mix of sums.
	for _, off := range []float64{3.47, 3.6} {
		tg := []mcTarget{{"strong", "none", 6000, 30}, {"weak", "none", 6000 + off*res, 14}}
		s := tunedScene(t, lfmDoc, fixed, tg)
		tr, err := NewTrials(context.Background(), s)
		if err != nil {
			t.Fatal(err)
		}
		if err := tr.SetRandomPhase(true); err != nil {
			t.Fatal(err)
		}
		c, _ := tr.Run(context.Background(), 0, n, 0, nil)
		// The weak echo (χw) and the sidelobe (χs) at its cell with a
		// uniform relative phase φ: a steady target of power
		// χw + χs + 2√(χw·χs)·cos φ, Pd = Marcum Q₁ averaged over φ.
		k := tr.cells[1][0]
		chiW, chiS := tr.tested[1], tr.sc.targets[0].resp.at(k)
		T := -math.Log(1e-6)
		want := 0.0
		const steps = 720
		for i := range steps {
			phi := 2 * math.Pi * (float64(i) + 0.5) / steps
			p := chiW + chiS + 2*math.Sqrt(chiW*chiS)*math.Cos(phi)
			want += dsp.MarcumQ(1, math.Sqrt(2*p), math.Sqrt(2*T)) / steps
		}
		ok, lo, hi := inside(want, c.Detections[1], n)
		t.Logf("random phase, %.2f cells (sidelobe %.1f dB): trials %.4f [%.4f, %.4f], phase-averaged Marcum Q %.4f, report %s",
			off, dsp.DB(chiS), float64(c.Detections[1])/n, lo, hi, want, optPd(tr.Report().Targets[1].Pd))
		if !ok {
			t.Errorf("random phase, %.2f cells: phase-averaged Pd %.4f outside the trials' [%.4f, %.4f]", off, want, lo, hi)
		}
		// The report's Pd is that average (pdcell.go), inside the same
		// interval, and the target is masked by the strong one's sidelobe.
		rep := tr.Report().Targets[1]
		if rep.Pd == nil || math.Abs(*rep.Pd-want) > 1e-4 {
			t.Errorf("random phase, %.2f cells: report Pd %s, want the phase average %.4f", off, optPd(rep.Pd), want)
		} else if ok, lo, hi := inside(*rep.Pd, c.Detections[1], n); !ok {
			t.Errorf("random phase, %.2f cells: report Pd %.4f outside the trials' [%.4f, %.4f]", off, *rep.Pd, lo, hi)
		}
		if rep.Status != StatusMasked || rep.MaskedBy != "strong" || !strings.Contains(rep.Reason, "carrier phase") {
			t.Errorf("random phase, %.2f cells: want masked by strong's sidelobe in its cell, got %s by %q: %s", off, rep.Status, rep.MaskedBy, rep.Reason)
		}
	}
}

// TestTrialsNeighbourFluctuating: a Swerling 1 or 3 target beside the
// steady 30 dB one, where its sidelobe (9.1 dB) lies under the threshold
// in the weak target's cell. With the phases drawn per trial the report's
// Pd (dsp.PdInCell: for Swerling 1 the Rician closed form
// Q₁(√(2χs/(1+χ)), √(2T/(1+χ))), Rice 1945, derived here for the widened
// noise; for Swerling 3 the integral over its power) lies inside the
// trials' 99 % interval. The steady sidelobe raises a Swerling 1 target's
// crossing rate (Marcum Q grows with its steady part), so the status is
// decided on the target's own Pd, as the reason says.
func TestTrialsNeighbourFluctuating(t *testing.T) {
	fixed := `{"kind":"fixed","pfa":1e-6}`
	res := C / (2 * 1e7)
	const n = 2000
	for _, c := range []struct {
		fluct string
		snr   float64
	}{{"swerling1", 18}, {"swerling3", 15}} {
		tg := []mcTarget{{"strong", "none", 6000, 30}, {"weak", c.fluct, 6000 + 3.6*res, c.snr}}
		s := tunedScene(t, lfmDoc, fixed, tg)
		tr, err := NewTrials(context.Background(), s)
		if err != nil {
			t.Fatal(err)
		}
		if err := tr.SetRandomPhase(true); err != nil {
			t.Fatal(err)
		}
		cnt, _ := tr.Run(context.Background(), 0, n, 0, nil)
		rep := tr.Report().Targets[1]
		k := tr.cells[1][0]
		chiW, chiS := tr.tested[1], tr.sc.targets[0].resp.at(k)
		T := -math.Log(1e-6)
		own := knownNoisePd(swerling(c.fluct), chiW, T)
		if c.fluct == "swerling1" {
			want := dsp.MarcumQ(1, math.Sqrt(2*chiS/(1+chiW)), math.Sqrt(2*T/(1+chiW)))
			if rep.Pd == nil || math.Abs(*rep.Pd-want) > 1e-9 {
				t.Errorf("%s: report Pd %s, want the Rician %.6f", c.fluct, optPd(rep.Pd), want)
			}
		}
		if rep.Pd == nil {
			t.Fatalf("%s: no Pd", c.fluct)
		}
		ok, lo, hi := inside(*rep.Pd, cnt.Detections[1], n)
		t.Logf("%s %.0f dB with a %.1f dB steady sidelobe in its cell: trials %.4f [%.4f, %.4f], report %.4f, alone %.4f, %s",
			c.fluct, c.snr, dsp.DB(chiS), float64(cnt.Detections[1])/n, lo, hi, *rep.Pd, own, rep.Status)
		if !ok {
			t.Errorf("%s: report Pd %.4f outside the trials' [%.4f, %.4f]", c.fluct, *rep.Pd, lo, hi)
		}
	}
}

// TestTrialsPulseTrains: on a 16-pulse range–Doppler map the report's Pd
// of steady, Swerling 1 and 3 targets (one test at the integrated SNR)
// and of Swerling 2 and 4 targets (docs/detection-probability.md §2: a
// new complex amplitude every pulse, uniform phase; in a Doppler bin
// Swerling 2 is complex Gaussian — the exponential law at the bin's SNR,
// no coherent gain — and Swerling 4 is dsp.TrainChi4) lie inside the
// trials' 99 % interval. The trials simulate pulse by pulse through the
// MTI, window and DFT, an independent path. The tested SNR (14 dB) of a
// Swerling 2 or 4 target on a map is the SNR of its echo in the bin, the
// single pulse's; Swerling 2's Pd there is e^(−T/(1+χ)) (Richards,
// Fundamentals of Radar Signal Processing, 2nd ed., §6.3), which the
// report must equal.
func TestTrialsPulseTrains(t *testing.T) {
	fixed := `{"kind":"fixed","pfa":1e-6}`
	doc := func(det, targets string) string {
		return strings.Replace(barkerScene(det, targets), `"pri_s":5e-4`, `"pri_s":5e-4,"pulses":16`, 1)
	}
	base := []mcTarget{{"a", "swerling1", 9950, 14}, {"b", "swerling3", 20000, 14}, {"c", "none", 29900, 14}}
	s := tunedScene(t, doc, fixed, base)
	const n = 600
	tr1, c1 := runTrials(t, s, n)
	for j, r := range tr1.Report().Targets {
		if ok, lo, hi := inside(*r.Pd, c1.Detections[j], n); !ok {
			t.Errorf("train, %s: analytic %.4f outside trials [%.4f, %.4f]", base[j].fluct, *r.Pd, lo, hi)
		}
	}
	const n2 = 2000
	pp := []mcTarget{{"a", "swerling2", 9950, 14}, {"b", "swerling4", 20000, 14}}
	s2 := tunedScene(t, doc, fixed, pp)
	tr2, c2 := runTrials(t, s2, n2)
	T := -math.Log(1e-6)
	chi := dsp.FromDB(14)
	for j, r := range tr2.Report().Targets {
		if r.Pd == nil {
			t.Fatalf("%s in a train: no Pd (%s)", pp[j].fluct, r.Reason)
		}
		ok, lo, hi := inside(*r.Pd, c2.Detections[j], n2)
		t.Logf("%s, 16 pulses, %.2f dB in its bin: report %.4f, trials %.4f [%.4f, %.4f]; one-pulse Swerling 1 %.4f, Swerling 3 %.4f",
			pp[j].fluct, testedDB(t, tr2, j), *r.Pd, float64(c2.Detections[j])/n2, lo, hi, pdSwerling1(chi, T), pdSwerling3(chi, T))
		if !ok {
			t.Errorf("%s: analytic %.4f outside trials [%.4f, %.4f]", pp[j].fluct, *r.Pd, lo, hi)
		}
		if j == 0 {
			if want := pdSwerling1(dsp.FromDB(testedDB(t, tr2, j)), T); math.Abs(*r.Pd-want) > 1e-9 {
				t.Errorf("swerling2 on a map: pd %.6f, want the exponential law %.6f", *r.Pd, want)
			}
		}
	}
}

// TestTrialsMapCFARs: on a 16-pulse map, behind the map's greatest-of,
// smallest-of and censored CFARs (halves and censoring as the 2-D
// detector forms them) and behind a CA-CFAR, the report's Pd of a steady,
// a Swerling 1, a Swerling 2 and (not censored) a Swerling 4 target
// against the trials (2 000, 99 % interval). Inside the interval: every
// target behind the GO-CFAR, Swerling 1, 2 and 4 behind the CA-CFAR,
// steady and Swerling 1 behind SO and censored. Where the report
// approximates (docs/detection-probability.md §7), the trials measure
// the error and the test bounds it: a Swerling 2 or 4 target fills its
// own range row across the Doppler bins, so its training cells in that
// row hold its power, which the report treats as a raise of the
// threshold with the reference's noise-only randomness (behind SO far
// too low: 0.32 against 0.49; censored at the interval's edge); behind
// the CA-CFAR a steady target's Pd is optimistic because the map's
// Doppler-correlated training cells are taken as independent (0.911
// against 0.881 [0.861, 0.899]). Those must lie within 0.2 of the
// trials and, for the self-masking cases, below them (conservative).
func TestTrialsMapCFARs(t *testing.T) {
	doc := func(det, targets string) string {
		return strings.Replace(barkerScene(det, targets), `"pri_s":5e-4`, `"pri_s":5e-4,"pulses":16`, 1)
	}
	const n = 2000
	for _, kind := range []string{"go_cfar", "so_cfar", "censored_cfar", "ca_cfar"} {
		det := `{"kind":"` + kind + `","pfa":1e-5,"guard_cells":2,"training_cells":8,"doppler_guard_cells":1,"doppler_training_cells":4}`
		tg := []mcTarget{{"steady", "none", 9950, 13}, {"sw1", "swerling1", 17000, 20}, {"sw2", "swerling2", 24000, 18}, {"sw4", "swerling4", 31000, 16}}
		s := tunedScene(t, doc, det, tg)
		tr, c := runTrials(t, s, n)
		for j, r := range tr.Report().Targets {
			if r.Pd == nil {
				if kind == "censored_cfar" && tg[j].fluct == "swerling4" {
					continue // no form (docs/detection-probability.md §7)
				}
				t.Errorf("%s, %s: no Pd (%s)", kind, tg[j].fluct, r.Reason)
				continue
			}
			ok, lo, hi := inside(*r.Pd, c.Detections[j], n)
			emp := float64(c.Detections[j]) / n
			t.Logf("%s, %s at %.2f dB: report %.4f, trials %.4f [%.4f, %.4f]", kind, tg[j].fluct, testedDB(t, tr, j), *r.Pd, emp, lo, hi)
			selfMasked := (kind == "so_cfar" || kind == "censored_cfar") && (tg[j].fluct == "swerling2" || tg[j].fluct == "swerling4")
			approx := selfMasked || kind == "ca_cfar" && tg[j].fluct == "none"
			switch {
			case !approx && !ok:
				t.Errorf("%s, %s: analytic %.4f outside trials [%.4f, %.4f]", kind, tg[j].fluct, *r.Pd, lo, hi)
			case approx && math.Abs(*r.Pd-emp) > 0.2:
				t.Errorf("%s, %s: analytic %.4f more than 0.2 from the trials' %.4f", kind, tg[j].fluct, *r.Pd, emp)
			case selfMasked && *r.Pd > hi+0.005:
				t.Errorf("%s, %s: analytic %.4f above the trials' [%.4f, %.4f]: not conservative", kind, tg[j].fluct, *r.Pd, lo, hi)
			}
		}
	}
}

// testedDB is the SNR (dB) target j's test sees at its cell.
func testedDB(t *testing.T, tr *Trials, j int) float64 {
	t.Helper()
	db, ok := tr.TestedSNRDB(j)
	if !ok {
		t.Fatalf("target %d has no tested cell", j)
	}
	return db
}

// TestTrialsMapSwerling2And4MTIStagger: Swerling 2 on a staggered train's
// map (fixed threshold: the bin is a sum of Gaussian contributions of the
// groups, exponential whatever its weights) and Swerling 2 and 4 behind a
// two-pulse MTI canceller and a 2-D CA-CFAR (the bins' unequal noise and
// the canceller's weights in dsp.TrainChi4): the report's Pd inside the
// trials' 99 % interval (1 000 trials). Measured: staggered 0.1090 and
// 0.1008 against 0.105 and 0.102; MTI Swerling 4 0.5668 against 0.578,
// Swerling 2 0.5205 against 0.496.
func TestTrialsMapSwerling2And4MTIStagger(t *testing.T) {
	const n = 1000
	head := `{"version":2,"seed":7,"radar":{"carrier_hz":9.5e9,"peak_power_w":5000,"antenna_gain_dbi":33,"noise_figure_db":4,"system_loss_db":6,` +
		`"pri_s":5e-4,%s"pulses":16,"sample_rate_hz":1e6,"window_start_m":5000,"window_stop_m":40000},` +
		`"waveform":{"kind":"barker","length":13,"chip_s":1e-6},"receiver":{%s},"targets":[` +
		`{"id":"a","kind":"point","range_m":9950,"rcs_dbsm":%g,"fluctuation":"%s","range_rate_mps":30},` +
		`{"id":"b","kind":"point","range_m":20000,"rcs_dbsm":%g,"fluctuation":"swerling2","range_rate_mps":-80}]}`
	for _, doc := range []string{
		fmt.Sprintf(head, `"pri_stagger_s":[5e-4,6e-4],`, `"detector":{"kind":"fixed","pfa":1e-6}`, -18.0, "swerling2", -6.0),
		fmt.Sprintf(head, ``, `"mti":"two_pulse","detector":{"kind":"ca_cfar","pfa":1e-5}`, -8.0, "swerling4", 3.0),
	} {
		s := mustDecode(t, doc)
		tr, c := runTrials(t, s, n)
		for j, r := range tr.Report().Targets {
			if r.Pd == nil {
				t.Errorf("%s: no Pd (%s)", r.ID, r.Reason)
				continue
			}
			ok, lo, hi := inside(*r.Pd, c.Detections[j], n)
			t.Logf("%s (%s): report %.4f, trials %.4f [%.4f, %.4f]", r.ID, s.Targets[j].Fluctuation, *r.Pd, float64(c.Detections[j])/n, lo, hi)
			if !ok {
				t.Errorf("%s: analytic %.4f outside [%.4f, %.4f]", r.ID, *r.Pd, lo, hi)
			}
		}
	}
}

// TestStreamKeyIsFNV: the allocation-free stream key against Go's
// hash/fnv (FNV-1a, 64 bits), the hash the streams were defined with.
func TestStreamKeyIsFNV(t *testing.T) {
	for _, id := range []string{"", "a", "tanker", "pilot-boat", "ü-ß 漢字", strings.Repeat("x", 300)} {
		h := fnv.New64a()
		h.Write([]byte(id))
		for _, salt := range []uint64{0, 0x4e01, 0x5157 + 7<<24} {
			if got, want := streamKey(id, salt), h.Sum64()^salt; got != want {
				t.Errorf("streamKey(%q, %#x) = %#x, hash/fnv gives %#x", id, salt, got, want)
			}
		}
	}
}
