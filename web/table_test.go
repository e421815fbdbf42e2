package web_test

import (
	"fmt"
	"strings"
	"testing"
	"time"

	"github.com/chromedp/chromedp"
	"github.com/chromedp/chromedp/kb"
)

// jsCut lists the target table's cells whose text does not fit: inputs
// whose text is wider than the box, and kind menus whose shown option is.
const jsCut = `(() => {
	const out = [];
	const ctx = document.createElement('canvas').getContext('2d');
	for (const el of document.querySelectorAll('#ed-targets table.targets input, #ed-targets table.targets select')) {
		const cs = getComputedStyle(el);
		const pad = parseFloat(cs.paddingLeft) + parseFloat(cs.paddingRight);
		const text = el.tagName === 'SELECT' ? el.options[el.selectedIndex].text : el.value;
		ctx.font = cs.fontWeight + ' ' + cs.fontSize + ' ' + cs.fontFamily;
		const need = ctx.measureText(text).width + pad;
		if (need > el.clientWidth + 0.5 || el.scrollWidth > el.clientWidth) out.push(text + ' (' + Math.ceil(need) + ' px in ' + el.clientWidth + ')');
	}
	return out; })()`

// TestTargetTableShowsWholeValues: on every demo and at two window sizes,
// the target table shows every id and number whole, and its headers give
// units that fit each target kind.
func TestTargetTableShowsWholeValues(t *testing.T) {
	ctx := mustBrowserFor(t, 240*time.Second) // every demo at two sizes: 60 s ran out at a load of 25
	openPage(t, ctx, mustServer(t))
	demos := eval[[]string](t, ctx, `fetch('/api/v1/demos').then((r) => r.json()).then((d) => d.map((x) => x.name))`)
	for _, size := range [][2]int64{{1280, 720}, {1600, 1000}} {
		do(t, ctx, chromedp.EmulateViewport(size[0], size[1]))
		for _, d := range demos {
			loadDemo(t, ctx, d)
			if cut := eval[[]string](t, ctx, jsCut); len(cut) > 0 {
				t.Errorf("%dx%d %s: cells cut: %s", size[0], size[1], d, strings.Join(cut, "; "))
			}
			head := eval[string](t, ctx, `[...document.querySelectorAll('#ed-targets table.targets th')].map((th) => th.textContent).join(' | ')`)
			for _, bad := range []string{"RANGE M", "LEVEL DB", "RATE M/S", "level dB", "range m"} {
				if strings.Contains(head, bad) {
					t.Errorf("%s: header %q still reads %q", d, head, bad)
				}
			}
			if !strings.Contains(head, "(m)") || !strings.Contains(head, "(m/s)") {
				t.Errorf("%s: header %q lacks the range or rate unit", d, head)
			}
			// Each row's level unit is that of its kind: in the header when
			// every target is of one kind, beside the value otherwise.
			// An extended target given by σ⁰ or γ shows dB (m²/m²).
			units := eval[[]string](t, ctx, `(() => { const ks = window.__pw.store.scenario.targets.map((t) => t.kind === 'extended' && (t.sigma0_db !== undefined || t.gamma_db !== undefined) ? 'surface' : t.kind);
				const unit = {point: 'dBsm', extended: 'dBsm/m', surface: 'dB', volume: 'dBZ'};
				const head = document.querySelector('#ed-targets table.targets th:nth-child(5)').textContent;
				return ks.map((k, i) => { const cell = document.querySelectorAll('#ed-targets tr[data-row] td:nth-child(5)')[i];
					const u = cell.querySelector('.cell-unit');
					return u ? u.textContent === unit[k] ? '' : 'row ' + i + ' shows ' + u.textContent + ' for a ' + k
						: head.includes('(' + unit[k] + ')') ? '' : 'row ' + i + ' (' + k + ') under header ' + head; }).filter(Boolean); })()`)
			for _, u := range units {
				t.Errorf("%s: %s", d, u)
			}
			shot(t, ctx, fmt.Sprintf("%dx%d-%s", size[0], size[1], d))
		}
	}
}

