package web_test

import (
	"context"
	"testing"

	"github.com/chromedp/chromedp"
)

// jsMaskingLabels lists, for each masking label the profile draws (the
// chart's own, or with fast set its fast layer's), what is wrong with
// where it sits: cut by the chart's edges, or away from the end of the
// segment it labels (the masked target's end, where the label starts
// unless a marker is in the way): more than a marker and a line of text
// from it, or nearer another target's marker than to that end; and two
// masking labels that meet.
const jsMaskingLabels = `((fast) => {
	const chart = window.__pw.plots.charts.profile;
	const W = chart.getWidth();
	const labels = [], marks = {}, ends = {};
	if (fast) {
		const f = window.__pw.plots.fasts.profile;
		for (const l of f.labels.filter((l) => l.shift)) labels.push({ text: l.text, r: l.ink });
	} else {
		const model = chart.getModel();
		const md = model.getSeries().find((s) => s.id === 'masking').getData();
		md.each((i) => {
			const el = md.getItemGraphicEl(i);
			const p = el && (el.getSymbolPath ? el.getSymbolPath() : el);
			const tx = p && p.getTextContent && p.getTextContent();
			if (!tx || tx.ignore || tx.invisible || !tx.style || !tx.style.text) return;
			const r = tx.getBoundingRect().clone(); r.applyTransform(tx.getComputedTransform());
			// The library's box is a few px high: the glyphs' height is
			// the font's size, about the box's middle.
			const fs = tx.style.fontSize || 12, mid = r.y + r.height / 2;
			labels.push({ text: tx.style.text, r: { x: r.x, y: mid - 0.45 * fs, width: r.width, height: 0.9 * fs } });
		});
	}
	const o = chart.getOption();
	for (const d of o.series.find((s) => s.id === 'markers').data) marks[d.id] = chart.convertToPixel({ seriesId: 'markers' }, d.value);
	for (const d of o.series.find((s) => s.id === 'masking').data) {
		if (d && d.label && d.label.show) ends[d.label.formatter] = chart.convertToPixel({ seriesId: 'masking' }, d.value);
	}
	const dist = (r, p) => Math.hypot(Math.max(r.x - p[0], 0, p[0] - r.x - r.width), Math.max(r.y - p[1], 0, p[1] - r.y - r.height));
	const out = [];
	if (labels.length === 0) out.push('no masking label drawn');
	const meets = (a, b) => a.x < b.x + b.width && b.x < a.x + a.width && a.y < b.y + b.height && b.y < a.y + a.height;
	for (let i = 0; i < labels.length; i++) for (let j = i + 1; j < labels.length; j++) {
		if (meets(labels[i].r, labels[j].r)) out.push('"' + labels[i].text + '" meets "' + labels[j].text + '"');
	}
	for (const l of labels) {
		const end = ends[l.text];
		if (!end) { out.push('"' + l.text + '" labels no segment'); continue; }
		if (l.r.x < 0 || l.r.x + l.r.width > W + 0.5) out.push('"' + l.text + '" cut: it spans ' + Math.round(l.r.x) + '…' + Math.round(l.r.x + l.r.width) + ' px of ' + W);
		const own = dist(l.r, end);
		if (own > 32) out.push('"' + l.text + '" sits ' + Math.round(own) + ' px from the end of its segment');
		for (const [id, p] of Object.entries(marks)) {
			if (!l.text.endsWith('masks ' + id) && dist(l.r, p) + 4 < own) out.push('"' + l.text + '" sits ' + Math.round(dist(l.r, p)) + ' px from ' + id + "'s marker and " + Math.round(own) + ' px from the end of its segment');
		}
	}
	return out; })`

func maskingLabelsOK(t *testing.T, ctx context.Context, when string) {
	t.Helper()
	for _, p := range eval[[]string](t, ctx, jsMaskingLabels+`(false)`) {
		t.Errorf("%s: %s", when, p)
	}
	nudgeToRest(t, ctx, "profile", 1) // the skiff, 1 dB down: the axes stay
	for _, p := range eval[[]string](t, ctx, jsMaskingLabels+`(true)`) {
		t.Errorf("%s, after a nudge (the fast layer): %s", when, p)
	}
}

// TestMaskingLabelNearItsTarget: a masking label sits by the target it
// names and inside the plot. On the harbour scene at 1280×720, "tanker's
// response masks skiff" was pushed right past every marker in its way and
// sat beside the pilot boat, 1.1 km from the skiff; with an imported
// 16-sample pulse the tanker also masks the
// pilot boat, whose label ran off the plot's right edge ("… masks pilot").
func TestMaskingLabelNearItsTarget(t *testing.T) {
	ctx := mustBrowser(t)
	do(t, ctx, chromedp.EmulateViewport(1280, 720))
	openPage(t, ctx, mustServer(t))
	waitFor(t, ctx, "the harbour scene at rest", fresh+` && window.__pw.plots.charts.profile.getOption().series.some((s) => s.id === 'masking')`)
	maskingLabelsOK(t, ctx, "harbour")
	shot(t, ctx, "harbour")
	// A pulse of 16 equal samples at 696 kHz, as the Pulse tab's
	// "Imported samples" starts from.
	jsLoad(t, ctx, `fetch('/api/v1/demos/harbour-skiff').then((r) => r.json()).then((s) => {
		s.waveform = { kind: 'samples', sample_rate_hz: 696000, bandwidth_hz: 348000, i: Array(16).fill(1), q: Array(16).fill(0) }; return s; })`)
	waitFor(t, ctx, "the samples pulse's verdicts", `window.__pw.frame().report.targets.filter((t) => t.masked_by === 'tanker' && t.id !== 'tanker').length === 2`)
	// The chart takes its data at rest (a read settles it).
	waitFor(t, ctx, "the chart's masking labels", `window.__pw.plots.charts.profile.getOption().series.find((s) => s.id === 'masking').data.filter((d) => d && d.label && d.label.show).length === 2`)
	maskingLabelsOK(t, ctx, "harbour, 16-sample pulse")
	shot(t, ctx, "samples")
}
