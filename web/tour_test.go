package web_test

import (
	"context"
	"fmt"
	"regexp"
	"strings"
	"testing"
	"time"

	"github.com/chromedp/chromedp"
)

// jsBarCut lists the top bar's controls that do not show whole: past the
// window's right edge, or their text wider than their box.
const jsBarCut = `(() => {
	const out = [];
	const bar = document.querySelector('.bar');
	if (bar.scrollWidth > bar.clientWidth + 1) out.push('the bar is ' + bar.scrollWidth + ' px wide in ' + bar.clientWidth);
	for (const el of bar.querySelectorAll('button, select, .conn, .brand')) {
		if (el.offsetParent === null) continue;
		const r = el.getBoundingClientRect();
		const name = (el.id || el.className || el.tagName) + ' "' + el.textContent.trim().slice(0, 30) + '"';
		if (r.right > innerWidth + 0.5) out.push(name + ' ends at ' + Math.round(r.right) + ' px, past ' + innerWidth);
		else if (el.tagName !== 'SELECT' && el.scrollWidth > el.clientWidth + 1) out.push(name + ' cut');
	}
	return out; })()`

// jsFormCut lists the target form's menus whose shown option does not fit
// its box.
const jsFormCut = `(() => {
	const out = [];
	const ctx = document.createElement('canvas').getContext('2d');
	for (const el of document.querySelectorAll('#ed-targets .detail select')) {
		const cs = getComputedStyle(el);
		ctx.font = cs.fontWeight + ' ' + cs.fontSize + ' ' + cs.fontFamily;
		const text = el.options[el.selectedIndex].text;
		// The text, the padding and the drop-down arrow (about 20 px).
		const need = ctx.measureText(text).width + parseFloat(cs.paddingLeft) + parseFloat(cs.paddingRight) + 20;
		if (need > el.clientWidth + 0.5) out.push('"' + text + '" (' + Math.ceil(need) + ' px in ' + el.clientWidth + ')');
	}
	return out; })()`

// jsProfileLabels lists what the profile plot lacks of its labels.
const jsProfileLabels = `(() => {
	const out = [];
	const f = window.__pw.frame();
	const o = window.__pw.plots.charts.profile.getOption();
	const th = o.series.find((s) => s.id === 'threshold');
	if (!th || !th.endLabel || !th.endLabel.show || th.endLabel.formatter !== 'threshold') out.push('the threshold is not named');
	if (![o.legend].flat().some((l) => l && l.show !== false)) out.push('no legend');
	const names = ((o.series.find((s) => s.id === 'markers') || {}).data || []).map((d) => d.name).join();
	if (names !== f.report.targets.map((t) => t.id).join()) out.push('markers named ' + names + ', targets ' + f.report.targets.map((t) => t.id).join());
	const blind = o.series.find((s) => s.id === 'blind');
	const shaded = !!blind && !!blind.markArea && blind.markArea.data.length > 0;
	if ((f.report.waveform.blind_range_m > (window.__pw.store.scenario.radar.window_start_m ?? 0)) !== shaded) out.push('blind range ' + f.report.waveform.blind_range_m + ' m, window from ' + window.__pw.store.scenario.radar.window_start_m + ' m, shaded: ' + shaded);
	return out; })()`

// identifiers are the scenario format's names that a customer should not
// read on the page: detector, filter, status and field identifiers.
var identifiers = regexp.MustCompile(`\b(ca_cfar|os_cfar|go_cfar|so_cfar|cmld_cfar|least_squares|too_weak|out_of_window|below_noise|below_horizon|phase_code|rcs_dbsm|range_m|pd_required)\b`)

// shouting finds units and names spoilt by an upper-case heading style:
// "1274.1 KM", "3 CPIS", "M/S", "DBSM".
var shouting = regexp.MustCompile(`\d\s?(KM|NMI|M/S|KT|DBSM|DBZ|MHZ|KHZ|GHZ|ΜS|MS)\b|\bCPIS\b`)

