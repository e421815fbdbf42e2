package main

import (
	"fmt"
	"io"

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
	if len(pos) == 1 {
		outs := map[string]string{"--csv": *csvOut}
		if *sigmf != "" {
			outs["--sigmf (meta)"], outs["--sigmf (data)"] = *sigmf+".sigmf-meta", *sigmf+".sigmf-data"
		}
		if *pulse != "" {
			outs["--pulse-sigmf (meta)"], outs["--pulse-sigmf (data)"] = *pulse+".sigmf-meta", *pulse+".sigmf-data"
		}
		if err := checkOutputs(pos[0], outs); err != nil {
			return err
		}
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
		data, err := createOut(*sigmf + ".sigmf-data")
		if err != nil {
			return fmt.Errorf("export: %w", err)
		}
		defer data.Abort() // after Commit, a no-op
		err = writeFile(*sigmf+".sigmf-meta", func(meta io.Writer) error {
			if err := scenarios.WriteSigMF(meta, data, s, res); err != nil {
				return err
			}
			// The data goes in place before its metadata, which names it.
			return data.Commit()
		})
		if err != nil {
			return err
		}
	}
	if *csvOut != "" {
		return writeFile(*csvOut, func(w io.Writer) error { return scenarios.WriteProfileCSV(w, res) })
	}
	return nil
}

// writeSigMFPair writes BASE.sigmf-data and BASE.sigmf-meta with write,
// each atomically, the data in place before the metadata that names it.
func writeSigMFPair(base string, write func(meta, data io.Writer) error) error {
	data, err := createOut(base + ".sigmf-data")
	if err != nil {
		return fmt.Errorf("export: %w", err)
	}
	defer data.Abort() // after Commit, a no-op
	return writeFile(base+".sigmf-meta", func(meta io.Writer) error {
		if err := write(meta, data); err != nil {
			return err
		}
		return data.Commit()
	})
}
