package scenarios

import (
	"embed"
	"fmt"
	"io/fs"
	"path"
	"sort"
	"strings"
)

//go:embed demos/*.json
var demoFS embed.FS

// Demo is a built-in scenario.
type Demo struct {
	Name     string    `json:"name"`  // short name, used as demo:NAME
	Title    string    `json:"title"` // the scenario's name field
	Summary  string    `json:"summary"`
	Scenario *Scenario `json:"-"`
}

// DefaultDemo is the scene the workbench opens on.
const DefaultDemo = "harbour-skiff"

// Demos returns the built-in scenarios sorted by name. Each call decodes
// them afresh, so callers may change what they get.
func Demos() ([]Demo, error) {
	entries, err := fs.ReadDir(demoFS, "demos")
	if err != nil {
		return nil, err
	}
	var out []Demo
	for _, e := range entries {
		name := strings.TrimSuffix(e.Name(), ".json")
		d, err := LoadDemo(name)
		if err != nil {
			return nil, err
		}
		out = append(out, d)
	}
	sort.Slice(out, func(i, j int) bool { return out[i].Name < out[j].Name })
	return out, nil
}

// LoadDemo returns one built-in scenario by name; an unknown name gives an
// error wrapping ErrNotFound that lists the known names.
func LoadDemo(name string) (Demo, error) {
	data, err := demoFS.ReadFile(path.Join("demos", name+".json"))
	if err != nil || strings.ContainsAny(name, "/.\\") {
		return Demo{}, fmt.Errorf("demo %q: %w (known: %s)", name, ErrNotFound, strings.Join(demoNames(), ", "))
	}
	s, err := Decode(data)
	if err != nil {
		return Demo{}, fmt.Errorf("demo %q: %w", name, err)
	}
	summary := s.Notes
	if i := strings.Index(summary, ". "); i > 0 {
		summary = summary[:i+1]
	}
	return Demo{Name: name, Title: s.Name, Summary: summary, Scenario: s}, nil
}

func demoNames() []string {
	entries, _ := fs.ReadDir(demoFS, "demos")
	names := make([]string, len(entries))
	for i, e := range entries {
		names[i] = strings.TrimSuffix(e.Name(), ".json")
	}
	return names
}
