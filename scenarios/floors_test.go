package scenarios

import (
	"errors"
	"math"
	"strconv"
	"strings"
	"testing"
)

func mustFloors(t *testing.T, res *Result, target, row string) *Floors {
	t.Helper()
	f, err := res.Floors(target, row)
	if err != nil {
		t.Fatalf("floors: %v", err)
	}
	return f
}

func (f *Floors) curve(id string) []float64 {
	for _, c := range f.Curves {
		if c.ID == id {
			return c.DB
		}
	}
	return nil
}

func (f *Floors) mark(id string) FloorMark {
	for _, m := range f.Marks {
		if m.ID == id {
			return m
		}
	}
	return FloorMark{}
}

// gate returns the window sample of range r on the floors' grid.
func (f *Floors) gate(r float64) int { return int(math.Round((r - f.RangeM0) / f.RangeStepM)) }

// TestFloorsPhaseNoiseSkirt: the check (TestPhaseNoiseSkirtMasks
// sets it up: a phase-noise floor of about −50 dBc over the skiff's
// Doppler cell, range correlation after Budge & Burt, Proc. IEEE
// Southeastcon 1993, formula from memory) seen in the dynamic-range
// view: with the tanker selected (the strongest target, so also the
// default), the curves follow the skiff's Doppler row, the tanker's
// skirt there is the highest floor at the skiff's range, above the
// tanker's own response (its Doppler sidelobes) and above the skiff's
// peak, and the skiff's mark names the skirt. The ideal receiver's view
// has no skirt and the skiff clears every floor.
func TestFloorsPhaseNoiseSkirt(t *testing.T) {
	const fe = `{"phase_noise_offsets_hz":[100,3000,30000],"phase_noise_dbc_hz":[-70.5,-70.5,-130]}`
	res := mustEvaluate(t, mustDecode(t, pnScene(fe)))
	f := mustFloors(t, res, "", "")
	if f.Target != "tanker" || f.RowTarget != "skiff" || f.Row < 0 {
		t.Fatalf("selected %q, row %d through %q; want tanker, the skiff's row", f.Target, f.Row, f.RowTarget)
	}
	sk := f.mark("skiff")
	if sk.Floor != FloorSkirt || !sk.Hidden || !sk.OnRow || sk.Status != StatusMasked {
		t.Errorf("skiff's mark: %+v, want hidden by the skirt", sk)
	}
	k := f.gate(sk.RangeM)
	skirt, resp := f.curve(FloorSkirt), f.curve(FloorResponse)
	if skirt == nil || resp == nil {
		t.Fatalf("curves %v lack the skirt or the response", f.Curves)
	}
	t.Logf("at the skiff: skirt %.1f dB, tanker's response %.1f dB, skiff's peak %.1f dB, threshold %.1f dB, tanker's peak %.1f dB",
		skirt[k], resp[k], sk.PeakDB, f.curve(FloorThreshold)[k], f.PeakDB)
	if !(skirt[k] > resp[k] && skirt[k] > sk.PeakDB && skirt[k] > 0) {
		t.Errorf("at the skiff the skirt (%.1f dB) is not above the response (%.1f dB), the skiff (%.1f dB) and noise", skirt[k], resp[k], sk.PeakDB)
	}
	if math.Abs(sk.FloorDB-skirt[k]) > 1e-9 {
		t.Errorf("mark's floor %.3f dB, curve there %.3f dB", sk.FloorDB, skirt[k])
	}
	// The skirt re the tanker's map peak: −50 dBc over one Doppler bin,
	// seen through the Doppler filter's noise bandwidth, 2.00 bins for the
	// 4-term Blackman-Harris window (+3.0 dB; Harris, Proc. IEEE 66(1),
	// 1978, Table I), within 1 dB (the profile is not flat over the
	// filter's 8-bin main lobe).
	if d := skirt[k] - f.PeakDB; math.Abs(d-(-50+3.0)) > 1 {
		t.Errorf("skirt %.2f dB re the tanker's peak, want −50 + 3.0 dB within 1 dB", d)
	}

	ideal := mustFloors(t, mustEvaluate(t, mustDecode(t, pnScene(""))), "tanker", "skiff")
	if ideal.curve(FloorSkirt) != nil {
		t.Errorf("the ideal receiver has a skirt")
	}
	if m := ideal.mark("skiff"); m.Hidden || m.Status != StatusDetected || m.PeakDB <= m.FloorDB {
		t.Errorf("ideal receiver: skiff's mark %+v", m)
	}
}