// TestEditorFollowsTargets: a duplicate id is flagged on the id, not on
// another field; the status dots follow the rows, not the ids; the form's
// heading follows a rename.
func TestEditorFollowsTargets(t *testing.T) {
	ctx := mustBrowser(t)
	openPage(t, ctx, mustServer(t))
	waitFor(t, ctx, "the skiff masked", jsTarget+`('skiff').status === 'masked'`)
	const id1 = `tr[data-row="1"] input[data-path="targets[1].id"]`
	do(t, ctx, chromedp.Click(chromedp.CSS(id1)))
	typeInto(t, ctx, id1, "tanker")
	waitFor(t, ctx, "the duplicate-id error", `document.querySelector('`+id1+`').getAttribute('aria-invalid') === 'true'`)
	if bad := eval[[]string](t, ctx, `[...document.querySelectorAll('#ed-targets [aria-invalid="true"]')].map((e) => e.dataset.path)`); len(bad) != 1 || bad[0] != "targets[1].id" {
		t.Errorf("fields outlined for a duplicate id: %v, want only targets[1].id", bad)
	}
	// The plots still show the last valid scene (skiff masked): row 1's dot
	// is the skiff's, not the tanker's.
	if cls := eval[string](t, ctx, `document.querySelector('tr[data-row="1"] .dot').className`); !strings.Contains(cls, "st-masked") {
		t.Errorf("row 1's dot is %q, want the skiff's masked status", cls)
	}
	shot(t, ctx, "duplicate")
	typeInto(t, ctx, id1, "skiff-2")
	waitFor(t, ctx, "the renamed frame", fresh+` && `+jsTarget+`('skiff-2')`)
	if head := eval[string](t, ctx, `document.querySelector('.detail-head').textContent`); !strings.Contains(head, "skiff-2") {
		t.Errorf("the form's heading %q does not follow the rename", head)
	}
	if cls := eval[string](t, ctx, `document.querySelector('tr[data-row="1"] .dot').className`); !strings.Contains(cls, "st-masked") {
		t.Errorf("row 1's dot after the rename is %q, want masked", cls)
	}
	shot(t, ctx, "renamed")
}

// TestLibraryKeysConfirmAndNames: Enter in "Save as" saves; a bad name is
// refused as typed (not URL-encoded); Delete asks first and can be undone.
func TestLibraryKeysConfirmAndNames(t *testing.T) {
	ctx := mustBrowser(t)
	openPage(t, ctx, mustServer(t))
	const saved = `fetch('/api/v1/scenarios').then((r) => r.json()).then((l) => (Array.isArray(l) ? l : l.scenarios || []).map((x) => x.name).join(','))`
	do(t, ctx, chromedp.Click(chromedp.CSS(`#btn-library`)))
	waitFor(t, ctx, "the library", `document.querySelector('#library').open`)
	typeInto(t, ctx, `#lib-name`, "by-enter")
	do(t, ctx, chromedp.KeyEvent(kb.Enter))
	waitFor(t, ctx, "saved by Enter", `document.querySelector('#lib-rows').textContent.includes('by-enter')`)
	if s := eval[string](t, ctx, saved); s != "by-enter" {
		t.Errorf("saved scenarios after Enter: %q, want by-enter", s)
	}
	if !eval[bool](t, ctx, `document.querySelector('#library').open`) {
		t.Error("Enter closed the library")
	}

	typeInto(t, ctx, `#lib-name`, "my scene/1")
	do(t, ctx, chromedp.Click(chromedp.CSS(`#lib-save`)))
	waitFor(t, ctx, "the name refused", `document.querySelector('#lib-msg').textContent !== ''`)
	msg := eval[string](t, ctx, `document.querySelector('#lib-msg').textContent`)
	if !strings.Contains(msg, "my scene/1") || strings.Contains(msg, "%2F") || strings.Contains(msg, "%20") {
		t.Errorf("bad-name message %q: want the name as typed", msg)
	}
	shot(t, ctx, "bad-name")

	do(t, ctx, chromedp.Click(chromedp.CSS(`#lib-rows tr td.acts button[data-lib="delete"]`)))
	waitFor(t, ctx, "the confirmation", `!!document.querySelector('#lib-rows [data-lib="confirm-delete"]')`)
	if s := eval[string](t, ctx, saved); s != "by-enter" {
		t.Errorf("one click on Delete deleted already (saved: %q)", s)
	}
	shot(t, ctx, "confirm")
	do(t, ctx, chromedp.Click(chromedp.CSS(`#lib-rows [data-lib="confirm-delete"]`)))
	waitFor(t, ctx, "deleted", `document.querySelector('#lib-rows').textContent.includes('Nothing saved yet') && !!document.querySelector('#lib-undo')`)
	do(t, ctx, chromedp.Click(chromedp.CSS(`#lib-undo`)))
	waitFor(t, ctx, "restored", `document.querySelector('#lib-rows').textContent.includes('by-enter')`)
	if s := eval[string](t, ctx, saved); s != "by-enter" {
		t.Errorf("after undo, saved scenarios %q, want by-enter", s)
	}
	shot(t, ctx, "undone")
}

