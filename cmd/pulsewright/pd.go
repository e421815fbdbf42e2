package main

import (
	"encoding/csv"
	"fmt"
	"io"
	"math"
	"strconv"
	"strings"
	"text/tabwriter"

	"github.com/pulsewright/pulsewright/dsp"
	"github.com/pulsewright/pulsewright/scenarios"
	"github.com/pulsewright/pulsewright/server"
)

// maxPdRows bounds the rows of a Pd table (SNR or range steps).
const maxPdRows = 100000

// pdArgs are the parsed and checked flags of "pulsewright pd".
type pdArgs struct {
	det        dsp.Detector
	pdRequired float64
	from, to   float64 // SNR (dB) or range (m)
	step       float64
	byRange    bool
	refRange   float64 // m
	refSNR     float64 // dB
	csv        bool
	html       string
	units      scenarios.Units // of the table's ranges (the CSV and HTML keep SI)
}

func (e *env) pd(args []string) error {
	a, err := e.parsePd(args)
	if err != nil {
		return err
	}
	snrReq, err := a.det.RequiredSNR(a.pdRequired)
	if err != nil {
		return usageError{fmt.Sprintf("--pd-required %g: %v", a.pdRequired, err)}
	}
	reqDB := dsp.DB(snrReq)
	type row struct{ x, snrDB, pd float64 }
	var rows []row
	n := int(math.Floor((a.to-a.from)/a.step+1e-9)) + 1
	for i := range n {
		x := a.from + float64(i)*a.step
		snrDB := x
		if a.byRange {
			snrDB = dsp.SNRAtRange(a.refRange, a.refSNR, x)
		}
		rows = append(rows, row{x, snrDB, a.det.Pd(dsp.FromDB(snrDB))})
	}
	title := describeDetector(a.det)
	lines := []string{fmt.Sprintf("SNR per pulse for Pd %g: %.2f dB", a.pdRequired, reqDB)}
	if a.det.CFARCells > 0 {
		if loss, err := a.det.CFARLoss(a.pdRequired); err == nil {
			lines = append(lines, fmt.Sprintf("CFAR loss at Pd %g: %.2f dB", a.pdRequired, loss))
		}
	}
	if a.det.Integration == dsp.NonCoherent && a.det.CFARCells == 0 && a.pdRequired > 0.1 && a.pdRequired < 0.99 {
		if a.det.Swerling == dsp.SwerlingNone {
			lines = append(lines, fmt.Sprintf("cross-check, Albersheim's equation (linear detector): %.2f dB",
				dsp.Albersheim(a.pdRequired, a.det.Pfa, a.det.Pulses)))
		}
		lines = append(lines, fmt.Sprintf("cross-check, Shnidman's equation: %.2f dB",
			dsp.Shnidman(a.pdRequired, a.det.Pfa, a.det.Pulses, a.det.Swerling)))
	}
	var coverage *float64
	if a.byRange {
		r := dsp.RangeAtSNR(a.refRange, a.refSNR, reqDB)
		coverage = &r
		lines = append(lines, fmt.Sprintf("reference: %.2f dB at %g m (R⁴ law); Pd ≥ %g out to %.0f m",
			a.refSNR, a.refRange, a.pdRequired, r))
	}

	switch {
	case a.csv:
		if _, err := io.WriteString(e.stdout, scenarios.CSVComment()); err != nil {
			return err
		}
		c := csv.NewWriter(e.stdout)
		if a.byRange {
			c.Write([]string{"range_m", "snr_db", "pd"})
		} else {
			c.Write([]string{"snr_db", "pd"})
		}
		for _, r := range rows {
			rec := []string{fmtG(r.snrDB, 4), fmtG(r.pd, 6)}
			if a.byRange {
				rec = append([]string{fmtG(r.x, 2)}, rec...)
			}
			c.Write(rec)
		}
		c.Flush()
		if err := c.Error(); err != nil {
			return fmt.Errorf("write csv: %w", err)
		}
	default:
		fmt.Fprintln(e.stdout, title)
		for _, l := range lines {
			fmt.Fprintln(e.stdout, a.units.Restate(l))
		}
		fmt.Fprintln(e.stdout)
		tw := tabwriter.NewWriter(e.stdout, 0, 0, 2, ' ', tabwriter.AlignRight)
		if a.byRange {
			fmt.Fprintf(tw, "range (%s)\tSNR (dB)\tPd\t\n", a.units.Range)
		} else {
			fmt.Fprintln(tw, "SNR (dB)\tPd\t")
		}
		for _, r := range rows {
			if a.byRange {
				fmt.Fprintf(tw, "%s\t%.2f\t%s\t\n", a.units.Number(scenarios.QRange, r.x, 1), r.snrDB, fmtPd(r.pd))
			} else {
				fmt.Fprintf(tw, "%.2f\t%s\t\n", r.snrDB, fmtPd(r.pd))
			}
		}
		if err := tw.Flush(); err != nil {
			return err
		}
		fmt.Fprintf(e.stdout, "\n%s\n", scenarios.RunningEngine())
	}
	if a.html == "" {
		return nil
	}
	curve := server.PdCurve{Name: title}
	for _, r := range rows {
		curve.Points = append(curve.Points, [2]float64{r.x, r.pd})
	}
	page := server.PdPage{Title: title, Lines: lines, Curves: []server.PdCurve{curve}, PdMarked: a.pdRequired,
		XName: "SNR per pulse (dB)", XMarked: &reqDB, XMarkName: fmt.Sprintf("%.2f dB", reqDB)}
	if a.byRange {
		page.XName = "range (m)"
		page.XMarked = coverage
		page.XMarkName = fmt.Sprintf("coverage %.0f m", *coverage)
	}
	return writeFile(a.html, func(w io.Writer) error { return server.WritePdPage(w, page) })
}