// TestCustomerTour opens every demo at 1280×720 and 1600×1000 as a
// customer meeting would, selects each target with a real click, and
// checks what such a meeting sees: the top bar whole (the connection state
// included), the target form's menus whole, no format identifiers in the
// text on screen (the demos' notes included), and no unit turned to
// capitals by a heading style.
func TestCustomerTour(t *testing.T) {
	ctx := mustBrowserFor(t, 300*time.Second) // seven demos at two sizes, each target clicked
	openPage(t, ctx, mustServer(t))
	demos := eval[[]string](t, ctx, `fetch('/api/v1/demos').then((r) => r.json()).then((d) => d.map((x) => x.name))`)
	for _, size := range [][2]int64{{1280, 720}, {1600, 1000}} {
		do(t, ctx, chromedp.EmulateViewport(size[0], size[1]))
		waitFor(t, ctx, fmt.Sprintf("the layout at %d px", size[0]), fmt.Sprintf(`innerWidth === %d && document.querySelector('.foot').getBoundingClientRect().right === %d`, size[0], size[0]))
		for _, d := range demos {
			where := fmt.Sprintf("%dx%d %s", size[0], size[1], d)
			loadDemo(t, ctx, d)
			waitFor(t, ctx, d+" settled", fresh+` && document.querySelectorAll('.tcard[data-target]').length === window.__pw.frame().report.targets.length`)
			for _, c := range eval[[]string](t, ctx, jsBarCut) {
				t.Errorf("%s: top bar: %s", where, c)
			}
			// innerText is the text as drawn, after the style's upper case.
			text := eval[string](t, ctx, `document.body.innerText`)
			for _, id := range identifiers.FindAllString(text, -1) {
				t.Errorf("%s: the page shows the identifier %q", where, id)
			}
			for _, s := range shouting.FindAllString(text, -1) {
				t.Errorf("%s: the page shows %q in capitals", where, s)
			}
			// The profile tells the story by itself: a legend, the
			// threshold named, every marker named, the blind range shaded
			// where it reaches into the receive window.
			for _, p := range eval[[]string](t, ctx, jsProfileLabels) {
				t.Errorf("%s: profile: %s", where, p)
			}
			n := eval[int](t, ctx, `document.querySelectorAll('#ed-targets tr[data-row]').length`)
			for i := range n {
				sel := fmt.Sprintf(`tr[data-row="%d"] td:first-child`, i)
				// The table is rebuilt after a frame's paint; a click on a
				// row replaced under it is tried again.
				waitFor(t, ctx, fmt.Sprintf("row %d", i), fmt.Sprintf(`!!document.querySelector(%q)`, sel))
				do(t, ctx, chromedp.Click(chromedp.CSS(sel)))
				waitFor(t, ctx, fmt.Sprintf("row %d's form", i), fmt.Sprintf(`window.__pw.editor.selected === %d && document.querySelector('.detail-head') && document.querySelector('.detail-head').textContent.includes(window.__pw.store.scenario.targets[%d].id)`, i, i))
				for _, c := range eval[[]string](t, ctx, jsFormCut) {
					t.Errorf("%s: target %d's form: menu cut: %s", where, i, c)
				}
			}
			if size[0] == 1280 {
				shot(t, ctx, fmt.Sprintf("%dx%d-%s", size[0], size[1], d))
			}
		}
	}
}

// TestScheduleFollowsUnits: the PRF schedule's verdicts in the figures
// panel and its summary over the blind zones follow the units chosen with
// the units control (they read km and m/s whatever the choice).
func TestScheduleFollowsUnits(t *testing.T) {
	ctx := mustBrowser(t)
	openPage(t, ctx, mustServer(t))
	loadDemo(t, ctx, "hill-clutter-doppler")
	waitFor(t, ctx, "the verdicts", fresh+` && /jet detected, 2 of 3 CPIs · unfolds to 7\.65 km, -157\.8 m\/s/.test(document.querySelector('.sched-story').textContent)`)
	do(t, ctx, chromedp.Click(chromedp.CSS(`#units-pick summary`)))
	pickDown(t, ctx, "range", 2)                         // m, km, nmi
	pickDown(t, ctx, "speed", 2)                         // m/s, km/h, kt
	do(t, ctx, chromedp.Click(chromedp.CSS(`#figures`))) // closes the control
	waitFor(t, ctx, "the table in nmi and kt", `document.querySelector('table.targets thead').textContent.includes('(nmi)')`)
	story := eval[string](t, ctx, `document.querySelector('.sched-story').textContent`)
	// The jet unfolds to 7646.8 m = 4.13 nmi and −157.786 m/s = −306.7 kt
	// (1 nmi = 1852 m, 1 kt = 1852/3600 m/s); the schedule is unambiguous
	// to 1274.1 km = 688.0 nmi.
	for _, want := range []string{"unambiguous to 688.0 nmi", "unfolds to 4.13 nmi, -306.7 kt"} {
		if !strings.Contains(story, want) {
			t.Errorf("the schedule's verdicts in nmi and kt lack %q: %q", want, story)
		}
	}
	for _, bad := range []string{" km", "m/s"} {
		if strings.Contains(story, bad) {
			t.Errorf("the schedule's verdicts in nmi and kt still read %q: %q", bad, story)
		}
	}
	if sum := eval[string](t, ctx, `document.querySelector('#sched-sum').textContent`); strings.Contains(sum, " km") || strings.Contains(sum, "m/s") {
		t.Errorf("the schedule's summary in nmi and kt reads %q", sum)
	}
	shot(t, ctx, "")
}

