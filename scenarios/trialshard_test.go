package scenarios

import (
	"context"
	"encoding/json"
	"testing"
)

// TestTrialCountsOfShards: the counts of trials 3…9 and 10…20 run apart
// add up to the counts of 3…20 run at once, and the summary of one part
// with the summed counts (WithCounts, what merge computes) is the
// summary of the whole run, intervals included.
func TestTrialCountsOfShards(t *testing.T) {
	tr, err := NewTrials(context.Background(), demoScenario(t, "harbour-skiff"))
	if err != nil {
		t.Fatal(err)
	}
	run := func(first, n int) TrialCounts {
		c, err := tr.Run(context.Background(), first, n, 2, nil)
		if err != nil {
			t.Fatal(err)
		}
		return c
	}
	a, b, whole := run(3, 7), run(10, 11), run(3, 18)
	sum := TrialCounts{Detections: make([]int64, len(a.Detections))}
	for _, c := range []TrialCounts{b, a} { // either order: blocks are adjacent
		if err := sum.Add(c); err != nil {
			t.Fatal(err)
		}
	}
	js := func(v any) string { b, _ := json.Marshal(v); return string(b) }
	if js(sum) != js(whole) {
		t.Fatalf("summed counts %s, whole run %s", js(sum), js(whole))
	}
	merged := tr.Summarise(a, 7).WithCounts(sum, 18)
	if got, want := js(merged), js(tr.Summarise(whole, 18)); got != want {
		t.Errorf("merged summary\n%s\nwant\n%s", got, want)
	}
}
