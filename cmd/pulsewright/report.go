package main

import (
	"fmt"
	"io"
	"strings"

	"github.com/pulsewright/pulsewright/scenarios"
	"github.com/pulsewright/pulsewright/server"
)

func (e *env) report(args []string) error {
	fs := newFlags("report", e)
	out := fs.String("o", "", "the HTML file to write (required)")
	base := fs.String("base", defaultBase, "origin of the workbench the share link opens (scheme://host:port)")
	pos, err := parseFlags(fs, args)
	if err != nil {
		return err
	}
	if *out == "" {
		return usageError{"report needs -o FILE.html"}
	}
	if len(pos) == 1 {
		if err := checkOutputs(pos[0], map[string]string{"-o": *out}); err != nil {
			return err
		}
	}
	s, err := e.oneScenario("report", pos)
	if err != nil {
		return err
	}
	res, err := scenarios.Evaluate(e.ctx, s)
	if err != nil {
		return fmt.Errorf("evaluate: %w", err)
	}
	l, err := scenarios.Link(s)
	if err != nil {
		return err
	}
	link := strings.TrimRight(*base, "/") + l
	return writeFile(*out, func(w io.Writer) error {
		return server.WriteReportPage(w, s, res, link)
	})
}
