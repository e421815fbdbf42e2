package scenarios

import (
	"context"
	"fmt"
	"strings"
	"testing"
)

// TestMTIZeroDopplerCancelled: a point target at zero Doppler behind a
// two- or three-pulse MTI canceller leaves no power on the range–Doppler
// map (the canceller's response 1 − e^{−j2πf·PRI} and its square are zero
// at f = 0 and every multiple of the PRF: common practice, no source). It lies inside the
// receive window and clear of the blind range, so it is neither
// out_of_window nor eclipsed (docs/detection.md §6 steps 3–4): it is too_weak,
// decided before any detector, its reason naming the MTI canceller and the
// blind speeds, and blind_speed false (report-format.md: zero Doppler is
// slow, not blind). A target just inside the window's start (3.01 km)
// is read the same way. A target moving at the PRF's blind speed
// (10 kHz) is already too_weak with a blind_speed reason.
func TestMTIZeroDopplerCancelled(t *testing.T) {
	lambda := C / 9.5e9
	blind := -lambda / 2 / 1e-4
	for _, mti := range []string{"two_pulse", "three_pulse"} {
		doc := trainScene(`{"kind":"none"}`, mti, pointJSON("zero", 6000, rcsFor(20, 6000)), pointJSON("edge", 3010, rcsFor(20, 3010)), movingJSON("blind", 7000, rcsFor(20, 7000), blind))
		res := mustEvaluate(t, mustDecode(t, doc))
		for _, id := range []string{"zero", "edge", "blind"} {
			a := target(res, id)
			if a.Status != StatusTooWeak {
				t.Errorf("%s %s: status %s (%s), want too_weak", mti, id, a.Status, a.Reason)
			}
			if !strings.Contains(a.Reason, "MTI canceller") {
				t.Errorf("%s %s: reason does not name the MTI canceller: %s", mti, id, a.Reason)
			}
			if a.BlindSpeed == nil || *a.BlindSpeed != (id == "blind") {
				t.Errorf("%s %s: blind_speed %v", mti, id, a.BlindSpeed)
			}
		}
		if a := target(res, "zero"); a.Pd != nil || a.MarginDB != nil || a.SNRIntegratedDB != nil {
			t.Errorf("%s: a cancelled target has Pd figures: pd %v, margin %v, integrated SNR %v", mti, a.Pd, a.MarginDB, a.SNRIntegratedDB)
		}
	}
	// Without the canceller the same zero-Doppler target is detected.
	res := mustEvaluate(t, mustDecode(t, trainScene(`{"kind":"none"}`, "none", pointJSON("zero", 6000, rcsFor(20, 6000)))))
	if a := target(res, "zero"); a.Status != StatusDetected {
		t.Errorf("no MTI: status %s (%s), want detected", a.Status, a.Reason)
	}
}

// TestMTIZeroDopplerPartlyEclipsed: a zero-Doppler target partly inside
// the blind range (1.45 km against c·τ/2 = 1.5 km for the 10 µs pulse: 97 %
// of its echo heard, its response on processed gates) is too_weak behind
// the canceller, not eclipsed: blanking does not lose it, the canceller
// does (docs/detection.md §6 steps 3–4). Without the canceller the map
// sees it (not eclipsed wholly).
func TestMTIZeroDopplerPartlyEclipsed(t *testing.T) {
	for _, mti := range []string{"none", "two_pulse"} {
		doc := strings.Replace(trainScene(`{"kind":"none"}`, mti, pointJSON("near", 1450, rcsFor(30, 1450))), `"window_start_m":3000`, `"window_start_m":0`, 1)
		a := target(mustEvaluate(t, mustDecode(t, doc)), "near")
		switch {
		case mti == "none" && a.Status == StatusEclipsed && strings.Contains(a.Reason, "none of its response"):
			t.Errorf("no MTI: wholly eclipsed (%s); the test's geometry is wrong", a.Reason)
		case mti != "none" && (a.Status != StatusTooWeak || !strings.Contains(a.Reason, "MTI canceller")):
			t.Errorf("%s: status %s (%s), want too_weak naming the MTI canceller", mti, a.Status, a.Reason)
		}
	}
}

// TestScheduleNamesMTICancellation: in a PRF schedule, the summary of a
// zero-Doppler target behind an MTI canceller says which canceller
// removes it in each CPI ("CPI 1 cancelled by the two-pulse MTI
// canceller"), as the report's reason does (docs/detection.md §6 step
// 3), not "too weak", which reads as a target short of SNR. A target
// at a non-zero blind speed keeps its words ("at a blind speed").
func TestScheduleNamesMTICancellation(t *testing.T) {
	for _, c := range []struct{ mti, words string }{{"two_pulse", "two-pulse"}, {"three_pulse", "three-pulse"}} {
		doc := trainScene(`{"kind":"none"}`, c.mti, pointJSON("zero", 6000, rcsFor(20, 6000)))
		doc = strings.Replace(doc, `"radar":{`, `"radar":{"schedule":{"cpis":[{"pri_s":1.2e-4}]},`, 1)
		rep, err := Analyse(context.Background(), mustDecode(t, doc))
		if err != nil {
			t.Fatal(err)
		}
		if rep.Schedule == nil || len(rep.Schedule.Targets) != 1 {
			t.Fatalf("%s: no schedule report for the one target: %+v", c.mti, rep.Schedule)
		}
		st := rep.Schedule.Targets[0]
		for k := 1; k <= 2; k++ {
			want := fmt.Sprintf("CPI %d cancelled by the %s MTI canceller", k, c.words)
			if !strings.Contains(st.Reason, want) {
				t.Errorf("%s: schedule reason %q does not say %q", c.mti, st.Reason, want)
			}
		}
		if strings.Contains(st.Reason, "too weak") {
			t.Errorf("%s: schedule reason calls the cancelled target too weak: %q", c.mti, st.Reason)
		}
		for k, cr := range rep.Schedule.CPIs {
			if w := CPIStatusWords(cr.Targets[0]); w != "cancelled by the "+c.words+" MTI canceller" {
				t.Errorf("%s: CPI %d status words %q", c.mti, k+1, w)
			}
		}
	}
}