// TestFloorsQuantisation: an 8-bit converter 60 dB over thermal noise
// (TestADCQuantisationMasks: a sign detector, quantisation noise π/2 − 1
// of the thermal noise, the hard-limiting loss; Kester, Analog Devices
// MT-001 for the uniform model it departs from) masks a weak target
// through the CA-CFAR; with a strong target selected, the weak one's mark
// names the ADC's floor, the quantisation curve sits at
// 10·log10(π/2 − 1) = −2.43 dB and the engine's reason names the same.
func TestFloorsQuantisation(t *testing.T) {
	ca := `{"kind":"ca_cfar","pfa":1e-6,"guard_cells":8,"training_cells":32}`
	doc := lfmScene(`{"kind":"none"}`, ca, pointJSON("big", 4000, rcsFor(60, 4000)), pointJSON("far", 8000, rcsFor(16.0, 8000)))
	res := mustEvaluate(t, mustDecode(t, withFrontEnd(doc, `{"adc_bits":8,"adc_full_scale_db":60}`)))
	far := target(res, "far")
	if far.Status != StatusMasked || !strings.Contains(far.Reason, "quantisation noise") {
		t.Fatalf("far %s: %s", far.Status, far.Reason)
	}
	f := mustFloors(t, res, "", "")
	if f.Target != "big" || f.Row != -1 {
		t.Fatalf("selected %q row %d", f.Target, f.Row)
	}
	m := f.mark("far")
	if m.Floor != FloorQuantise || !m.Hidden {
		t.Errorf("far's mark %+v, want hidden by the quantisation floor", m)
	}
	q := f.curve(FloorQuantise)
	if q == nil {
		t.Fatal("no quantisation curve")
	}
	want := 10 * math.Log10(math.Pi/2-1)
	if k := f.gate(8000); math.Abs(q[k]-want) > 1e-6 || math.Abs(m.FloorDB-want) > 1e-6 {
		t.Errorf("quantisation floor %.4f dB (mark %.4f dB), want %.4f", q[k], m.FloorDB, want)
	}
}

// TestFloorsSidelobe: TestMaskingBySidelobe's weak target on the third
// range sidelobe of an unweighted LFM (sinc sidelobes, textbook result,
// common practice, no source) is hidden by the strong target's response;
// the response curve at its range equals the engine's rest-of-scene power
// at its cell.
func TestFloorsSidelobe(t *testing.T) {
	const r0 = 6000.0
	weakR := r0 + 3.47*C/(2*1e7)
	doc := lfmScene(`{"kind":"none"}`, `{"kind":"fixed","pfa":1e-6}`, pointJSON("strong", r0, rcsFor(60, r0)), pointJSON("weak", weakR, rcsFor(35, weakR)))
	res := mustEvaluate(t, mustDecode(t, doc))
	f := mustFloors(t, res, "strong", "")
	m := f.mark("weak")
	if m.Floor != FloorResponse || !m.Hidden {
		t.Errorf("weak's mark %+v, want hidden by strong's response", m)
	}
	if k := f.gate(m.RangeM); !(f.curve(FloorResponse)[k] > m.PeakDB) {
		t.Errorf("response %.1f dB at the weak target's %.1f dB peak", f.curve(FloorResponse)[k], m.PeakDB)
	}
	// Selecting the weak one: the strong target is not hidden, its floor
	// is the highest at its cell (the weak one's response or noise).
	f = mustFloors(t, res, "weak", "")
	if s := f.mark("strong"); s.Hidden || s.Status != StatusDetected || s.PeakDB < 59 {
		t.Errorf("strong's mark with weak selected: %+v", s)
	}
}

// TestFloorsErrors: an unknown target or row is refused with its value
// and the valid ids; a result without a scene says so.
func TestFloorsErrors(t *testing.T) {
	res := mustEvaluate(t, mustDecode(t, lfmScene(`{"kind":"none"}`, "", pointJSON("a", 6000, 0), pointJSON("b", 7000, 0))))
	_, err := res.Floors("zz", "")
	if err == nil || !errors.Is(err, ErrInvalid) || !strings.Contains(err.Error(), `target "zz"`) || !strings.Contains(err.Error(), "a, b") {
		t.Errorf("unknown target: %v", err)
	}
	if _, err := (&Result{}).Floors("", ""); err == nil || !errors.Is(err, ErrInvalid) {
		t.Errorf("no scene: %v", err)
	}
	f := mustFloors(t, res, "b", "zz") // single pulse: no row to choose
	if f.Row != -1 {
		t.Errorf("single pulse row %d", f.Row)
	}
}

