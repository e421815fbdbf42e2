package main

import (
	"fmt"
	"io"
	"os"

	"github.com/pulsewright/pulsewright/scenarios"
)

func (e *env) export(args []string) error {
	fs := newFlags("export", e)
	sigmf := fs.String("sigmf", "", "write the raw receive window as the SigMF recording BASE.sigmf-meta and BASE.sigmf-data (cf32_le)")
	csvOut := fs.String("csv", "", "write the compressed profile as CSV (range_m, profile_db, clean_db, threshold_db)")
	pulse := fs.String("pulse-sigmf", "", "write the transmitted pulse at the scenario's sample rate as the SigMF recording BASE.sigmf-meta and BASE.sigmf-data (cf32_le; pulsewright import reads it)")
	pos, err := parseFlags(fs, args)
	if err != nil {
		return err
	}
	if *sigmf == "" && *csvOut == "" && *pulse == "" {
		return usageError{"export needs --sigmf BASE, --csv FILE and/or --pulse-sigmf BASE"}
	}
	s, err := e.oneScenario("export", pos)
	if err != nil {
		return err
	}
	if *pulse != "" {
		if err := writeSigMFPair(*pulse, func(meta, data io.Writer) error { return scenarios.WritePulseSigMF(meta, data, s) }); err != nil {
			return err
		}
		if *sigmf == "" && *csvOut == "" {
			return nil
		}
	}
	res, err := scenarios.Evaluate(e.ctx, s)
	if err != nil {
		return fmt.Errorf("evaluate: %w", err)
	}
	if *sigmf != "" {
		data, err := os.Create(*sigmf + ".sigmf-data")
		if err != nil {
			return fmt.Errorf("export: %w", err)
		}
		defer data.Close()
		err = writeFile(*sigmf+".sigmf-meta", func(meta io.Writer) error {
			return scenarios.WriteSigMF(meta, data, s, res)
		})
		if err != nil {
			return err
		}
		if err := data.Close(); err != nil {
			return fmt.Errorf("export: %w", err)
		}
	}
	if *csvOut != "" {
		return writeFile(*csvOut, func(w io.Writer) error { return scenarios.WriteProfileCSV(w, res) })
	}
	return nil
}

// writeSigMFPair writes BASE.sigmf-data and BASE.sigmf-meta with write.
func writeSigMFPair(base string, write func(meta, data io.Writer) error) error {
	data, err := os.Create(base + ".sigmf-data")
	if err != nil {
		return fmt.Errorf("export: %w", err)
	}
	defer data.Close()
	if err := writeFile(base+".sigmf-meta", func(meta io.Writer) error { return write(meta, data) }); err != nil {
		return err
	}
	if err := data.Close(); err != nil {
		return fmt.Errorf("export: %w", err)
	}
	return nil
}