// TestStatusMarksAgree: each target's mark on the profile and on its card
// and table row has the same colour and shape, on every demo; a target
// beyond the unambiguous range is marked where its folded echo appears.
func TestStatusMarksAgree(t *testing.T) {
	ctx := mustBrowser(t)
	openPage(t, ctx, mustServer(t))
	demos := eval[[]string](t, ctx, `fetch('/api/v1/demos').then((r) => r.json()).then((d) => d.map((x) => x.name))`)
	const jsCheck = `(() => {
		const rgb = (c) => { const d = document.createElement('div'); d.style.color = c; document.body.append(d); const v = getComputedStyle(d).color; d.remove(); return v; };
		const shape = (el) => { const s = getComputedStyle(el);
			if (s.clipPath.startsWith('polygon')) return 'triangle';
			if (s.transform !== 'none') return s.borderRadius.startsWith('50% 50% 50% 0') ? 'pin' : 'diamond';
			if (s.backgroundColor === 'rgba(0, 0, 0, 0)') return 'emptyCircle';
			if (s.borderRadius === '50%') return 'circle';
			return s.borderRadius === '0px' || s.borderRadius === '' ? 'rect' : 'roundRect'; };
		const colour = (el) => { const s = getComputedStyle(el); return s.backgroundColor === 'rgba(0, 0, 0, 0)' ? s.borderTopColor : s.backgroundColor; };
		const ms = window.__pw.plots.charts.profile.getOption().series.find((s) => s.id === 'markers').data;
		const out = [];
		ms.forEach((m, i) => {
			const card = document.querySelector('.tcard[data-target="' + CSS.escape(m.id) + '"] .dot');
			const row = document.querySelectorAll('#ed-targets tr[data-row] .dot')[i];
			for (const [where, el] of [['card', card], ['row', row]]) {
				if (!el) { out.push(m.id + ': no ' + where + ' mark'); continue; }
				if (shape(el) !== m.symbol) out.push(m.id + ' (' + m.status + '): ' + where + ' shape ' + shape(el) + ', plot ' + m.symbol);
				if (colour(el) !== rgb(m.itemStyle.color)) out.push(m.id + ' (' + m.status + '): ' + where + ' colour ' + colour(el) + ', plot ' + rgb(m.itemStyle.color));
			}
		});
		return out; })()`
	seen := map[string]bool{}
	for _, d := range demos {
		loadDemo(t, ctx, d)
		// The chart library draws the frame's markers after the page's
		// own fast layer: wait until the plot holds this demo's targets.
		waitFor(t, ctx, d+" markers on the profile", `(() => { const f = window.__pw.frame(); const s = window.__pw.plots.charts.profile.getOption().series.find((s) => s.id === 'markers');
			return !!s && s.data.map((m) => m.id).join() === f.report.targets.map((t) => t.id).join() &&
				document.querySelectorAll('.tcard[data-target]').length === f.report.targets.length; })()`)
		for _, p := range eval[[]string](t, ctx, jsCheck) {
			t.Errorf("%s: %s", d, p)
		}
		for _, s := range eval[[]string](t, ctx, `window.__pw.frame().report.targets.map((t) => t.status)`) {
			seen[s] = true
		}
		if d == "long-pulse-blind" {
			x := eval[float64](t, ctx, jsMarker+`('airliner-far').value[0]`)
			if x < 59600 || x > 60600 {
				t.Errorf("airliner-far (210 km, folding to about 60.1 km) is marked at %.0f m", x)
			}
			shot(t, ctx, d)
		}
	}
	t.Logf("statuses seen: %v", seen)
}

