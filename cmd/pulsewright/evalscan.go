package main

import (
	"fmt"
	"io"
	"math"
	"strings"

	"github.com/pulsewright/pulsewright/scenarios"
)

// writeScanText prints the scan lines of a text report (radar.scan;
// docs/detection.md §14): hits per scan, dwell, the CPI's loss, the
// beam-shape losses of integrating the dwell, each point target's scan
// loss on its map and, with a schedule, each CPI's hits and loss.
func writeScanText(w io.Writer, r *scenarios.Report) {
	s := r.Scan
	if s == nil {
		return
	}
	line := fmt.Sprintf("scan: %.1f hits per scan (%s beam scanning in %s, dwell %s", s.HitsPerScan, s.Pattern, s.Plane, scenarios.SI(s.DwellS, "s"))
	if s.ScanPeriodS != nil {
		line += ", one turn " + scenarios.SI(*s.ScanPeriodS, "s")
	}
	line += "); "
	if s.CPILossDB != nil {
		line += fmt.Sprintf("the %s CPI spans %.2f beamwidths and loses %s dB centred on the target", scenarios.SI(s.CPIS, "s"), s.CPIBeamwidths, fx(*s.CPILossDB, 2))
		if s.CPILossOffsetDB != nil {
			line += fmt.Sprintf(" (%s dB half a CPI off)", fx(*s.CPILossOffsetDB, 2))
		}
		if s.CPIExceedsDwell {
			line += ", longer than the dwell"
		}
		line += "; "
	} else {
		line += "a single pulse at the beam's peak loses nothing; "
	}
	line += fmt.Sprintf("integrating the whole dwell would lose %s dB coherently, %s dB noncoherently (beam-shape loss); surface clutter patch × %.4f (%s dB)\n",
		fx(s.BeamShapeLossCoherentDB, 2), fx(s.BeamShapeLossNoncoherentDB, 2), s.ClutterWidthFactor, fx(10*math.Log10(s.ClutterWidthFactor), 2))
	io.WriteString(w, line)
	for i, c := range s.CPIs {
		loss := "no loss (one pulse)"
		if c.CPILossDB != nil {
			loss = "loss " + fx(*c.CPILossDB, 2) + " dB"
		}
		extra := ""
		if c.CPIExceedsDwell {
			extra = ", longer than the dwell"
		}
		fmt.Fprintf(w, "scan CPI %d: %.1f hits per scan, %s%s, %s\n", i+1, c.HitsPerScan, scenarios.SI(c.CPIS, "s"), extra, loss)
	}
	var parts []string
	for _, t := range r.Targets {
		if t.ScanLossDB != nil {
			parts = append(parts, fmt.Sprintf("%s %s dB", t.ID, fx(*t.ScanLossDB, 2)))
		}
	}
	if len(parts) > 0 {
		fmt.Fprintf(w, "scan loss on the map: %s\n", strings.Join(parts, ", "))
	}
}