// jsNameClashes lists the marker names a chart (the profile, the map)
// draws over another target's marker (symbols half px across each side)
// or over a masking label, and the names not drawn, from the chart
// library's own elements.
const jsNameClashes = `((name, half) => {
	const chart = window.__pw.plots.charts[name];
	const model = chart.getModel();
	const box = (tx) => { const r = tx.getBoundingRect().clone(); r.applyTransform(tx.getComputedTransform()); return r; };
	const text = (el) => { const p = el && (el.getSymbolPath ? el.getSymbolPath() : el); const tx = p && p.getTextContent && p.getTextContent();
		return tx && !tx.ignore && !tx.invisible && tx.style && tx.style.text ? tx : null; };
	const meets = (a, b) => a.x < b.x + b.width && b.x < a.x + a.width && a.y < b.y + b.height && b.y < a.y + a.height;
	const markers = model.getSeries().find((s) => s.id === 'markers').getData();
	const masking = model.getSeries().find((s) => s.id === 'masking');
	const marks = [], names = [], plates = [];
	markers.each((i) => {
		const el = markers.getItemGraphicEl(i);
		if (!el) return;
		marks.push({ id: markers.getName(i), r: { x: el.x - half, y: el.y - half, width: 2 * half, height: 2 * half } });
		const tx = text(el);
		if (tx) names.push({ id: markers.getName(i), r: box(tx) });
		else names.push({ id: markers.getName(i), hidden: true });
	});
	if (masking) { const md = masking.getData(); md.each((i) => { const tx = text(md.getItemGraphicEl(i)); if (tx) plates.push({ text: tx.style.text, r: box(tx) }); }); }
	const out = [];
	for (const n of names) {
		if (n.hidden) { out.push(n.id + ': name not drawn'); continue; }
		for (const m of marks) if (m.id !== n.id && meets(n.r, m.r)) out.push(n.id + ': name over ' + m.id + "'s marker");
		for (const p of plates) if (meets(n.r, p.r)) out.push(n.id + ': name under the label "' + p.text + '"');
	}
	for (const p of plates) for (const m of marks) if (meets(p.r, m.r)) out.push('the label "' + p.text + '" under ' + m.id + "'s marker");
	return out; })`

// jsFastNameClashes is jsNameClashes for the names the fast layer of
// chart name drew last (fastlayer.js: its labels, with the boxes their
// placement used, and its markers): a chart resting behind its fast
// layer shows those.
const jsFastNameClashes = `((name, half) => {
	const fast = window.__pw.plots.fasts[name];
	const meets = (a, b) => a.x < b.x + b.width && b.x < a.x + a.width && a.y < b.y + b.height && b.y < a.y + a.height;
	const sq = (m) => ({ x: m.x - half, y: m.y - half, width: 2 * half, height: 2 * half });
	const ink = (l) => l.ink || { x: l.box.x, y: l.box.y, width: l.box.w, height: l.box.h };
	const names = fast.labels.filter((l) => l.of), plates = fast.labels.filter((l) => l.shift);
	const out = [];
	if (fast.marks.length === 0) out.push('no markers drawn');
	for (const m of fast.marks) if (!names.some((n) => n.of === m)) out.push('a marker at ' + Math.round(m.x) + ',' + Math.round(m.y) + ' px without its name');
	for (const n of names) {
		for (const m of fast.marks) if (m !== n.of && meets(ink(n), sq(m))) out.push(n.text + ': name over the marker at ' + Math.round(m.x) + ',' + Math.round(m.y) + ' px');
		for (const p of plates) if (meets(ink(n), ink(p))) out.push(n.text + ': name under the label "' + p.text + '"');
	}
	for (const p of plates) for (const m of fast.marks) if (meets(ink(p), sq(m))) out.push('the label "' + p.text + '" under the marker at ' + Math.round(m.x) + ',' + Math.round(m.y) + ' px');
	return out; })`

