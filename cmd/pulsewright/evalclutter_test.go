package main

import (
	"bytes"
	"context"
	"os"
	"strings"
	"testing"

	"github.com/pulsewright/pulsewright/scenarios"
)

// TestReportTextShowsClutter: the squall-line demo's text report gives the
// aircraft's CNR and SCR, the rain's breakthrough and the false-alarm rate.
func TestReportTextShowsClutter(t *testing.T) {
	doc, err := os.ReadFile("../../scenarios/demos/squall-line.json")
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
	for _, want := range []string{"light-aircraft: CNR ", ", SCR ", "rain-band: CNR ", "no breakthrough", "clutter: peak CNR ", "false alarms from noise: ", "independent cells"} {
		if !strings.Contains(out, want) {
			t.Errorf("text report lacks %q:\n%s", want, out)
		}
	}
}
