package main

import (
	"encoding/csv"
	"fmt"
	"io"
	"strings"
	"text/tabwriter"

	"github.com/pulsewright/pulsewright/scenarios"
	"github.com/pulsewright/pulsewright/server"
)

// coverage runs "pulsewright coverage": the Pd curves of one target
// (docs/detection-probability.md §9).
func (e *env) coverage(args []string) error {
	fs := newFlags("coverage", e)
	id := fs.String("target", "", "id of the target (a point target) whose curves to draw (required)")
	from := fs.Float64("from", 0, "first range of the range curve, m (0 with --to 0: the receive window)")
	to := fs.Float64("to", 0, "last range of the range curve, m")
	points := fs.Int("points", 200, fmt.Sprintf("ranges on the range curve, 2 … %d", scenarios.MaxCurvePoints))
	by := fs.String("by", "range", "the table or CSV: range (Pd against range) or snr (Pd against SNR)")
	format := fs.String("format", "table", "output format: table, csv or html (both curves in a self-contained page)")
	out := fs.String("o", "", "write to this file instead of standard output")
	unitsText := unitsFlag(fs)
	pos, err := parseFlags(fs, args)
	if err != nil {
		return err
	}
	if *format != "table" && *format != "csv" && *format != "html" {
		return usageError{fmt.Sprintf("--format %q is not table, csv or html", *format)}
	}
	u, err := parseUnitsFlag(*unitsText, *format == "table", "it applies to --format table; csv and html keep SI")
	if err != nil {
		return err
	}
	switch {
	case *by != "range" && *by != "snr":
		return usageError{fmt.Sprintf("--by %q is not range or snr", *by)}
	case *points < 2 || *points > scenarios.MaxCurvePoints:
		return usageError{fmt.Sprintf("--points %d out of range: want 2 … %d", *points, scenarios.MaxCurvePoints)}
	case (*from != 0 || *to != 0) && !(*from > 0 && *to > *from && *to <= 1e8):
		return usageError{fmt.Sprintf("--from %g --to %g out of range: want 0 < from < to ≤ 1e8 m (or both 0 for the receive window)", *from, *to)}
	}
	if len(pos) == 1 {
		if err := checkOutputs(pos[0], map[string]string{"-o": *out}); err != nil {
			return err
		}
	}
	s, err := e.oneScenario("coverage", pos)
	if err != nil {
		return err
	}
	if *id == "" {
		var ids []string
		for _, t := range s.Targets {
			if t.Kind == scenarios.TargetPoint {
				ids = append(ids, t.ID)
			}
		}
		return usageError{fmt.Sprintf("coverage needs --target ID (point targets: %s)", strings.Join(ids, ", "))}
	}
	c, err := scenarios.CoverageOf(e.ctx, s, *id, *from, *to, *points)
	if err != nil {
		if e.ctx.Err() != nil {
			return statusError{exitInterrupted, "coverage interrupted; nothing written"}
		}
		return err
	}
	lines := coverageLines(c)
	write := func(w io.Writer) error {
		switch *format {
		case "html":
			return server.WriteCoveragePage(w, c, lines)
		case "csv":
			return writeCoverageCSV(w, c, *by)
		}
		return writeCoverageTable(w, c, lines, *by, u)
	}
	if *out != "" {
		return writeFile(*out, write)
	}
	return write(e.stdout)
}

// coverageLines are the summary lines above a table or the page's chart.
func coverageLines(c *scenarios.Coverage) []string {
	l := []string{fmt.Sprintf("target %s at %.0f m, Pfa %g, required Pd %g", c.Target, c.RangeM, c.Pfa, c.PdRequired)}
	if c.SNRDB != nil {
		s := fmt.Sprintf("SNR at its cell %.2f dB", *c.SNRDB)
		if c.SNRRequiredDB != nil {
			s += fmt.Sprintf("; Pd %g needs %.2f dB", c.PdRequired, *c.SNRRequiredDB)
		}
		if c.Pd != nil {
			s += fmt.Sprintf("; Pd %s in the scene", scenarios.PdText(*c.Pd))
		}
		if c.PdAlone != nil {
			s += fmt.Sprintf(", %s alone", scenarios.PdText(*c.PdAlone))
		}
		l = append(l, s)
	} else {
		l = append(l, "no Pd series applies to it here (see the report's reason)")
	}
	if c.DetectionRangeM != nil {
		l = append(l, fmt.Sprintf("detection range for its RCS (R⁴ law): %.0f m", *c.DetectionRangeM))
	}
	if c.CoverageM != nil {
		l = append(l, fmt.Sprintf("coverage: Pd alone falls to %g at %.0f m on the range curve", c.PdRequired, *c.CoverageM))
	} else if len(c.ByRange) > 0 {
		l = append(l, fmt.Sprintf("coverage: Pd alone does not fall through %g between %.0f and %.0f m", c.PdRequired, c.ByRange[0].RangeM, c.ByRange[len(c.ByRange)-1].RangeM))
	}
	return l
}

func optCell(v *float64, f func(float64) string) string {
	if v == nil {
		return "—"
	}
	return f(*v)
}

// writeCoverageTable prints the summary and the table for people, ranges
// in u's range unit (--from and --to are read in metres whatever u).
func writeCoverageTable(w io.Writer, c *scenarios.Coverage, lines []string, by string, u scenarios.Units) error {
	fmt.Fprintf(w, "%s\n", c.Scenario)
	for _, l := range lines {
		fmt.Fprintln(w, u.Restate(l))
	}
	fmt.Fprintln(w)
	tw := tabwriter.NewWriter(w, 0, 0, 2, ' ', tabwriter.AlignRight)
	if by == "snr" {
		fmt.Fprintln(tw, "SNR dB\tPD\t")
		for _, p := range c.BySNR {
			fmt.Fprintf(tw, "%.2f\t%s\t\n", p.SNRDB, prob(p.Pd))
		}
	} else {
		fmt.Fprintf(tw, "RANGE %s\tSNR dB\tPD\tPD ALONE\tSTATUS\t\n", u.Range)
		for _, p := range c.ByRange {
			fmt.Fprintf(tw, "%s\t%s\t%s\t%s\t%s\t\n", u.Number(scenarios.QRange, p.RangeM, 1), optCell(p.SNRDB, func(v float64) string { return fx(v, 2) }),
				optCell(p.Pd, prob), optCell(p.PdAlone, prob), p.Status)
		}
	}
	if err := tw.Flush(); err != nil {
		return err
	}
	_, err := fmt.Fprintf(w, "\n%s\n", scenarios.RunningEngine())
	return err
}

func writeCoverageCSV(w io.Writer, c *scenarios.Coverage, by string) error {
	if _, err := io.WriteString(w, scenarios.CSVComment()); err != nil {
		return err
	}
	cw := csv.NewWriter(w)
	opt := func(v *float64) string {
		if v == nil {
			return ""
		}
		return fmtG(*v, 6)
	}
	if by == "snr" {
		cw.Write([]string{"snr_db", "pd"})
		for _, p := range c.BySNR {
			cw.Write([]string{fmtG(p.SNRDB, 4), fmtG(p.Pd, 6)})
		}
	} else {
		cw.Write([]string{"range_m", "snr_db", "pd", "pd_alone", "status"})
		for _, p := range c.ByRange {
			cw.Write([]string{fmtG(p.RangeM, 6), opt(p.SNRDB), opt(p.Pd), opt(p.PdAlone), p.Status})
		}
	}
	cw.Flush()
	return cw.Error()
}
