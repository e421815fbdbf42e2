package scenarios

import (
	"encoding/json"
	"fmt"
	"runtime/debug"
	"strings"
	"sync"
)

// EngineInfo names the build of the engine that produced a result, so
// that a number can be traced to the code that computed it. It is read
// from the binary's build information (runtime/debug.ReadBuildInfo): the
// main module's version and the version-control revision the Go tool
// stamps into binaries built inside a repository.
type EngineInfo struct {
	// Version is the main module's version: a release tag (v1.2.0), a
	// pseudo-version of an untagged commit, or "devel" when the build
	// carries none (go test, or a build outside a repository).
	Version string `json:"version"`
	// Commit is the version-control revision, when the build records one.
	Commit string `json:"commit,omitempty"`
	// Modified is true when the working tree had uncommitted changes at
	// build time: the commit alone does not then reproduce the engine.
	Modified bool `json:"modified,omitempty"`
	// ScenarioFormat and ReportFormat are the format versions the engine
	// writes (docs/scenario-format.md, docs/report-format.md).
	ScenarioFormat int `json:"scenario_format"`
	ReportFormat   int `json:"report_format"`
}

// DevelVersion is the engine version of a build that records none.
const DevelVersion = "devel"

var engineOnce = sync.OnceValue(func() EngineInfo {
	bi, _ := debug.ReadBuildInfo()
	return engineFromBuild(bi)
})

// RunningEngine returns the build information of the running engine.
func RunningEngine() EngineInfo { return engineOnce() }

// engineFromBuild reads EngineInfo from build information, which may be
// nil.
func engineFromBuild(bi *debug.BuildInfo) EngineInfo {
	e := EngineInfo{Version: DevelVersion, ScenarioFormat: Version, ReportFormat: ReportVersion}
	if bi == nil {
		return e
	}
	if v := bi.Main.Version; v != "" && v != "(devel)" {
		e.Version = v
	}
	for _, s := range bi.Settings {
		switch s.Key {
		case "vcs.revision":
			e.Commit = s.Value
		case "vcs.modified":
			e.Modified = s.Value == "true"
		}
	}
	return e
}

// String renders the engine for a footer or a comment line:
// "pulsewright v1.2.0 (commit 4bca754b1a2c, modified) · scenario format 1
// · report format 1".
func (e EngineInfo) String() string {
	var b strings.Builder
	b.WriteString("pulsewright " + e.Version)
	if e.Commit != "" {
		c := e.Commit
		if len(c) > 12 {
			c = c[:12]
		}
		b.WriteString(" (commit " + c)
		if e.Modified {
			b.WriteString(", modified")
		}
		b.WriteString(")")
	} else if e.Modified {
		b.WriteString(" (modified)")
	}
	fmt.Fprintf(&b, " · scenario format %d · report format %d", e.ScenarioFormat, e.ReportFormat)
	return b.String()
}

// CSVComment returns the first line of every CSV file the program
// writes: "# " and the running engine's stamp, ending in a newline.
func CSVComment() string { return "# " + RunningEngine().String() + "\n" }

// MarshalJSON writes the report with the engine that produced it: a
// report whose Engine is nil is stamped with the running engine, so every
// report that leaves the program names its engine.
func (r Report) MarshalJSON() ([]byte, error) {
	type plain Report
	if r.Engine == nil {
		e := RunningEngine()
		r.Engine = &e
	}
	return json.Marshal(plain(r))
}