// jsLabelClash lists the x-axis labels of a chart that are drawn over or
// against one another, less than 4 px apart (from the renderer's own list
// of shown text).
const jsLabelClash = `((name) => {
	const c = window.__pw.plots.charts[name];
	const h = c.getHeight();
	const els = c.getZr().storage.getDisplayList(true);
	const rows = {};
	for (const e of els) {
		if ((e.type !== 'text' && e.type !== 'tspan') || e.ignore || e.invisible || !e.style || !/^[−-]?[\d,. ]+$/.test(String(e.style.text))) continue;
		const r = e.getBoundingRect().clone();
		r.applyTransform(e.getComputedTransform());
		if (r.y < h * 0.55) continue; // the x axis is at the bottom
		(rows[Math.round(r.y)] = rows[Math.round(r.y)] || []).push(r.plain ? r.plain() : {x: r.x, width: r.width, text: e.style.text});
		rows[Math.round(r.y)][rows[Math.round(r.y)].length - 1].text = e.style.text;
	}
	const out = [];
	for (const row of Object.values(rows)) {
		row.sort((a, b) => a.x - b.x);
		for (let i = 1; i < row.length; i++) if (row[i - 1].x + row[i - 1].width + 4 > row[i].x) out.push(row[i - 1].text + ' / ' + row[i].text);
	}
	return out; })`

// TestNarrowWindowLayout: at 1280×720 every plot tab shows whole and
// clear of the PNG button, and no axis labels run together.
func TestNarrowWindowLayout(t *testing.T) {
	ctx := mustBrowser(t)
	do(t, ctx, chromedp.EmulateViewport(1280, 720))
	openPage(t, ctx, mustServer(t))
	for _, d := range []string{"hill-clutter-doppler", "long-pulse-blind", "harbour-skiff"} {
		loadDemo(t, ctx, d)
		bad := eval[[]string](t, ctx, `(() => { const out = [];
			for (const fig of document.querySelectorAll('.plot')) {
				const png = fig.querySelector('button.png').getBoundingClientRect();
				const head = fig.querySelector('.plot-head').getBoundingClientRect();
				for (const tab of fig.querySelectorAll('.plot-head [role="tab"]')) {
					if (tab.hidden) continue;
					const r = tab.getBoundingClientRect();
					if (r.right > png.left - 1 && r.left < png.right) out.push(tab.textContent + ' under the PNG button');
					if (r.right > head.right + 0.5) out.push(tab.textContent + ' past the header');
					if (tab.scrollWidth > tab.clientWidth) out.push(tab.textContent + ' cut');
				}
			}
			return out; })()`)
		for _, b := range bad {
			t.Errorf("%s: %s", d, b)
		}
		for _, c := range []string{"profile", "echo", "rdmap", "response"} {
			if eval[bool](t, ctx, `window.__pw.plots.hidden('`+c+`')`) {
				continue
			}
			if clash := eval[[]string](t, ctx, jsLabelClash+`('`+c+`')`); len(clash) > 0 {
				t.Errorf("%s: %s axis labels run together: %v", d, c, clash)
			}
		}
		do(t, ctx, chromedp.Click(chromedp.CSS(`[data-show="echo"]`)))
		if clash := eval[[]string](t, ctx, jsLabelClash+`('echo')`); len(clash) > 0 {
			t.Errorf("%s: echo axis labels run together: %v", d, clash)
		}
		shot(t, ctx, d)
	}
}