// BenchmarkFloors: the view of the harbour demo's tanker (single pulse)
// and of the phase-noise train's tanker, from an evaluation already made
// (what a frame costs while the Floors tab shows).
func BenchmarkFloors(b *testing.B) {
	d, err := LoadDemo("harbour-skiff")
	if err != nil {
		b.Fatal(err)
	}
	for _, c := range []struct {
		name string
		s    *Scenario
	}{
		{"harbour", d.Scenario},
		{"train", mustDecode(b, pnScene(`{"phase_noise_offsets_hz":[100,3000,30000],"phase_noise_dbc_hz":[-70.5,-70.5,-130]}`))},
	} {
		res := mustEvaluate(b, c.s)
		b.Run(c.name, func(b *testing.B) {
			b.ReportAllocs()
			for b.Loop() {
				if _, err := res.Floors("", ""); err != nil {
					b.Fatal(err)
				}
			}
		})
	}
}

// BenchmarkEvaluatePhaseNoise: a whole evaluation of the phase-noise
// train (its skirts included).
func BenchmarkEvaluatePhaseNoise(b *testing.B) {
	s := mustDecode(b, pnScene(`{"phase_noise_offsets_hz":[100,3000,30000],"phase_noise_dbc_hz":[-70.5,-70.5,-130]}`))
	for b.Loop() {
		mustEvaluate(b, s)
	}
}

// TestFloorsClipping: TestADCClipping's echo, 6 dB over the ADC's full
// scale (its loss checked there against dsp's clipper and correlator):
// the view draws the response as clipped and, beside it, the unclipped
// one, whose peak is higher by the loss the reason states, while the
// clipped response's far sidelobes rise above the unclipped ones (the
// saturation's harmonics do not compress).
func TestFloorsClipping(t *testing.T) {
	step := C / (2 * 4e7)
	r := 3000 + 800*step
	doc := lfmScene(`{"kind":"none"}`, `{"kind":"fixed","pfa":1e-6}`, pointJSON("big", r, rcsFor(90, r)))
	res := mustEvaluate(t, mustDecode(t, withFrontEnd(doc, `{"adc_bits":16,"adc_full_scale_db":58}`)))
	f := mustFloors(t, res, "big", "")
	resp, lin := f.curve(FloorResponse), f.curve(FloorUnclipped)
	if lin == nil {
		t.Fatal("no unclipped curve")
	}
	top := func(v []float64) float64 {
		m := -1e9
		for _, x := range v {
			m = math.Max(m, x)
		}
		return m
	}
	loss := top(lin) - top(resp)
	reason := target(res, "big").Reason
	t.Logf("clipping costs %.2f dB of peak: %s", loss, reason)
	if !strings.Contains(reason, "costs "+strconv.FormatFloat(loss, 'f', 1, 64)+" dB of compressed peak") {
		t.Errorf("peak loss %.2f dB, the reason says otherwise: %s", loss, reason)
	}
	// The far sidelobes, 30 … 390 samples (0.75 … 9.75 µs) from the peak
	// on both sides, summed, re each response's own peak.
	far := func(v []float64) float64 {
		k0, sum := f.gate(r), 0.0
		for d := 30; d < 390; d++ {
			sum += math.Pow(10, v[k0+d]/10) + math.Pow(10, v[k0-d]/10)
		}
		return 10*math.Log10(sum) - top(v)
	}
	t.Logf("far sidelobes re peak: clipped %.2f dB, unclipped %.2f dB", far(resp), far(lin))
	if !(far(resp) > far(lin)) {
		t.Errorf("far sidelobes re peak: clipped %.2f dB, unclipped %.2f dB", far(resp), far(lin))
	}
	if clean := unclippedNone(t); clean {
		t.Error("an unclipped echo has an unclipped curve")
	}
}

// unclippedNone reports whether a scene whose echo stays under full
// scale still draws an unclipped curve.
func unclippedNone(t *testing.T) bool {
	doc := lfmScene(`{"kind":"none"}`, "", pointJSON("a", 6000, rcsFor(40, 6000)))
	f := mustFloors(t, mustEvaluate(t, mustDecode(t, withFrontEnd(doc, `{"adc_bits":16,"adc_full_scale_db":58}`))), "a", "")
	return f.curve(FloorUnclipped) != nil
}

