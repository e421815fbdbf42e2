package main

import (
	"encoding/json"
	"fmt"
	"math"
	"os"
	"strings"

	"github.com/pulsewright/pulsewright/scenarios"
)

// importSamples reads a SigMF recording or a CSV file of samples and
// prints the scenario with them written in: as its waveform (kind
// "samples") or as its custom receive filter.
func (e *env) importSamples(args []string) error {
	fs := newFlags("import", e)
	into := fs.String("into", "", "the SCENARIO to import into (a file, -, a share link or demo:NAME)")
	as := fs.String("as", "waveform", "what the samples are: waveform (the transmitted pulse) or filter (the receive filter's taps)")
	rate := fs.Float64("rate", 0, "sample rate of the samples in Hz (required for CSV; overrides SigMF's core:sample_rate)")
	band := fs.Float64("bandwidth", 0, "the pulse's nominal bandwidth in Hz (required unless the SigMF file states it)")
	pos, err := parseFlags(fs, args)
	if err != nil {
		return err
	}
	if len(pos) != 1 {
		return usageError{fmt.Sprintf("import takes one FILE (BASE.sigmf-meta, BASE.sigmf-data or a .csv), got %d arguments", len(pos))}
	}
	if *into == "" {
		return usageError{"import needs --into SCENARIO"}
	}
	if *as != "waveform" && *as != "filter" {
		return usageError{fmt.Sprintf("--as %q is not waveform or filter", *as)}
	}
	for _, f := range []struct {
		name string
		v    float64
	}{{"--rate", *rate}, {"--bandwidth", *band}} {
		// 0 (the default) takes the file's own value; the scenario's
		// limits are checked when the pulse is written into it.
		if !(f.v >= 0) || math.IsInf(f.v, 0) {
			return usageError{fmt.Sprintf("%s %g out of range: want a finite value > 0 Hz (or 0, the default: the file's own)", f.name, f.v)}
		}
	}
	rec, err := readRecording(pos[0])
	if err != nil {
		return err
	}
	base, err := e.loadScenario(*into)
	if err != nil {
		return err
	}
	var s *scenarios.Scenario
	if *as == "filter" {
		s, err = scenarios.WithCustomFilter(base, rec, *rate)
	} else {
		s, err = scenarios.WithSamplesWaveform(base, rec, *rate, *band)
	}
	if err != nil {
		return err
	}
	canon, err := scenarios.Canonical(s)
	if err != nil {
		return err
	}
	var doc any
	if err := json.Unmarshal(canon, &doc); err != nil {
		return err
	}
	enc := json.NewEncoder(e.stdout)
	enc.SetIndent("", "  ")
	return enc.Encode(doc)
}

// readRecording reads samples from a SigMF pair (either file's name) or a
// CSV file.
func readRecording(path string) (*scenarios.Recording, error) {
	if base, ok := strings.CutSuffix(path, ".sigmf-meta"); ok || strings.HasSuffix(path, ".sigmf-data") {
		if !ok {
			base = strings.TrimSuffix(path, ".sigmf-data")
		}
		meta, err := os.ReadFile(base + ".sigmf-meta")
		if err != nil {
			return nil, fmt.Errorf("import: %w", err)
		}
		data, err := os.Open(base + ".sigmf-data")
		if err != nil {
			return nil, fmt.Errorf("import: %w", err)
		}
		defer data.Close()
		rec, err := scenarios.ReadSigMF(meta, data)
		if err != nil {
			return nil, fmt.Errorf("import %s: %w", base, err)
		}
		return rec, nil
	}
	f, err := os.Open(path)
	if err != nil {
		return nil, fmt.Errorf("import: %w", err)
	}
	defer f.Close()
	rec, err := scenarios.ReadSamplesCSV(f)
	if err != nil {
		return nil, fmt.Errorf("import %s: %w", path, err)
	}
	return rec, nil
}
