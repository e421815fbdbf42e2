package server

import (
	"bytes"
	"context"
	"html/template"
	"os"
	"path/filepath"
	"regexp"
	"strings"
	"testing"

	"github.com/pulsewright/pulsewright/scenarios"
)

func TestInlineECharts(t *testing.T) {
	js, err := inlineECharts()
	if err != nil {
		t.Fatal(err)
	}
	if strings.Contains(js, "export{") || !strings.Contains(js, "const echarts={") {
		t.Fatal("export clause not rewritten")
	}
	for _, name := range []string{"init:", "getInstanceByDom:", "version:"} {
		if !strings.Contains(js[strings.LastIndex(js, "const echarts={"):], name) {
			t.Errorf("namespace lacks %s", name)
		}
	}
}

func TestMinMaxPairsKeepsPeaks(t *testing.T) {
	y := make([]float64, 10000)
	y[4321], y[7777] = 50, -30
	got := minMaxPairs(100, 0.5, y, 100, -20)
	if len(got) > 200 {
		t.Fatalf("%d points, want ≤ 200", len(got))
	}
	var peak, low [2]float64
	for i, p := range got {
		if i > 0 && p[0] <= got[i-1][0] {
			t.Fatalf("x not increasing at %d: %v after %v", i, p, got[i-1])
		}
		if p[1] > peak[1] {
			peak = p
		}
		if p[1] < low[1] {
			low = p
		}
	}
	if peak != [2]float64{100 + 4321*0.5, 50} {
		t.Errorf("peak %v, want (2260.5, 50)", peak)
	}
	if low != [2]float64{100 + 7777*0.5, -20} {
		t.Errorf("low %v, want the floor −20 at 3988.5", low)
	}
}

func evalDemo(t *testing.T, name string) (*scenarios.Scenario, *scenarios.Result) {
	t.Helper()
	d, err := scenarios.LoadDemo(name)
	if err != nil {
		t.Fatal(err)
	}
	res, err := scenarios.Evaluate(context.Background(), d.Scenario)
	if err != nil {
		t.Fatal(err)
	}
	return d.Scenario, res
}

// TestReportPageSelfContained checks the HTML itself: no element loads
// anything (src, href to a stylesheet, @import, url()).
func TestReportPageSelfContained(t *testing.T) {
	s, res := evalDemo(t, "harbour-skiff")
	var b bytes.Buffer
	if err := WriteReportPage(&b, s, res, "http://127.0.0.1:8750/#s=abc"); err != nil {
		t.Fatal(err)
	}
	page := b.String()
	// ECharts itself mentions url( and <img in its code; look outside it.
	outside := page[:strings.Index(page, `<script type="module">`)]
	for _, re := range []string{`(?i)<script[^>]+src=`, `(?i)<link[^>]+href=`, `(?i)@import`, `(?i)url\(`, `(?i)<img`, `(?i)<iframe`} {
		if regexp.MustCompile(re).MatchString(outside) {
			t.Errorf("page matches %s", re)
		}
	}
	for _, want := range []string{"skiff", "masked by tanker", "Caution.", "#s=abc", "PSLR", "Taylor window", `<th class="num">Pd</th>`, "(alone "} {
		if !strings.Contains(page, want) {
			t.Errorf("page lacks %q", want)
		}
	}
}

