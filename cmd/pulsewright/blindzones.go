package main

import (
	"flag"
	"fmt"
	"io"
	"strconv"
	"strings"

	"github.com/pulsewright/pulsewright/scenarios"
)

// blindzones prints the blind-zones map of a PRF schedule given on the
// command line.
func (e *env) blindzones(args []string) error {
	fs := newFlags("blindzones", e)
	pri := fs.String("pri", "", "PRIs of the schedule's CPIs, s, comma-separated (1e-3,1.1e-3)")
	pulses := fs.String("pulses", "16", "pulses per CPI: one count, or one per PRI, comma-separated")
	tau := fs.Float64("tau", 0, "transmitted pulse width, s")
	carrier := fs.Float64("carrier", 0, "carrier frequency, Hz")
	m := fs.Int("m", 0, "CPIs that must see a target (M-of-N); 0: all")
	rng := fs.String("range", "", "ranges to map, MIN:MAX in m, or in the --units range unit (default 0 to the longest PRI's unambiguous range × 2)")
	rate := fs.String("rate", "", "range rates to map, ± this many m/s, or in the --units speed unit (default 1000 m/s)")
	cells := fs.String("cells", "100x40", "map size, RANGExRATE cells")
	eclipse := fs.Float64("eclipse", 0.5, "a target is eclipsed when this fraction of its echo or more overlaps a transmit pulse")
	format := fs.String("format", "table", "output: table (characters), csv (one row per cell) or html (a self-contained page)")
	out := fs.String("o", "", "write to this file instead of standard output")
	unitsText := unitsFlag(fs)
	pos, err := parseFlags(fs, args)
	if err != nil {
		return err
	}
	if len(pos) > 1 {
		return usageError{fmt.Sprintf("blindzones takes at most one SCENARIO, got %d arguments", len(pos))}
	}
	if *format != "table" && *format != "csv" && *format != "html" {
		return usageError{fmt.Sprintf("--format %q is not table, csv or html", *format)}
	}
	u, err := parseUnitsFlag(*unitsText, *format == "table", "it applies to --format table; csv and html keep SI")
	if err != nil {
		return err
	}
	spec := scenarios.BlindZoneSpec{PulseS: *tau, CarrierHz: *carrier, M: *m, EclipseFraction: *eclipse}
	if *rate != "" {
		v, err := u.Parse(scenarios.QSpeed, *rate)
		if err != nil {
			return usageError{fmt.Sprintf("--rate: %v", err)}
		}
		spec.RateMaxMPS = v
	}
	if len(pos) == 1 {
		// The scenario's schedule (or its one CPI), pulse and carrier.
		for _, f := range []string{"pri", "pulses", "tau", "carrier", "m"} {
			if set(fs, f) {
				return usageError{fmt.Sprintf("--%s is taken from the scenario %s; give a scenario or the schedule's flags, not both", f, pos[0])}
			}
		}
		s, err := e.loadScenario(pos[0])
		if err != nil {
			return err
		}
		spec.PulseS, spec.CarrierHz = s.Waveform.PulseWidth(), s.Radar.CarrierHz
		spec.PRIs, spec.Pulses = []float64{s.Radar.PRIS}, []int{s.Radar.Pulses}
		staggers := [][]float64{s.Radar.PRIStaggerS}
		if sc := s.Radar.Schedule; sc != nil {
			for _, c := range sc.CPIs {
				spec.PRIs, spec.Pulses = append(spec.PRIs, c.PRIS), append(spec.Pulses, c.Pulses)
				staggers = append(staggers, c.PRIStaggerS)
			}
			spec.M = sc.M
		}
		for _, p := range staggers {
			if len(p) > 0 {
				spec.Staggers = staggers
			}
		}
	} else {
		if spec.PRIs, err = floatList("--pri", *pri); err != nil {
			return err
		}
		p, err := floatList("--pulses", *pulses)
		if err != nil {
			return err
		}
		for _, v := range p {
			if v != float64(int(v)) {
				return usageError{fmt.Sprintf("--pulses: %g is not a whole number", v)}
			}
			spec.Pulses = append(spec.Pulses, int(v))
		}
	}
	if _, err := fmt.Sscanf(*cells, "%dx%d", &spec.RangeCells, &spec.RateCells); err != nil {
		return usageError{fmt.Sprintf("--cells %q is not RANGExRATE (100x40)", *cells)}
	}
	if *rng == "" {
		longest := 0.0
		for _, v := range spec.PRIs {
			longest = max(longest, v)
		}
		spec.RangeMinM, spec.RangeMaxM = 0, 2*299792458*longest/2
	} else {
		lo, hi, ok := strings.Cut(*rng, ":")
		a, err1 := u.Parse(scenarios.QRange, lo)
		b, err2 := u.Parse(scenarios.QRange, hi)
		if !ok || err1 != nil || err2 != nil {
			return usageError{fmt.Sprintf("--range %q is not MIN:MAX in %s", *rng, u.Range)}
		}
		spec.RangeMinM, spec.RangeMaxM = a, b
	}
	if *rate == "" {
		spec.RateMaxMPS = 1000
	}
	if *eclipse == 0 {
		return usageError{"--eclipse 0 would mark every range eclipsed; give a fraction in (0, 1]"}
	}
	b, err := scenarios.BlindZones(spec)
	if err != nil {
		return err
	}
	write := func(w io.Writer) error {
		switch *format {
		case "csv":
			return b.WriteCSV(w)
		case "html":
			return b.WriteHTML(w)
		}
		return b.WriteTextIn(w, u)
	}
	if *out != "" {
		return writeFile(*out, write)
	}
	return write(e.stdout)
}

// floatList parses a comma-separated list of numbers.
func floatList(flag, s string) ([]float64, error) {
	if strings.TrimSpace(s) == "" {
		return nil, usageError{flag + " is required"}
	}
	var out []float64
	for _, f := range strings.Split(s, ",") {
		v, err := strconv.ParseFloat(strings.TrimSpace(f), 64)
		if err != nil {
			return nil, usageError{fmt.Sprintf("%s: %q is not a number", flag, f)}
		}
		out = append(out, v)
	}
	return out, nil
}

// set reports whether flag name was given on the command line.
func set(fs *flag.FlagSet, name string) bool {
	found := false
	fs.Visit(func(f *flag.Flag) { found = found || f.Name == name })
	return found
}
