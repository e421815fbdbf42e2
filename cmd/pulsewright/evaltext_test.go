package main

import (
	"bytes"
	"context"
	"os"
	"strings"
	"testing"

	"github.com/pulsewright/pulsewright/scenarios"
)

// TestReportTextShowsPd: the text report has a Pd column and a line per
// target with Pd in the scene and alone. In the harbour demo the skiff is
// masked by the tanker: its Pd in the scene differs from its Pd with the
// other targets removed. In the long-pulse demo the far airliner is
// folded: its Pd is its ghost's.
func TestReportTextShowsPd(t *testing.T) {
	out := demoText(t, "harbour-skiff")
	for _, want := range []string{"THR MARGIN dB", "skiff: Pd ", " with the other targets removed; the required Pd needs", "masked by tanker"} {
		if !strings.Contains(out, want) {
			t.Errorf("text report lacks %q:\n%s", want, out)
		}
	}
	if out := demoText(t, "long-pulse-blind"); !strings.Contains(out, "airliner-far: Pd of its ghost at the apparent range > 0.999") {
		t.Errorf("folded airliner's Pd line:\n%s", out)
	}
}

// demoText is the text report of a demo.
func demoText(t *testing.T, name string) string {
	t.Helper()
	doc, err := os.ReadFile("../../scenarios/demos/" + name + ".json")
	if err != nil {
		t.Fatal(err)
	}
	s, err := scenarios.Decode(doc)
	if err != nil {
		t.Fatal(err)
	}
	res, err := scenarios.Evaluate(context.Background(), s)
	if err != nil {
		t.Fatal(err)
	}
	var b bytes.Buffer
	if err := writeReportText(&b, &res.Report); err != nil {
		t.Fatal(err)
	}
	return b.String()
}
