package scenarios

import (
	"encoding/json"
	"math"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"github.com/pulsewright/pulsewright/dsp"
)

// scanScene is an X-band pulse train of 16 pulses at 1 ms behind a 2°
// beam, Hann Doppler window, no MTI, with one steady point target at zero
// Doppler (a bin centre); scan and rcs are filled in.
func scanScene(scan string, rcs float64) string {
	return `{"version": 2, "seed": 5,
 "radar": {"pulses": 16, "pri_s": 1e-3, "beamwidth_az_deg": 2, "window_start_m": 2000, "window_stop_m": 12000` + scan + `},
 "waveform": {"kind": "lfm", "pulse_width_s": 1e-5, "bandwidth_hz": 1e6},
 "receiver": {"detector": {"kind": "fixed"}},
 "targets": [{"id": "jet", "kind": "point", "range_m": 8000, "rcs_dbsm": ` + ftoa(rcs) + `}]}`
}

// goldenHann16 reads the coherent loss of 16 pulses, 0.125 beamwidths
// apart, under a Gaussian beam with symmetric Hann weights from
// testdata/golden/scan.json (scan.py: NumPy, scipy.signal.windows.hann).
func goldenHann16(t *testing.T) float64 {
	t.Helper()
	b, err := os.ReadFile(filepath.Join("..", "testdata", "golden", "scan.json"))
	if err != nil {
		t.Fatal(err)
	}
	var g struct {
		Cases []struct {
			Shape          string
			N              int
			Step           float64
			CoherentHannDB *float64 `json:"coherent_hann_db"`
		}
	}
	if err := json.Unmarshal(b, &g); err != nil {
		t.Fatal(err)
	}
	for _, c := range g.Cases {
		if c.Shape == "gaussian" && c.N == 16 && c.Step == 0.125 && c.CoherentHannDB != nil {
			return *c.CoherentHannDB
		}
	}
	t.Fatal("no gaussian n=16 step=0.125 case in scan.json")
	return 0
}

// TestScanLossOnMap: a beam at 250°/s moves 0.125 of its 2° width per
// 1 ms pulse; the 16-pulse CPI centred on the target loses what the
// golden file's Hann-weighted coherent sum loses, on the expected map, in
// snr_integrated_db and in the report's cpi_loss_db.
func TestScanLossOnMap(t *testing.T) {
	want := goldenHann16(t)
	stare := mustEvaluate(t, mustDecode(t, scanScene("", 10)))
	res := mustEvaluate(t, mustDecode(t, scanScene(`, "scan": {"rate_deg_s": 250}`, 10)))
	j0, j := target(stare, "jet"), target(res, "jet")
	if j.ScanLossDB == nil || math.Abs(*j.ScanLossDB-want) > 1e-9 {
		t.Fatalf("scan_loss_db %v, golden %.9f dB", j.ScanLossDB, want)
	}
	if d := *j0.SNRIntegratedDB - *j.SNRIntegratedDB; math.Abs(d-want) > 1e-9 {
		t.Errorf("integrated SNR falls by %.9f dB, want %.9f", d, want)
	}
	if j0.ScanLossDB != nil || stare.Report.Scan != nil {
		t.Errorf("a staring beam reports scan figures: %v %+v", j0.ScanLossDB, stare.Report.Scan)
	}
	sr := res.Report.Scan
	if sr == nil || sr.CPILossDB == nil || math.Abs(*sr.CPILossDB-want) > 1e-9 {
		t.Fatalf("scan report %+v, want cpi_loss_db %.6f", sr, want)
	}
	// Half a CPI (one beamwidth) off the peak: 16.66 dB, the golden file's
	// first "offset" case (scan.py).
	if sr.CPILossOffsetDB == nil || math.Abs(*sr.CPILossOffsetDB-16.657080143083505) > 1e-9 {
		t.Errorf("cpi_loss_offset_db %v, golden 16.6571", sr.CPILossOffsetDB)
	}
	// 2°/(250°/s) = 8 ms dwell, 8 hits; the 16 ms CPI spans 2 beamwidths.
	if math.Abs(sr.HitsPerScan-8) > 1e-12 || math.Abs(sr.DwellS-8e-3) > 1e-15 || !sr.CPIExceedsDwell || math.Abs(sr.CPIBeamwidths-2) > 1e-12 {
		t.Errorf("hits %g, dwell %g, exceeds %v, beamwidths %g; want 8, 8 ms, true, 2", sr.HitsPerScan, sr.DwellS, sr.CPIExceedsDwell, sr.CPIBeamwidths)
	}
	if !hasWarning(res, "longer than the 8 ms the beam dwells") {
		t.Errorf("no warning of a CPI longer than the dwell: %q", res.Report.Warnings)
	}
	if !strings.Contains(j.Reason, "The scan costs") {
		t.Errorf("reason does not name the scan loss: %s", j.Reason)
	}
	// The simulated map carries the modulation too: at 40 dB the noisy
	// peak sits within 1 dB of the expected one, the staring one's less
	// the loss.
	big0 := mustEvaluate(t, mustDecode(t, scanScene("", 40)))
	big := mustEvaluate(t, mustDecode(t, scanScene(`, "scan": {"rate_deg_s": 250}`, 40)))
	p0, p := mapPeak(big0), mapPeak(big)
	if d := p0 - p; math.Abs(d-want) > 1 {
		t.Errorf("simulated peaks %.2f and %.2f dB: difference %.2f, want %.2f ± 1", p0, p, d, want)
	}
}

