package web_test

import (
	"strings"
	"testing"
	"time"

	"github.com/chromedp/chromedp"
)

// Non-coherent integration on the page (receiver.integration, scenario
// format 3): in the harbour-skiff demo, 10 pulses typed into the radar
// form and "Non-coherent" picked in the receiver's form make the scene a
// non-coherently integrated train: the report says so (its integration
// object, and a sentence above the target cards), no range–Doppler map
// tab appears, and the pilot boat (Swerling 1, 26 dB per pulse) keeps a
// Pd from the 10-pulse series, which is not its single-pulse 0.722. An
// OS-CFAR picked then is refused with the field named, and the last
// valid scene stays shown.
func TestNonCoherentIntegrationOnPage(t *testing.T) {
	ctx := mustBrowserFor(t, 2*time.Minute)
	openPage(t, ctx, mustServer(t))
	waitFor(t, ctx, "the pilot boat masked", jsTarget+`('pilot-boat').status === 'masked'`)
	single := eval[float64](t, ctx, jsTarget+`('pilot-boat').pd`)
	do(t, ctx, chromedp.Click(chromedp.CSS(`.tabs [data-tab="radar"]`)))
	typeInto(t, ctx, `#ed-radar input[data-path="radar.pulses"]`, "10")
	waitFor(t, ctx, "10 coherent pulses", `window.__pw.frame().report.waveform.doppler_resolution_hz !== undefined && window.__pw.store.scenario.radar.pulses === 10`)
	waitFor(t, ctx, "the map tab shown", `!document.querySelector('.plot-head [data-show="rdmap"]').hidden`)
	do(t, ctx, chromedp.Click(chromedp.CSS(`.tabs [data-tab="receive"]`)))
	setSelect(t, ctx, `select[data-path="receiver.integration"]`, "noncoherent")
	waitFor(t, ctx, "the integrated train", `window.__pw.store.scenario.receiver.integration === 'noncoherent'
		&& window.__pw.frame().report.integration && window.__pw.frame().report.integration.pulses === 10`)
	if eval[bool](t, ctx, `window.__pw.frame().report.waveform.doppler_resolution_hz !== undefined`) {
		t.Errorf("a non-coherent train reports a Doppler resolution")
	}
	waitFor(t, ctx, "the map tab hidden", `document.querySelector('.plot-head [data-show="rdmap"]').hidden`)
	waitFor(t, ctx, "the note above the cards", `document.querySelector('.integration-note') && document.querySelector('.integration-note').textContent.includes('Non-coherent integration of 10 pulses')`)
	if txt := eval[string](t, ctx, `document.querySelector('.integration-note').textContent`); !strings.Contains(txt, "no range–Doppler map") {
		t.Errorf("integration note %q does not say there is no range–Doppler map", txt)
	}
	pd := eval[float64](t, ctx, jsTarget+`('pilot-boat').pd`)
	if !(pd > 0 && pd < 1) || pd == single {
		t.Errorf("pilot boat Pd %g after integrating 10 pulses, single pulse %g: want a different Pd in (0, 1)", pd, single)
	}
	shot(t, ctx, "noncoherent")

	// OS-CFAR after non-coherent integration is not modelled: refused,
	// the error names the field, the scene shown stays the last valid one.
	setSelect(t, ctx, `select[data-action="detector-kind"]`, "os_cfar")
	waitFor(t, ctx, "the refusal", jsBannerKind+` === 'invalid' && /integration/i.test(`+jsBanner+`.textContent)`)
	if n := eval[int](t, ctx, `window.__pw.frame().report.integration.pulses`); n != 10 {
		t.Errorf("after the refused edit the frame shows %d integrated pulses, want the last valid 10", n)
	}
	shot(t, ctx, "refused")
}
