package web_test

import (
	"testing"

	"github.com/chromedp/chromedp"
)

// jsSplitUnits lists the numbers on the target cards whose unit went to
// the next line ("peak shift -35.66" | "m"): for each number followed by
// a space and a unit, the number's and the unit's line boxes, compared.
const jsSplitUnits = `(() => {
	const out = [];
	const re = /([-+]?\d[\d.]*)[\s\u00a0](k?Hz|m|km|dB|dBsm)\b/g;
	for (const el of document.querySelectorAll('.tcard-nums span, .tcard-nums b')) {
		for (const node of el.childNodes) {
			if (node.nodeType !== 3) continue;
			for (const m of node.data.matchAll(re)) {
				const a = document.createRange(), b = document.createRange();
				a.setStart(node, m.index); a.setEnd(node, m.index + m[1].length);
				b.setStart(node, m.index + m[1].length + 1); b.setEnd(node, m.index + m[0].length);
				const ra = a.getClientRects(), rb = b.getClientRects();
				if (ra.length && rb.length && Math.abs(ra[ra.length - 1].top - rb[0].top) > 2) out.push(el.closest('.tcard').dataset.target + ': "' + m[0] + '" split over two lines');
			}
		}
	}
	return out; })()`

// TestCardNumbersKeepTheirUnits: at 1280×720 no number on a target card
// is parted from its unit at a line's end (long-pulse-blind's airliner:
// "Doppler +1.995 kHz · peak shift -35.66" and "m" alone on the next line).
func TestCardNumbersKeepTheirUnits(t *testing.T) {
	ctx := mustBrowser(t)
	do(t, ctx, chromedp.EmulateViewport(1280, 720))
	openPage(t, ctx, mustServer(t))
	for _, d := range []string{"long-pulse-blind", "closing-jet", "hill-clutter-doppler"} {
		loadDemo(t, ctx, d)
		waitFor(t, ctx, d+"'s cards", fresh+` && document.querySelectorAll('.tcard[data-target]').length === window.__pw.frame().report.targets.length`)
		for _, s := range eval[[]string](t, ctx, jsSplitUnits) {
			t.Errorf("%s: %s", d, s)
		}
	}
	do(t, ctx, chromedp.ScrollIntoView(chromedp.CSS(`.tcard[data-target="jet"]`)))
	shot(t, ctx, "")
}
