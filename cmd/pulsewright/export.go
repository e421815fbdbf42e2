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
	pos, err := parseFlags(fs, args)
	if err != nil {
		return err
	}
	if *sigmf == "" && *csvOut == "" {
		return usageError{"export needs --sigmf BASE and/or --csv FILE"}
	}
	s, err := e.oneScenario("export", pos)
	if err != nil {
		return err
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
