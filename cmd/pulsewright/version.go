package main

import (
	"encoding/json"
	"fmt"

	"github.com/pulsewright/pulsewright/scenarios"
)

// version prints the engine's version and formats: one line, or the
// report's engine object with --format json.
func (e *env) version(args []string) error {
	fs := newFlags("version", e)
	format := fs.String("format", "text", "output format: text (one line) or json (the report's engine object)")
	pos, err := parseFlags(fs, args)
	if err != nil {
		return err
	}
	if len(pos) > 0 {
		return usageError{fmt.Sprintf("version takes no arguments, got %q", pos[0])}
	}
	eng := scenarios.RunningEngine()
	switch *format {
	case "text":
		_, err = fmt.Fprintln(e.stdout, eng)
	case "json":
		enc := json.NewEncoder(e.stdout)
		enc.SetIndent("", "  ")
		err = enc.Encode(eng)
	default:
		return usageError{fmt.Sprintf("--format %q is not text or json", *format)}
	}
	return err
}
