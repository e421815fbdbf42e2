package web_test

import (
	"testing"

	"github.com/chromedp/chromedp"
)

// TestFrontEndSection: the receive form's own "Front end" section opens,
// an ADC's bits alone get the server's error beside the full-scale field,
// and with both the scenario carries front_end, the frame's report warns
// that the step is coarser than the noise, the phase-noise lists reach
// the scenario as arrays, and a rain rate puts the rain in the reasons.
func TestFrontEndSection(t *testing.T) {
	ctx := mustBrowser(t)
	openPage(t, ctx, mustServer(t))
	do(t, ctx, chromedp.Click(chromedp.CSS(`.tabs [data-tab="receive"]`)))
	waitFor(t, ctx, "the front-end section", `document.querySelector('details.frontend') !== null`)
	if open := eval[bool](t, ctx, `document.querySelector('details.frontend').open`); open {
		t.Error("the section is open on a scene without impairments")
	}
	do(t, ctx, chromedp.Click(chromedp.CSS(`details.frontend > summary`)))
	waitFor(t, ctx, "the section open", `document.querySelector('details.frontend').open`)
	typeInto(t, ctx, `input[data-path="front_end.adc_bits"]`, "4")
	const slot = `document.querySelector('.field [data-err-for="front_end.adc_full_scale_db"]')`
	waitFor(t, ctx, "the full-scale error", slot+` && `+slot+`.textContent.includes('required with adc_bits')`)
	shot(t, ctx, "error")
	typeInto(t, ctx, `input[data-path="front_end.adc_full_scale_db"]`, "60")
	waitFor(t, ctx, "the ADC warning", `(window.__pw.frame().report.warnings || []).some((w) => w.includes("ADC's step"))`)
	if b := eval[float64](t, ctx, `window.__pw.store.scenario.front_end.adc_bits`); b != 4 {
		t.Errorf("front_end.adc_bits = %v, want 4", b)
	}
	typeInto(t, ctx, `textarea[data-path="front_end.phase_noise_offsets_hz"]`, "1e3, 1e5")
	typeInto(t, ctx, `textarea[data-path="front_end.phase_noise_dbc_hz"]`, "-90, -130")
	waitFor(t, ctx, "the profile in the scenario", `JSON.stringify(window.__pw.store.scenario.front_end.phase_noise_dbc_hz) === '[-90,-130]'`)
	// The section stays open through the re-render a frame brings.
	waitFor(t, ctx, "a frame of the new scene", `window.__pw.frame().link && window.__pw.frame().report.warnings.length > 0`)
	if open := eval[bool](t, ctx, `document.querySelector('details.frontend').open`); !open {
		t.Error("the section closed")
	}
	// Rain on the path: the reasons name it.
	typeInto(t, ctx, `input[data-path="propagation.rain_rate_mm_h"]`, "10")
	waitFor(t, ctx, "the rain in the reasons", `(window.__pw.frame().report.targets || []).some((t) => t.reason.includes('Rain of 10 mm/h'))`)
	do(t, ctx, chromedp.Evaluate[chromedp.Void](`document.querySelector('details.frontend').scrollIntoView()`))
	shot(t, ctx, "")
}