// mapPeak returns the largest noisy value of a result's range–Doppler map, dB.
func mapPeak(res *Result) float64 {
	best := math.Inf(-1)
	for _, row := range res.Series.RangeDoppler.DB {
		for _, v := range row {
			best = math.Max(best, float64(v))
		}
	}
	return best
}

func hasWarning(res *Result, words string) bool {
	for _, w := range res.Report.Warnings {
		if strings.Contains(w, words) {
			return true
		}
	}
	return false
}

// TestHitsPerScan: a 2° beam turning at 60°/s (10 rpm) with a 1 ms PRI
// dwells 1/30 s on a target: 33.3 hits per scan, one turn in 6 s
// (arithmetic). The 16-pulse CPI spans 0.48 beamwidths and loses little;
// the beam-shape losses of 33 hits come near their dense limits (1.67 and
// 1.83 dB for a Gaussian beam, dsp.BeamShapeLoss).
func TestHitsPerScan(t *testing.T) {
	res := mustEvaluate(t, mustDecode(t, scanScene(`, "scan": {"rate_deg_s": 60}`, 10)))
	sr := res.Report.Scan
	if sr == nil || math.Abs(sr.HitsPerScan-100.0/3) > 1e-9 || sr.ScanPeriodS == nil || math.Abs(*sr.ScanPeriodS-6) > 1e-12 || sr.CPIExceedsDwell {
		t.Fatalf("scan report %+v", sr)
	}
	if math.Abs(sr.BeamShapeLossNoncoherentDB-1.67) > 0.01 || math.Abs(sr.BeamShapeLossCoherentDB-1.83) > 0.01 {
		t.Errorf("beam-shape losses %.3f / %.3f dB, want about 1.67 / 1.83", sr.BeamShapeLossNoncoherentDB, sr.BeamShapeLossCoherentDB)
	}
	if sr.CPILossDB == nil || *sr.CPILossDB > 0.2 || *sr.CPILossDB <= 0 {
		t.Errorf("a CPI of 0.48 beamwidths loses %v dB, want a little", sr.CPILossDB)
	}
	if hasWarning(res, "radar.scan") {
		t.Errorf("unexpected scan warning: %q", res.Report.Warnings)
	}
	// An elevation scan uses the elevation beamwidth and has no turn.
	el := mustEvaluate(t, mustDecode(t, strings.Replace(scanScene(`, "beamwidth_el_deg": 4, "scan": {"rate_deg_s": 60, "plane": "elevation"}`, 10), `"beamwidth_az_deg": 2`, `"beamwidth_az_deg": 2`, 1)))
	if s := el.Report.Scan; s == nil || math.Abs(s.HitsPerScan-200.0/3) > 1e-9 || s.ScanPeriodS != nil {
		t.Errorf("elevation scan %+v, want 66.7 hits and no period", s)
	}
}

// TestSingleScanPulse: a single pulse sits at the beam's peak: a scan
// changes no figure of a point target.
func TestSingleScanPulse(t *testing.T) {
	doc := strings.Replace(scanScene("", 10), `"pulses": 16`, `"pulses": 1`, 1)
	a := mustEvaluate(t, mustDecode(t, doc))
	b := mustEvaluate(t, mustDecode(t, strings.Replace(doc, `"window_stop_m": 12000`, `"window_stop_m": 12000, "scan": {"rate_deg_s": 60}`, 1)))
	ja, jb := target(a, "jet"), target(b, "jet")
	if ja.SNRDB != jb.SNRDB || ja.Status != jb.Status || *ja.Pd != *jb.Pd || jb.ScanLossDB != nil {
		t.Errorf("single pulse: %+v\nwith a scan: %+v", ja, jb)
	}
	if b.Report.Scan == nil || b.Report.Scan.CPILossDB != nil {
		t.Errorf("single pulse scan report %+v: want figures without cpi_loss_db", b.Report.Scan)
	}
}

