package scenarios

import (
	"context"
	"fmt"
	"strings"
	"testing"
)

// BenchmarkTrials measures Monte Carlo trials per second (the trials/s
// metric) on one and two workers: a Barker-13 scene at one sample per
// chip (233 gates), the LFM test scene (2400 gates at 4× oversampling,
// CA-CFAR) and a 16-pulse train of the Barker scene.
func BenchmarkTrials(b *testing.B) {
	ca := `{"kind":"ca_cfar","pfa":1e-6,"guard_cells":8,"training_cells":16}`
	tg := `{"id":"a","kind":"point","range_m":9950,"rcs_dbsm":0,"fluctuation":"swerling1"}`
	scenes := map[string]string{
		"barker":  barkerScene(ca, tg),
		"lfm":     lfmDoc(ca, `{"id":"a","kind":"point","range_m":6000,"rcs_dbsm":0,"fluctuation":"swerling1"}`),
		"train16": strings.Replace(barkerScene(ca, tg), `"pri_s":5e-4`, `"pri_s":5e-4,"pulses":16`, 1),
	}
	for _, name := range []string{"barker", "lfm", "train16"} {
		s := mustDecode(b, scenes[name])
		tr, err := NewTrials(context.Background(), s)
		if err != nil {
			b.Fatal(err)
		}
		for _, w := range []int{1, 2} {
			b.Run(fmt.Sprintf("%s/workers=%d", name, w), func(b *testing.B) {
				b.ReportAllocs()
				// One run of b.N trials: a run sets up each worker's plans once.
				if _, err := tr.Run(context.Background(), 0, b.N, w, nil); err != nil {
					b.Fatal(err)
				}
				b.ReportMetric(float64(b.N)/b.Elapsed().Seconds(), "trials/s")
			})
		}
	}
}
