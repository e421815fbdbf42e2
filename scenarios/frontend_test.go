package scenarios

import (
	"math"
	"strings"
	"testing"

	"github.com/pulsewright/pulsewright/dsp"
)

// withFrontEnd adds a front_end object to a scenario document.
func withFrontEnd(doc, fe string) string {
	return strings.Replace(doc, `"targets":[`, `"front_end":`+fe+`,"targets":[`, 1)
}

func TestSmokePN(t *testing.T) {
	lambda := C / 9.5e9
	rate := -lambda / 2 * 8 / (32 * 1e-4)
	doc := trainScene(`{"kind":"blackman_harris"}`, "none",
		movingJSON("tanker", 6000, rcsFor(70, 6000), 0), movingJSON("skiff", 6000, rcsFor(15, 6000), rate))
	for _, fe := range []string{"", `{"phase_noise_offsets_hz":[100,3000,30000],"phase_noise_dbc_hz":[-70,-70,-130]}`} {
		d := doc
		if fe != "" {
			d = withFrontEnd(doc, fe)
		}
		res := mustEvaluate(t, mustDecode(t, d))
		for _, tr := range res.Report.Targets {
			t.Logf("%s %s %v", tr.ID, tr.Status, tr.Reason)
		}
	}
	_ = math.Pi
	_ = dsp.DB
}