// TestReportPageInBrowser opens the report in headless Chromium: both
// charts draw (options read back, canvas painted), the profile keeps
// about 4000 points, there is a marker per target, and the page makes
// no request but for its own file.
func TestReportPageInBrowser(t *testing.T) {
	ctx, log := browser(t)
	s, res := evalDemo(t, "harbour-skiff")
	file := filepath.Join(t.TempDir(), "report.html")
	f, err := os.Create(file)
	if err != nil {
		t.Fatal(err)
	}
	l, _ := scenarios.Link(s)
	if err := WriteReportPage(f, s, res, "http://127.0.0.1:8750"+l); err != nil {
		t.Fatal(err)
	}
	f.Close()
	st := openPage(t, ctx, file, "report.png", "profile", "response")
	prof := st["profile"]
	t.Logf("profile %+v, response %+v", prof, st["response"])
	if len(prof.Series) != 4 || prof.Series[3] != len(s.Targets) {
		t.Errorf("profile series %v (%v); want 3 lines and %d markers", prof.Series, prof.Names, len(s.Targets))
	}
	// 734 window samples fit under the decimation limit: all are drawn.
	for i, n := range prof.Series[:3] {
		if want := min(len(res.Series.ProfileDB), 2*reportBuckets); n != want {
			t.Errorf("profile series %s has %d points, want %d", prof.Names[i], n, want)
		}
	}
	for id, c := range st {
		if !c.Painted || c.CanvasW < 500 {
			t.Errorf("chart %s: canvas %d px wide, painted %v", id, c.CanvasW, c.Painted)
		}
	}
	log.check(t)
}

// TestSweepPageInBrowser draws the Taylor sweep of demo:harbour-skiff: one
// margin line per target with a point per swept level, and the waveform
// figures; no request leaves the page.
func TestSweepPageInBrowser(t *testing.T) {
	ctx, log := browser(t)
	d, err := scenarios.LoadDemo("harbour-skiff")
	if err != nil {
		t.Fatal(err)
	}
	kind, _ := scenarios.ParseAxis("receiver.window.kind=taylor")
	sll, _ := scenarios.ParseAxis("receiver.window.sidelobe_db=-20:-45:-5")
	g := &scenarios.Grid{Base: d.Scenario, Axes: []scenarios.Axis{kind, sll}}
	var pts []scenarios.Point
	if err := g.Run(context.Background(), 2, func(p scenarios.Point) error { pts = append(pts, p); return nil }); err != nil {
		t.Fatal(err)
	}
	file := filepath.Join(t.TempDir(), "sweep.html")
	f, err := os.Create(file)
	if err != nil {
		t.Fatal(err)
	}
	if err := WriteSweepPage(f, d.Scenario, g, pts); err != nil {
		t.Fatal(err)
	}
	f.Close()
	st := openPage(t, ctx, file, "sweep.png", "margin", "figures")
	m := st["margin"]
	if strings.Join(m.Names, ",") != "tanker,skiff,pilot-boat" {
		t.Errorf("margin series %v", m.Names)
	}
	for i, n := range m.Series {
		if n != 6 {
			t.Errorf("series %s has %d points, want 6", m.Names[i], n)
		}
	}
	for id, c := range st {
		if !c.Painted {
			t.Errorf("chart %s not painted", id)
		}
	}
	log.check(t)
}

// TestReportPageNotesAndEngine: the scenario's notes appear as their own
// section, paragraph by paragraph, escaped, with single line breaks kept;
// the footer names the engine that computed the report.
func TestReportPageNotesAndEngine(t *testing.T) {
	s, res := evalDemo(t, "harbour-skiff")
	s.Notes = "Measured at the pier on a calm day.\nSecond line, same paragraph.\n\n<b>Not bold</b> & friends."
	var b bytes.Buffer
	if err := WriteReportPage(&b, s, res, "http://127.0.0.1:8750/#s=abc"); err != nil {
		t.Fatal(err)
	}
	page := b.String()
	for _, want := range []string{
		"<h2>Notes</h2>",
		"<p>Measured at the pier on a calm day.\nSecond line, same paragraph.</p>",
		"<p>&lt;b&gt;Not bold&lt;/b&gt; &amp; friends.</p>",
		`<span class="engine">` + template.HTMLEscapeString(scenarios.RunningEngine().String()) + "</span>",
	} {
		if !strings.Contains(page, want) {
			t.Errorf("page lacks %q", want)
		}
	}
	s.Notes = ""
	b.Reset()
	if err := WriteReportPage(&b, s, res, "x"); err != nil {
		t.Fatal(err)
	}
	if strings.Contains(b.String(), "<h2>Notes</h2>") {
		t.Error("a scenario without notes gets a Notes section")
	}
}
