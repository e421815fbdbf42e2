package scenarios

import (
	"context"
	"encoding/json"
	"math"
	"strings"
	"testing"

	"github.com/pulsewright/pulsewright/dsp"
)

// trainScene is lfmScene with a 32-pulse interval at a 10 kHz PRF.
func trainScene(dopplerWindow, mti string, targets ...string) string {
	doc := lfmScene(`{"kind":"none"}`, `{"kind":"fixed","pfa":1e-6}`, targets...)
	doc = strings.Replace(doc, `"pri_s":2e-4`, `"pri_s":1e-4,"pulses":32`, 1)
	doc = strings.Replace(doc, `"window_stop_m":12000`, `"window_stop_m":9000`, 1)
	return strings.Replace(doc, `"receiver":{`, `"receiver":{"mti":"`+mti+`","doppler_window":`+dopplerWindow+`,`, 1)
}

func movingJSON(id string, r, rcs, rate float64) string {
	return strings.TrimSuffix(pointJSON(id, r, rcs), "}") + `,"range_rate_mps":` + fmtFloat(rate) + `}`
}

func fmtFloat(v float64) string { b, _ := jsonMarshal(v); return string(b) }

// TestTrainFigures checks the pulse-train figures of the waveform report
// (common practice; Richards 2014 §§5.2 and 3.5): Doppler resolution
// 1/(N·PRI), velocity resolution λ/(2·N·PRI), unambiguous velocity
// λ/(4·PRI).
func TestTrainFigures(t *testing.T) {
	res := mustEvaluate(t, mustDecode(t, trainScene(`{"kind":"none"}`, "none", pointJSON("a", 6000, 0))))
	w := res.Report.Waveform
	lambda := C / 9.5e9
	if w.DopplerResolutionHz == nil || math.Abs(*w.DopplerResolutionHz-1/(32*1e-4)) > 1e-9 {
		t.Errorf("Doppler resolution %v, want %v", w.DopplerResolutionHz, 1/(32*1e-4))
	}
	if math.Abs(*w.VelocityResolutionMPS-lambda/(2*32*1e-4)) > 1e-9 {
		t.Errorf("velocity resolution %v", *w.VelocityResolutionMPS)
	}
	if math.Abs(w.UnambiguousVelocityMPS-lambda/(4*1e-4)) > 1e-9 {
		t.Errorf("unambiguous velocity %v", w.UnambiguousVelocityMPS)
	}
}

// TestCoherentGain: a target on a Doppler bin centre gains 10·log10(N)
// with no Doppler window; with a Hann window it loses the window's SNR
// loss, 10·log10(ENBW) = 1.76 dB for a large symmetric window
// (Harris, Proc. IEEE 66(1), 1978, Table I: ENBW 1.50 bins), 1.8 dB at N = 32.
func TestCoherentGain(t *testing.T) {
	lambda := C / 9.5e9
	rate := -lambda / 2 * 5 / (32 * 1e-4) // 5 bins from zero Doppler
	for _, tt := range []struct {
		win  string
		want float64
	}{{`{"kind":"none"}`, dsp.DB(32)}, {`{"kind":"hann"}`, dsp.DB(32) - dsp.DB(dsp.WindowFigures(dsp.Hann{}.Coefficients(make([]float64, 32))).ENBW)}} {
		res := mustEvaluate(t, mustDecode(t, trainScene(tt.win, "none", movingJSON("a", 6000, rcsFor(10, 6000), rate))))
		a := target(res, "a")
		if a.SNRIntegratedDB == nil {
			t.Fatal("no integrated SNR")
		}
		if got := *a.SNRIntegratedDB - a.SNRDB; math.Abs(got-tt.want) > 0.01 {
			t.Errorf("window %s: integration gain %.3f dB, want %.3f", tt.win, got, tt.want)
		}
		if a.BlindSpeed == nil || *a.BlindSpeed {
			t.Errorf("blind speed %v for a target 5 bins off zero", a.BlindSpeed)
		}
		if math.Abs(*a.ApparentRangeRateMPS-rate) > 1e-9 {
			t.Errorf("apparent range rate %v, want %v", *a.ApparentRangeRateMPS, rate)
		}
	}
}

// TestDopplerUnmasks: a weak target on the strong one's third range
// sidelobe (masked in a single pulse, TestMaskingBySidelobe) but at a
// different Doppler is detected on the range–Doppler map, and the reason
// says Doppler saved it.
func TestDopplerUnmasks(t *testing.T) {
	weakR := 6000 + 3.47*15
	strong := pointJSON("strong", 6000, rcsFor(45, 6000))
	weak := movingJSON("weak", weakR, rcsFor(20, weakR), -30)
	res := mustEvaluate(t, mustDecode(t, trainScene(`{"kind":"hann"}`, "none", strong, weak)))
	w := target(res, "weak")
	if w.Status != StatusDetected || !strings.Contains(w.Reason, "Doppler saves it") {
		t.Fatalf("weak is %s: %s", w.Status, w.Reason)
	}
	// At the same Doppler as the strong one it stays masked.
	weak = movingJSON("weak", weakR, rcsFor(20, weakR), 0)
	res = mustEvaluate(t, mustDecode(t, trainScene(`{"kind":"hann"}`, "none", strong, weak)))
	if w := target(res, "weak"); w.Status != StatusMasked || !strings.Contains(w.Reason, "share its Doppler") {
		t.Fatalf("same Doppler: weak is %s: %s", w.Status, w.Reason)
	}
}

// TestBlindSpeed: a target whose Doppler is the PRF (range rate −λ·PRF/2;
// blind speeds n·λ/(2·PRI), Richards 2014 §5.2.2) folds onto zero
// Doppler and is flagged; with a two-pulse MTI it is cancelled.
func TestBlindSpeed(t *testing.T) {
	lambda := C / 9.5e9
	rate := -lambda / 2 / 1e-4
	res := mustEvaluate(t, mustDecode(t, trainScene(`{"kind":"hann"}`, "two_pulse", movingJSON("a", 6000, rcsFor(20, 6000), rate))))
	a := target(res, "a")
	if a.BlindSpeed == nil || !*a.BlindSpeed {
		t.Fatalf("blind speed not flagged: %+v", a)
	}
	if math.Abs(*a.ApparentRangeRateMPS) > 1e-6 {
		t.Errorf("apparent range rate %v, want 0", *a.ApparentRangeRateMPS)
	}
	if a.Status != StatusTooWeak || !strings.Contains(a.Reason, "Blind speed") {
		t.Errorf("status %s: %s", a.Status, a.Reason)
	}
	if m := res.Series.RangeDoppler; m == nil || len(m.DB) != 31 || len(m.DB[0]) != len(res.Series.ProfileDB) {
		t.Fatalf("range–Doppler map missing or misshaped")
	}
}

func jsonMarshal(v any) ([]byte, error) { return json.Marshal(v) }

// BenchmarkTrainLarge: 128 pulses × 65 536 samples with 20 point targets
// and a rain band: synthesis, compression, Doppler FFT and CFAR.
func BenchmarkTrainLarge(b *testing.B) {
	s := largeScene(b)
	s.Radar.Pulses = 128
	s.Radar.WindowStopM = s.Radar.WindowStartM + 65535*C/(2*s.Radar.SampleRateHz)
	if err := s.Validate(); err != nil {
		b.Fatal(err)
	}
	b.ReportAllocs()
	for b.Loop() {
		if _, err := Evaluate(context.Background(), s); err != nil {
			b.Fatal(err)
		}
	}
}
