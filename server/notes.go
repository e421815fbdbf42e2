package server

import (
	"strings"

	"github.com/pulsewright/pulsewright/scenarios"
)

// noteParagraphs splits the scenario's notes into paragraphs at blank
// lines; single line breaks inside a paragraph are kept by the page's
// style (white-space: pre-line).
func noteParagraphs(notes string) []string {
	var out []string
	for _, p := range strings.Split(strings.ReplaceAll(notes, "\r\n", "\n"), "\n\n") {
		if p = strings.TrimSpace(p); p != "" {
			out = append(out, p)
		}
	}
	return out
}

// engineLine names the engine that computed the report.
func engineLine(rep *scenarios.Report) string {
	if rep.Engine != nil {
		return rep.Engine.String()
	}
	return scenarios.RunningEngine().String()
}