// parsePd reads the flags of "pulsewright pd"; every error names the flag,
// its value and the valid range.
func (e *env) parsePd(args []string) (*pdArgs, error) {
	fs := newFlags("pd", e)
	swerling := fs.Int("swerling", 0, "target fluctuation: 0 steady, 1 … 4 Swerling case")
	pulses := fs.Int("pulses", 1, "pulses integrated")
	integ := fs.String("integration", "noncoherent", "noncoherent (sum of detected pulses) or coherent (sum of complex pulses)")
	pfa := fs.Float64("pfa", 1e-6, "false-alarm probability per cell")
	cells := fs.Int("cfar-cells", 0, "reference cells of a CFAR (0: known noise level)")
	rank := fs.Int("os-rank", 0, "ordered-statistic CFAR: rank (1-based) of the reference cell used (0: cell averaging)")
	pdReq := fs.Float64("pd-required", 0.9, "required probability of detection")
	from := fs.Float64("from", math.NaN(), "first SNR in dB (default -5), or first range in m with --ref-range-m")
	to := fs.Float64("to", math.NaN(), "last SNR in dB (default 30), or last range in m (default 2.5 × reference)")
	step := fs.Float64("step", math.NaN(), "SNR step in dB (default 1), or range step in m (default reference / 20)")
	refRange := fs.Float64("ref-range-m", 0, "tabulate Pd against range: the range (m) where the SNR is --ref-snr-db")
	refSNR := fs.Float64("ref-snr-db", math.NaN(), "SNR per pulse (dB) at --ref-range-m")
	asCSV := fs.Bool("csv", false, "write CSV instead of a table")
	html := fs.String("html", "", "also write a self-contained HTML page with the curve")
	unitsText := unitsFlag(fs)
	pos, err := parseFlags(fs, args)
	if err != nil {
		return nil, err
	}
	if len(pos) > 0 {
		return nil, usageError{fmt.Sprintf("pd takes no arguments, got %q", strings.Join(pos, " "))}
	}
	bad := func(flag string, v any, want string) error {
		return usageError{fmt.Sprintf("--%s %v out of range: want %s", flag, v, want)}
	}
	a := &pdArgs{pdRequired: *pdReq, csv: *asCSV, html: *html}
	if a.units, err = parseUnitsFlag(*unitsText, !*asCSV, "it applies to the table; --csv keeps SI"); err != nil {
		return nil, err
	}
	a.det = dsp.Detector{Pfa: *pfa, Pulses: *pulses, Swerling: *swerling, CFARCells: *cells, OSRank: *rank}
	switch *integ {
	case "noncoherent":
	case "coherent":
		a.det.Integration = dsp.Coherent
	default:
		return nil, bad("integration", strconv.Quote(*integ), "noncoherent or coherent")
	}
	switch {
	case *swerling < 0 || *swerling > 4:
		return nil, bad("swerling", *swerling, "0 (steady) … 4")
	case *pulses < 1 || *pulses > dsp.MaxPulses:
		return nil, bad("pulses", *pulses, fmt.Sprintf("1 … %d", dsp.MaxPulses))
	case !(*pfa > 0 && *pfa < 1):
		return nil, bad("pfa", *pfa, "0 < pfa < 1")
	case *cells < 0 || *cells > dsp.MaxCFARCells:
		return nil, bad("cfar-cells", *cells, fmt.Sprintf("0 (known noise) or 1 … %d", dsp.MaxCFARCells))
	case *rank < 0 || *rank > *cells:
		return nil, bad("os-rank", *rank, fmt.Sprintf("0 (cell averaging) or 1 … --cfar-cells (%d)", *cells))
	case !(*pdReq > *pfa && *pdReq < 1):
		return nil, bad("pd-required", *pdReq, fmt.Sprintf("pfa (%g) < pd-required < 1", *pfa))
	}
	if err := a.det.Validate(); err != nil {
		// The remaining combinations: coherent Swerling 4, too few CFAR cells.
		msg := strings.TrimPrefix(err.Error(), "dsp: ")
		msg = strings.NewReplacer("CFARCells", "--cfar-cells", "OSRank", "--os-rank", "Pfa", "--pfa", "Pulses", "--pulses",
			"want Pulses 1 or Coherent integration", "want --pulses 1 or --integration coherent",
			"use NonCoherent or one pulse", "use --integration noncoherent or --pulses 1").Replace(msg)
		return nil, usageError{msg}
	}
	a.byRange = *refRange != 0 || !math.IsNaN(*refSNR)
	if a.byRange {
		if !(*refRange > 0) || math.IsInf(*refRange, 1) {
			return nil, bad("ref-range-m", *refRange, "a finite range > 0 m (with --ref-snr-db)")
		}
		if math.IsNaN(*refSNR) || math.Abs(*refSNR) > 300 {
			return nil, bad("ref-snr-db", *refSNR, "-300 … 300 dB (with --ref-range-m)")
		}
		a.refRange, a.refSNR = *refRange, *refSNR
		a.from, a.to, a.step = orDefault(*from, *refRange/4), orDefault(*to, 2.5**refRange), orDefault(*step, *refRange/20)
		if !(a.from > 0) || math.IsInf(a.from, 1) {
			return nil, bad("from", a.from, "a finite range > 0 m")
		}
	} else {
		a.from, a.to, a.step = orDefault(*from, -5), orDefault(*to, 30), orDefault(*step, 1)
		if math.IsInf(a.from, 0) || math.Abs(a.from) > 300 {
			return nil, bad("from", a.from, "-300 … 300 dB")
		}
		if math.IsInf(a.to, 0) || math.Abs(a.to) > 300 {
			return nil, bad("to", a.to, "-300 … 300 dB")
		}
	}
	switch {
	case math.IsNaN(a.to) || math.IsInf(a.to, 0) || a.to < a.from:
		return nil, bad("to", a.to, fmt.Sprintf("a finite value ≥ --from (%g)", a.from))
	case !(a.step > 0) || math.IsInf(a.step, 1):
		return nil, bad("step", a.step, "a finite value > 0")
	case (a.to-a.from)/a.step+1 > maxPdRows:
		return nil, bad("step", a.step, fmt.Sprintf("≥ %g, at most %d rows from --from %g to --to %g",
			(a.to-a.from)/(maxPdRows-1), maxPdRows, a.from, a.to))
	}
	return a, nil
}

