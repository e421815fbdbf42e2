package web_test

import (
	"fmt"
	"testing"

	"github.com/chromedp/chromedp"
)

// jsTextClashes lists the pairs of texts a chart draws over each other
// (axis labels, axis names, legend entries, titles), from the chart
// library's own display list: each text's box after its transform, two
// boxes (the glyphs' height) meeting by more than 1 px each way.
const jsTextClashes = `((name) => {
	const zr = window.__pw.plots.charts[name].getZr();
	const texts = [];
	for (const el of zr.storage.getDisplayList(true)) {
		if (el.invisible || el.ignore || !el.style || typeof el.style.text !== 'string' || el.style.text.trim() === '') continue;
		const r = el.getBoundingRect().clone();
		r.applyTransform(el.getComputedTransform());
		// A span's own box is a few px high whatever its font: the
		// glyphs' height is the font's size, about the box's middle.
		const fs = parseFloat((/(\d+(?:\.\d+)?)px/.exec(el.style.font || '') || [0, 12])[1]);
		const mid = r.y + r.height / 2;
		texts.push({ text: el.style.text, r: { x: r.x, y: mid - 0.45 * fs, width: r.width, height: 0.9 * fs } });
	}
	const out = [];
	for (let i = 0; i < texts.length; i++) for (let j = i + 1; j < texts.length; j++) {
		const a = texts[i].r, b = texts[j].r;
		const w = Math.min(a.x + a.width, b.x + b.width) - Math.max(a.x, b.x);
		const h = Math.min(a.y + a.height, b.y + b.height) - Math.max(a.y, b.y);
		if (w > 1 && h > 1) out.push('"' + texts[i].text + '" over "' + texts[j].text + '"');
	}
	return out; })`

// TestDesignerPlotsLegible: at 1280×720 the Pulse and Filter tabs (two
// plots side by side, each with an axis on both sides) draw no text over
// another: the left plot's right-hand tick labels ran into the right
// plot's left-hand ones ("-100" and "0.2" read "-1000.2"), and the
// legends sat on the axis names ("frequency" over "MHz").
func TestDesignerPlotsLegible(t *testing.T) {
	ctx := mustBrowser(t)
	do(t, ctx, chromedp.EmulateViewport(1280, 720))
	openPage(t, ctx, mustServer(t))
	for _, d := range []string{"harbour-skiff", "closing-jet"} {
		loadDemo(t, ctx, d)
		for _, tab := range []string{"pulse", "filter"} {
			do(t, ctx, chromedp.Click(chromedp.CSS(fmt.Sprintf(`.plot-head [data-show=%q]`, tab))))
			waitFor(t, ctx, d+"'s "+tab+" plot", fresh+fmt.Sprintf(` && (() => { const c = window.__pw.plots.charts[%q]; const o = c && c.getOption();
				return !!o && o.series.length > 0 && o.series.every((s) => s.data && s.data.length > 0) && c.getWidth() > 200; })()`, tab))
			for _, c := range eval[[]string](t, ctx, jsTextClashes+fmt.Sprintf(`(%q)`, tab)) {
				t.Errorf("%s, %s tab: %s", d, tab, c)
			}
		}
		shot(t, ctx, d)
	}
}