// nudgeToRest nudges the level of target i (a weak one: the axes stay)
// down 1 dB, as the wheel does, and waits until chart name rests behind
// its fast layer.
func nudgeToRest(t *testing.T, ctx context.Context, name string, i int) {
	t.Helper()
	eval[bool](t, ctx, fmt.Sprintf(`(window.__pw.editor.nudge(%d, -1), true)`, i))
	waitFor(t, ctx, name+" at rest behind its fast layer", fresh+` && window.__pw.plots.behind.has('`+name+`') && window.__pw.plots.fasts.`+name+`.active`)
}

// TestMarkerNamesClear: on the demos whose targets sit close together,
// each marker's name on the profile is drawn, and clear of the other
// markers and of the masking label; the masking label is clear of the
// markers. On the pulse train's range–Doppler map, no name covers
// another marker (the ridge's covered the jet's). The same holds for the
// names the fast layers draw while the profile and the map rest behind
// them after an edit.
func TestMarkerNamesClear(t *testing.T) {
	ctx := mustBrowser(t)
	openPage(t, ctx, mustServer(t))
	weak := map[string]int{"squall-line": 0, "rocky-coast": 1, "harbour-skiff": 1} // light-aircraft, buoy, skiff
	for _, d := range []string{"squall-line", "rocky-coast", "harbour-skiff"} {
		loadDemo(t, ctx, d)
		waitFor(t, ctx, d+" settled", fresh+` && window.__pw.plots.charts.profile.getOption().series.find((s) => s.id === 'markers').data.length === window.__pw.frame().report.targets.length`)
		for _, c := range eval[[]string](t, ctx, jsNameClashes+`('profile', 5.5)`) {
			t.Errorf("%s: %s", d, c)
		}
		shot(t, ctx, d)
		// After an edit the profile rests behind its fast layer, which
		// must place the names as the chart does.
		nudgeToRest(t, ctx, "profile", weak[d])
		for _, c := range eval[[]string](t, ctx, jsFastNameClashes+`('profile', 5.5)`) {
			t.Errorf("%s after a nudge (the fast layer): %s", d, c)
		}
		shot(t, ctx, d+"-nudged")
	}
	loadDemo(t, ctx, "hill-clutter-doppler")
	waitFor(t, ctx, "the map settled", fresh+` && window.__pw.plots.fasts.rdmap.ready() && window.__pw.plots.charts.rdmap.getOption().series.find((s) => s.id === 'markers').data.length === window.__pw.frame().report.targets.length`)
	for _, c := range eval[[]string](t, ctx, jsNameClashes+`('rdmap', 6.5)`) {
		t.Errorf("hill-clutter-doppler map: %s", c)
	}
	shot(t, ctx, "hill-clutter-doppler")
	nudgeToRest(t, ctx, "rdmap", 2) // the jet
	for _, c := range eval[[]string](t, ctx, jsFastNameClashes+`('rdmap', 6.5)`) {
		t.Errorf("hill-clutter-doppler map after a nudge (the heat layer): %s", c)
	}
	shot(t, ctx, "hill-clutter-doppler-nudged")
	// The schedule's CPI maps, opened by a real click.
	do(t, ctx, chromedp.Click(chromedp.CSS(`[data-show="cpimaps"]`)))
	waitFor(t, ctx, "the CPI maps", `(() => { const c = window.__pw.plots.charts.cpimap1; const o = c && c.getOption(); return !!o && o.series.length > 0 && !document.querySelector('.cpi-map[data-cpi="1"]').hidden; })()`)
	for _, c := range eval[[]string](t, ctx, jsNameClashes+`('cpimap1', 6.5)`) {
		t.Errorf("hill-clutter-doppler CPI 1 map: %s", c)
	}
	shot(t, ctx, "hill-clutter-doppler-cpimaps")
}