func orDefault(v, def float64) float64 {
	if math.IsNaN(v) {
		return def
	}
	return v
}

// describeDetector names the model, pulses, false-alarm rate and detector.
func describeDetector(d dsp.Detector) string {
	model := "steady target"
	if d.Swerling != dsp.SwerlingNone {
		model = fmt.Sprintf("Swerling %d target", d.Swerling)
	}
	pulses := "1 pulse"
	if d.Pulses > 1 {
		pulses = fmt.Sprintf("%d pulses integrated %s", d.Pulses, d.Integration)
	}
	noise := "known noise level"
	switch {
	case d.OSRank > 0:
		noise = fmt.Sprintf("ordered-statistic CFAR, rank %d of %d cells", d.OSRank, d.CFARCells)
	case d.CFARCells > 0:
		noise = fmt.Sprintf("cell-averaging CFAR over %d cells", d.CFARCells)
	}
	return fmt.Sprintf("Pd of a %s, %s, Pfa %g, %s", model, pulses, d.Pfa, noise)
}

// fmtPd prints a probability with enough digits near 0 and 1.
func fmtPd(p float64) string {
	switch {
	case p < 1e-3:
		return strconv.FormatFloat(p, 'e', 2, 64)
	case p > 0.9999:
		return strconv.FormatFloat(p, 'f', 6, 64)
	}
	return strconv.FormatFloat(p, 'f', 4, 64)
}

func fmtG(v float64, prec int) string { return strconv.FormatFloat(v, 'g', prec+4, 64) }