// TestScanLossDecides: a target 0.5 dB above pd_required on a staring
// beam is missed under a beam that sweeps two beamwidths in the CPI, and
// its reason says the scan loss decides.
func TestScanLossDecides(t *testing.T) {
	base := target(mustEvaluate(t, mustDecode(t, scanScene("", 0))), "jet")
	if base.MarginDB == nil {
		t.Fatal("no margin on the staring beam")
	}
	rcs := 0.5 - *base.MarginDB
	stare := target(mustEvaluate(t, mustDecode(t, scanScene("", rcs))), "jet")
	scan := target(mustEvaluate(t, mustDecode(t, scanScene(`, "scan": {"rate_deg_s": 250}`, rcs))), "jet")
	if stare.Status != StatusDetected || scan.Status == StatusDetected {
		t.Fatalf("staring %s (margin %.2f), scanning %s", stare.Status, *stare.MarginDB, scan.Status)
	}
	if !strings.Contains(scan.Reason, "The scan loss decides") || !strings.Contains(scan.Reason, "The CPI is longer than the 8 ms dwell") {
		t.Errorf("reason: %s", scan.Reason)
	}
	if d := *stare.MarginDB - *scan.MarginDB; math.Abs(d-*scan.ScanLossDB) > 1e-6 {
		t.Errorf("margin falls by %.4f dB, scan loss %.4f", d, *scan.ScanLossDB)
	}
}

// TestScanClutterPatch: under a scanning beam the surface patch is
// weighted by the two-way pattern: σ⁰ = −20 dB, R = 10 km, θ = 1°,
// ΔR = 15 m gives 14.18 dBsm with the rectangular beam (Skolnik,
// Introduction to Radar Systems) and 14.18 + 10·log10(√(π/(8 ln2))) =
// 12.95 dBsm with a Gaussian one (∫f⁴, docs/detection.md §14; Barton &
// Leonov, Radar Technology Encyclopedia, p. 249, 1.23 dB).
func TestScanClutterPatch(t *testing.T) {
	for _, c := range []struct {
		extra string
		want  float64
	}{
		{"", 14.1797},
		{`, "scan": {"rate_deg_s": 60}`, 14.1797 + dsp.DB(math.Sqrt(math.Pi/(8*math.Ln2)))},
		{`, "scan": {"rate_deg_s": 60, "pattern": "sinc"}`, 14.1797 + dsp.DB(2/(3*0.8858929413789046))},
	} {
		r := target(surface(t, c.extra, `"sigma0_db": -20`, 10000, 10300), "sea")
		got := *r.CellRCSDBsm - 10*math.Log10(r.RangeM/1e4)
		if math.Abs(got-c.want) > 0.001 {
			t.Errorf("%q: σ_c at 10 km %.4f dBsm, want %.4f", c.extra, got, c.want)
		}
	}
	// A sea given by sea_state is weighted alike.
	doc := seaDoc(`"sea_state": 3`, 1500, 8000)
	a := target(mustEvaluate(t, mustDecode(t, doc)), "sea")
	b := target(mustEvaluate(t, mustDecode(t, strings.Replace(doc, `"window_stop_m": 9000`, `"window_stop_m": 9000, "scan": {"rate_deg_s": 60}`, 1))), "sea")
	if a.RangeM != b.RangeM || math.Abs(*a.CellRCSDBsm-*b.CellRCSDBsm-1.2339) > 1e-3 {
		t.Errorf("sea_state cell %.4f dBsm at %.0f m, with a scan %.4f at %.0f m: want 1.2339 dB less", *a.CellRCSDBsm, a.RangeM, *b.CellRCSDBsm, b.RangeM)
	}
	// The rectangular patch to four places: 0.01·10⁴·(π/180)·15 m².
	if want := dsp.DB(0.01 * 1e4 * math.Pi / 180 * 15); math.Abs(want-14.1797) > 1e-4 {
		t.Errorf("rectangular patch %.5f dBsm", want)
	}
}

// TestScanErrors: bad radar.scan values are rejected with the field, the
// value and the valid range.
func TestScanErrors(t *testing.T) {
	for _, c := range []struct{ scan, path, words string }{
		{`{}`, "radar.scan.rate_deg_s", "required"},
		{`{"rate_deg_s": 0}`, "radar.scan.rate_deg_s", "0 must be above 0 (valid range: above 0, at most 36000)"},
		{`{"rate_deg_s": -5}`, "radar.scan.rate_deg_s", "-5 must be above 0"},
		{`{"rate_deg_s": 1e6}`, "radar.scan.rate_deg_s", "1e+06 is above the maximum 36000"},
		{`{"rate_deg_s": 60, "plane": "diagonal"}`, "radar.scan.plane", `"diagonal" is not one of azimuth, elevation`},
		{`{"rate_deg_s": 60, "pattern": "cosine"}`, "radar.scan.pattern", `"cosine" is not one of gaussian, sinc`},
		{`{"rate_deg_s": 60, "rpm": 10}`, "radar.scan.rpm", ""},
		{`60`, "radar.scan", ""},
	} {
		_, err := Decode([]byte(scanScene(`, "scan": `+c.scan, 10)))
		wantFieldError(t, c.scan, err, c.path, c.words)
	}
}