// TestFloorsImage: TestIQImageMasks's scene (0.1 dB and 1° of quadrature
// error, image rejection 39.6 dB by the standard formula; Barker 13 train,
// tanker at +8 Doppler bins, skiff 45 dB weaker at −8): the view of the
// tanker follows the skiff's row, where the tanker's image is the highest
// floor and the skiff's mark names it; with a DC offset added, the DC
// curve appears, flat in range away from the blanked gates.
func TestFloorsImage(t *testing.T) {
	lambda := C / 9.5e9
	rate := -lambda / 2 * 8 / (32 * 1e-4)
	doc := trainScene(`{"kind":"blackman_harris"}`, "none", movingJSON("tanker", 6000, rcsFor(70, 6000), rate), movingJSON("skiff", 6000, rcsFor(25, 6000), -rate))
	doc = strings.Replace(doc, `"waveform":{"kind":"lfm","pulse_width_s":1e-5,"bandwidth_hz":1e7}`, `"waveform":{"kind":"barker","length":13,"chip_s":1e-7}`, 1)
	res := mustEvaluate(t, mustDecode(t, withFrontEnd(doc, `{"iq_gain_db":0.1,"iq_phase_deg":1,"dc_offset_db":10}`)))
	if sk := target(res, "skiff"); sk.Status != StatusMasked || !strings.Contains(sk.Reason, "tanker's I/Q image") {
		t.Fatalf("skiff %s: %s", sk.Status, sk.Reason)
	}
	f := mustFloors(t, res, "tanker", "")
	if f.RowTarget != "skiff" {
		t.Errorf("row through %q", f.RowTarget)
	}
	m := f.mark("skiff")
	if m.Floor != FloorImage || !m.Hidden {
		t.Errorf("skiff's mark %+v", m)
	}
	k := f.gate(m.RangeM)
	img, resp := f.curve(FloorImage), f.curve(FloorResponse)
	t.Logf("at the skiff: image %.1f dB, tanker's response %.1f dB, skiff %.1f dB", img[k], resp[k], m.PeakDB)
	if !(img[k] > resp[k] && img[k] > m.PeakDB) {
		t.Errorf("image %.1f dB, response %.1f dB, skiff %.1f dB", img[k], resp[k], m.PeakDB)
	}
	// The image re the tanker's peak on its own row: −39.6 dB (the image
	// rejection), within 0.1 dB: a real code's conjugate compresses alike.
	own := mustFloors(t, res, "tanker", "tanker")
	if d := img[k] - own.PeakDB; math.Abs(d+39.6) > 0.1 {
		t.Errorf("image %.2f dB re the tanker's peak, want −39.6", d)
	}
	if f.curve(FloorDC) == nil {
		t.Error("no DC curve")
	}
}

// TestDistributedSkirtMatchesPoint: an extended target one range sample
// wide and a point target on that sample have the same response and the
// same phase-noise skirt, re their peaks (the distributed skirt goes
// through the kernels of its pulse, the point's through its echo; both
// split the skirt alike, docs/detection.md §12), within 0.01 dB at every
// gate within 60 dB of the skirt's peak. The point's is checked against
// NumPy in TestFloorsGolden.
func TestDistributedSkirtMatchesPoint(t *testing.T) {
	step := C / (2 * 4e7)
	r0 := 3000 + 800*step
	fe := `{"phase_noise_offsets_hz":[1e4,1e5,1e6],"phase_noise_dbc_hz":[-90,-110,-125]}`
	point := withFrontEnd(lfmScene(`{"kind":"none"}`, "", pointJSON("t", r0, 40)), fe)
	ext := withFrontEnd(lfmScene(`{"kind":"none"}`, "", `{"id":"t","kind":"extended","range_start_m":`+ftoa(r0-0.1)+`,"range_stop_m":`+ftoa(r0+0.1)+`,"rcs_dbsm_per_m":45}`), fe)
	fp := mustFloors(t, mustEvaluate(t, mustDecode(t, point)), "t", "")
	fx := mustFloors(t, mustEvaluate(t, mustDecode(t, ext)), "t", "")
	for _, id := range []string{FloorResponse, FloorSkirt} {
		p, x := fp.curve(id), fx.curve(id)
		if p == nil || x == nil {
			t.Fatalf("%s: point %v, extended %v", id, p != nil, x != nil)
		}
	}
	top := func(v []float64) float64 {
		m := -1e9
		for _, x := range v {
			m = math.Max(m, x)
		}
		return m
	}
	pr, xr := top(fp.curve(FloorResponse)), top(fx.curve(FloorResponse))
	ps, xs := fp.curve(FloorSkirt), fx.curve(FloorSkirt)
	worst, at := 0.0, 0
	for k := range ps {
		if ps[k] < top(ps)-60 {
			continue
		}
		if e := math.Abs((ps[k] - pr) - (xs[k] - xr)); e > worst {
			worst, at = e, k
		}
	}
	t.Logf("skirt re response peak: worst difference %.4f dB at gate %d (skirt peak %.1f dB re peak)", worst, at, top(ps)-pr)
	if worst > 0.01 {
		t.Errorf("extended and point skirts differ by %.4f dB at gate %d", worst, at)
	}
}
