package main

import (
	"bytes"
	"context"
	"encoding/json"
	"fmt"
	"math"
	"math/rand/v2"
	"regexp"
	"strings"
	"testing"

	"github.com/pulsewright/pulsewright/scenarios"
	"github.com/pulsewright/pulsewright/server"
)

// randomScenarioDoc returns a random scenario document: every waveform
// kind, window and filter, at 1 to 8 samples per 1/B, with a few
// targets, some closing fast, some inside the blind range.
func randomScenarioDoc(r *rand.Rand) string {
	u := func(a, b float64) float64 { return a + (b-a)*r.Float64() }
	pick := func(v ...string) string { return v[r.IntN(len(v))] }
	chip := u(5e-8, 2e-6)
	var wave string
	isCode := true
	switch k := pick("rect", "lfm", "nlfm", "barker", "mps", "mls", "frank", "p1", "p2", "p3", "p4", "zadoff_chu", "costas", "phase_code"); k {
	case "rect":
		isCode = false
		wave = fmt.Sprintf(`{"kind":"rect","pulse_width_s":%g}`, u(1e-7, 2e-5))
	case "lfm":
		isCode = false
		tau := u(1e-6, 3e-5)
		wave = fmt.Sprintf(`{"kind":"lfm","pulse_width_s":%g,"bandwidth_hz":%g,"sweep":%q}`, tau, u(1, 200)/tau, pick("up", "down"))
	case "nlfm":
		isCode = false
		tau := u(1e-6, 3e-5)
		wave = fmt.Sprintf(`{"kind":"nlfm","pulse_width_s":%g,"bandwidth_hz":%g,"design_sidelobe_db":%g}`, tau, u(1, 300)/tau, u(-70, -15))
	case "barker":
		wave = fmt.Sprintf(`{"kind":"barker","length":%d,"chip_s":%g}`, []int{2, 3, 4, 5, 7, 11, 13}[r.IntN(7)], chip)
	case "mps", "p3", "p4":
		wave = fmt.Sprintf(`{"kind":%q,"length":%d,"chip_s":%g}`, k, 2+r.IntN(40), chip)
	case "mls":
		wave = fmt.Sprintf(`{"kind":"mls","degree":%d,"chip_s":%g}`, 2+r.IntN(7), chip)
	case "frank", "p1":
		m := 2 + r.IntN(6)
		wave = fmt.Sprintf(`{"kind":%q,"length":%d,"chip_s":%g}`, k, m*m, chip)
	case "p2":
		m := 2 * (1 + r.IntN(3))
		wave = fmt.Sprintf(`{"kind":"p2","length":%d,"chip_s":%g}`, m*m, chip)
	case "zadoff_chu":
		wave = fmt.Sprintf(`{"kind":"zadoff_chu","length":31,"root":%d,"chip_s":%g}`, 1+r.IntN(30), chip)
	case "costas":
		isCode = false
		wave = fmt.Sprintf(`{"kind":"costas","length":%d,"chip_s":%g}`, []int{2, 4, 6, 10, 12}[r.IntN(5)], chip)
	case "phase_code":
		if r.IntN(2) == 0 {
			wave = fmt.Sprintf(`{"kind":"phase_code","binary":%q,"chip_s":%g}`, pick("+", "++", "+++", "++-", "+-+--", "++++"), chip)
		} else {
			wave = fmt.Sprintf(`{"kind":"phase_code","phases_deg":[0,90,%g,180],"chip_s":%g}`, u(0, 360), chip)
		}
	}
	filter := "matched"
	if isCode && r.IntN(2) == 0 {
		filter = pick("least_squares", "minimax")
	}
	window := pick("none", "hann", "hamming", "blackman", "blackman_harris", "taylor", "chebyshev", "kaiser", "gaussian")
	spb := []float64{1, 1.5, 2, 2.5, 3, 4, 5, 8}[r.IntN(8)]
	var targets []string
	for i := range r.IntN(4) {
		targets = append(targets, fmt.Sprintf(`{"id":"t%d","kind":"point","range_m":%g,"rcs_dbsm":%g,"range_rate_mps":%g}`, i, u(0, 30000), u(-20, 40), u(-3000, 3000)))
	}
	return fmt.Sprintf(`{"version":2,"name":"random","radar":{"sample_rate_hz":SPB,"pri_s":3e-4,"window_start_m":%g,"window_stop_m":30000},
		"waveform":%s,"receiver":{"filter":%q,"filter_length_factor":%d,"window":{"kind":%q}},"targets":[%s]}`,
		math.Round(u(0, 5000)), wave, filter, 1+r.IntN(3), window, strings.Join(targets, ",")) + "\x00" + fmt.Sprint(spb)
}

