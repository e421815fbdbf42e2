package main

import (
	"fmt"
	"io"
	"os"
	"strings"

	"github.com/pulsewright/pulsewright/scenarios"
)

// loadScenario reads a scenario from the one form every subcommand takes:
// "-" (standard input), "demo:NAME", a share link (a URL or fragment with
// "#s=", or "s=…"), or a file path.
func (e *env) loadScenario(ref string) (*scenarios.Scenario, error) {
	switch {
	case ref == "-":
		s, err := scenarios.Read(e.stdin)
		if err != nil {
			return nil, fmt.Errorf("standard input: %w", err)
		}
		return s, nil
	case strings.HasPrefix(ref, "demo:"):
		d, err := scenarios.LoadDemo(strings.TrimPrefix(ref, "demo:"))
		if err != nil {
			return nil, err
		}
		return d.Scenario, nil
	case scenarios.IsLink(ref):
		return scenarios.ParseLink(ref)
	}
	f, err := os.Open(ref)
	if err != nil {
		return nil, fmt.Errorf("open scenario: %w", err)
	}
	defer f.Close()
	s, err := scenarios.Read(io.Reader(f))
	if err != nil {
		return nil, fmt.Errorf("scenario %s: %w", ref, err)
	}
	return s, nil
}

// oneScenario parses a subcommand's flags and loads its one SCENARIO
// argument.
func (e *env) oneScenario(name string, args []string) (*scenarios.Scenario, error) {
	if len(args) != 1 {
		return nil, usageError{fmt.Sprintf("%s takes one SCENARIO (a file, -, a share link or demo:NAME), got %d arguments", name, len(args))}
	}
	return e.loadScenario(args[0])
}