// TestScanCanonical: the defaults stay out of the canonical form, which
// reads back the same.
func TestScanCanonical(t *testing.T) {
	s := mustDecode(t, scanScene(`, "scan": {"rate_deg_s": 60, "plane": "azimuth", "pattern": "sinc"}`, 10))
	b, err := Canonical(s)
	if err != nil {
		t.Fatal(err)
	}
	if !strings.Contains(string(b), `"scan":{"rate_deg_s":60,"pattern":"sinc"}`) {
		t.Errorf("canonical form: %s", b)
	}
	s2 := mustDecode(t, string(b))
	if *s2.Radar.Scan != *s.Radar.Scan {
		t.Errorf("round trip %+v → %+v", s.Radar.Scan, s2.Radar.Scan)
	}
	// Sweeps set it by path, and create it on a staring scene.
	for _, doc := range []string{scanScene(`, "scan": {"rate_deg_s": 60}`, 10), scanScene("", 10)} {
		s3, err := With(mustDecode(t, doc), Assignment{Path: "radar.scan.rate_deg_s", Value: []byte("120")})
		if err != nil || s3.Radar.Scan == nil || s3.Radar.Scan.RateDegS != 120 || s3.Radar.Scan.Pattern != PatternGaussian {
			t.Errorf("With radar.scan.rate_deg_s: %+v, %v", s3, err)
		}
	}
}

// TestScanSchedule: each CPI of a schedule has its own hits per scan and
// loss, and the schedule's length is compared with the dwell.
func TestScanSchedule(t *testing.T) {
	doc := scanScene(`, "schedule": {"cpis": [{"pri_s": 5e-4, "pulses": 8}], "m": 1}, "scan": {"rate_deg_s": 100}`, 10)
	res := mustEvaluate(t, mustDecode(t, doc))
	sr := res.Report.Scan
	if sr == nil || len(sr.CPIs) != 2 || sr.ScheduleS == nil {
		t.Fatalf("scan report %+v", sr)
	}
	// 2°/(100°/s) = 20 ms: 20 hits at 1 ms, 40 at 0.5 ms; 16 + 4 ms.
	if math.Abs(sr.CPIs[0].HitsPerScan-20) > 1e-9 || math.Abs(sr.CPIs[1].HitsPerScan-40) > 1e-9 || math.Abs(*sr.ScheduleS-0.02) > 1e-12 {
		t.Errorf("CPIs %+v, schedule %g s", sr.CPIs, *sr.ScheduleS)
	}
	if sr.CPIs[1].CPILossDB == nil || *sr.CPIs[1].CPILossDB >= *sr.CPIs[0].CPILossDB {
		t.Errorf("the shorter CPI should lose less: %+v", sr.CPIs)
	}
	if hasWarning(res, "the schedule's") {
		t.Errorf("20 ms of CPIs fit a 20 ms dwell: %q", res.Report.Warnings)
	}
}

// TestScanTrials: the Monte Carlo trials simulate each pulse through the
// moving beam and detect on the noisy map; their detection rate agrees
// with the analytic Pd of the pattern-weighted expected map (a CPI of two
// beamwidths: 2.3 dB of scan loss), within the Clopper–Pearson interval.
func TestScanTrials(t *testing.T) {
	base := target(mustEvaluate(t, mustDecode(t, scanScene(`, "scan": {"rate_deg_s": 250}`, 0))), "jet")
	s := mustDecode(t, scanScene(`, "scan": {"rate_deg_s": 250}`, -*base.MarginDB-0.7))
	const n = 600
	tr, c := runTrials(t, s, n)
	r := tr.Report().Targets[0]
	if r.Pd == nil || r.ScanLossDB == nil || *r.ScanLossDB < 2 {
		t.Fatalf("report %+v", r)
	}
	ok, lo, hi := inside(*r.Pd, c.Detections[0], n)
	t.Logf("scan loss %.2f dB: analytic Pd %.4f, trials %.4f [%.4f, %.4f]", *r.ScanLossDB, *r.Pd, float64(c.Detections[0])/n, lo, hi)
	if !ok {
		t.Errorf("analytic Pd %.4f outside the trials' [%.4f, %.4f]", *r.Pd, lo, hi)
	}
}