var scriptBlock = regexp.MustCompile(`(?s)<script.*?</script>`)

var nonFinite = regexp.MustCompile(`(?i)\bnan\b|\binf\b|[+-]inf|[^0-9.]-0(\.0*)?([^.0-9eE]|$)|\(\+?Inf`)

// TestEveryEncoderTotal feeds random valid scenarios through the
// evaluation and every encoder (JSON, text, CSV row, HTML report): each
// must succeed, and none may print NaN, ±Inf or −0 (issue 12: a rect
// pulse made eval exit 1 on "json: unsupported value: -Inf").
func TestEveryEncoderTotal(t *testing.T) {
	r := rand.New(rand.NewPCG(12, 4))
	trials := 80
	if testing.Short() {
		trials = 20
	}
	accepted := 0
	for trial := range trials {
		raw := randomScenarioDoc(r)
		doc, spbText, _ := strings.Cut(raw, "\x00")
		var spb float64
		fmt.Sscan(spbText, &spb)
		// The rate: spb samples per 1/B of the waveform, once B is known.
		probe, err := scenarios.Decode([]byte(strings.Replace(doc, `"sample_rate_hz":SPB,`, "", 1)))
		if err != nil {
			continue // an invalid combination (e.g. a window on a two-sample pulse): check refuses it too
		}
		doc = strings.Replace(doc, "SPB", fmt.Sprintf("%.6g", spb*probe.Waveform.Bandwidth()), 1)
		s, err := scenarios.Decode([]byte(doc))
		if err != nil {
			continue
		}
		accepted++
		res, err := scenarios.Evaluate(context.Background(), s)
		if err != nil {
			t.Fatalf("trial %d: check accepts but eval fails: %v\n%s", trial, err, doc)
		}
		var out bytes.Buffer
		if err := json.NewEncoder(&out).Encode(res.Report); err != nil {
			t.Fatalf("trial %d: JSON: %v\n%s", trial, err, doc)
		}
		if err := writeReportText(&out, &res.Report); err != nil {
			t.Fatalf("trial %d: text: %v", trial, err)
		}
		g := &scenarios.Grid{Base: s}
		var ids []string
		for _, tg := range s.Targets {
			ids = append(ids, tg.ID)
		}
		sw := newSweepWriter(&out, g, ids)
		if err := sw.row(scenarios.Point{Report: &res.Report}); err != nil {
			t.Fatalf("trial %d: CSV: %v", trial, err)
		}
		sw.c.Flush()
		var page bytes.Buffer
		if err := server.WriteReportPage(&page, s, res, "/#s=x"); err != nil {
			t.Fatalf("trial %d: HTML: %v", trial, err)
		}
		// The page's scripts hold the charting library (whose code says NaN)
		// and the chart options, which encoding/json would have refused to
		// encode with a NaN or ±Inf: the text around them is checked here.
		out.WriteString(scriptBlock.ReplaceAllString(page.String(), ""))
		text := out.String()
		if loc := nonFinite.FindStringIndex(text); loc != nil {
			lo, hi := max(loc[0]-80, 0), min(loc[1]+80, len(text))
			t.Fatalf("trial %d: output holds %q: …%s…\n%s", trial, text[loc[0]:loc[1]], text[lo:hi], doc)
		}
		w := res.Report.Waveform
		for _, v := range []float64{w.Mainlobe3dBM, w.MismatchLossDB, w.StraddleLossMaxDB, w.StraddleLossMeanDB} {
			if math.IsNaN(v) || math.IsInf(v, 0) {
				t.Fatalf("trial %d: waveform figure %v\n%s", trial, v, doc)
			}
		}
	}
	if accepted < trials*3/4 {
		t.Errorf("only %d of %d random scenarios were valid: the generator tests little", accepted, trials)
	}
}
