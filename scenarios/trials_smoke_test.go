package scenarios

import (
	"context"
	"strconv"
	"testing"
	"time"
)

func TestTrialsSmoke(t *testing.T) {
	doc := lfmScene(`{"kind":"none"}`, `{"kind":"fixed","pfa":1e-6}`,
		`{"id":"a","kind":"point","range_m":4000,"rcs_dbsm":`+ftoa(rcsFor(12, 4000))+`}`,
		`{"id":"b","kind":"point","range_m":6000,"rcs_dbsm":`+ftoa(rcsFor(16, 6000))+`,"fluctuation":"swerling1"}`,
		`{"id":"c","kind":"point","range_m":8000,"rcs_dbsm":`+ftoa(rcsFor(16, 8000))+`,"fluctuation":"swerling3"}`)
	tr, err := NewTrials(context.Background(), mustDecode(t, doc))
	if err != nil {
		t.Fatal(err)
	}
	t0 := time.Now()
	c, err := tr.Run(context.Background(), 0, 1000, 0, nil)
	el := time.Since(t0)
	if err != nil {
		t.Fatal(err)
	}
	for j, tg := range tr.Report().Targets {
		t.Logf("%s pd %v snr_req %v margin %v: %d/%d", tg.ID, *tg.Pd, *tg.SNRRequiredDB, *tg.PdMarginDB, c.Detections[j], c.Trials)
	}
	t.Logf("fa %d of %d cells; %v, %.0f trials/s", c.FalseAlarms, c.NoiseCells, el, float64(c.Trials)/el.Seconds())
}

func ftoa(v float64) string { return strconv.FormatFloat(v, 'g', -1, 64) }
