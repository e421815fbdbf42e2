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
// masked by the tanker: its Pd in the scene differs from its Pd alone.
func TestReportTextShowsPd(t *testing.T) {
	doc, err := os.ReadFile("../../scenarios/demos/harbour-skiff.json")
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
	out := b.String()
	for _, want := range []string{"THR MARGIN dB", "skiff: Pd ", " alone; the required Pd needs", "masked by tanker"} {
		if !strings.Contains(out, want) {
			t.Errorf("text report lacks %q:\n%s", want, out)
		}
	}
}
