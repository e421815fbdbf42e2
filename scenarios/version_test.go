package scenarios

import (
	"encoding/json"
	"runtime/debug"
	"strings"
	"testing"
)

func TestEngineFromBuild(t *testing.T) {
	for _, c := range []struct {
		name string
		bi   *debug.BuildInfo
		want EngineInfo
		str  string
	}{
		{"no build info", nil, EngineInfo{Version: "devel"}, "pulsewright devel · scenario format 3 · report format 3"},
		{"go test", &debug.BuildInfo{Main: debug.Module{Version: "(devel)"}}, EngineInfo{Version: "devel"}, "pulsewright devel · "},
		{"release", &debug.BuildInfo{Main: debug.Module{Version: "v1.4.0"}, Settings: []debug.BuildSetting{
			{Key: "vcs.revision", Value: "4bca754b1a2c3d4e5f60718293a4b5c6d7e8f901"}, {Key: "vcs.modified", Value: "false"}}},
			EngineInfo{Version: "v1.4.0", Commit: "4bca754b1a2c3d4e5f60718293a4b5c6d7e8f901"}, "pulsewright v1.4.0 (commit 4bca754b1a2c) · "},
		{"modified tree", &debug.BuildInfo{Main: debug.Module{Version: "v0.0.0-20261202021500-4bca754b1a2c+dirty"}, Settings: []debug.BuildSetting{
			{Key: "vcs.revision", Value: "4bca754b1a2c"}, {Key: "vcs.modified", Value: "true"}}},
			EngineInfo{Version: "v0.0.0-20261202021500-4bca754b1a2c+dirty", Commit: "4bca754b1a2c", Modified: true}, "(commit 4bca754b1a2c, modified) · "},
	} {
		t.Run(c.name, func(t *testing.T) {
			got := engineFromBuild(c.bi)
			c.want.ScenarioFormat, c.want.ReportFormat = Version, ReportVersion
			if got != c.want {
				t.Errorf("got %+v, want %+v", got, c.want)
			}
			if !strings.Contains(got.String(), c.str) {
				t.Errorf("String() = %q, want it to hold %q", got.String(), c.str)
			}
		})
	}
}

// TestReportNamesEngine: every encoded report carries the engine, and a
// report decoded from JSON keeps the engine it was written with.
func TestReportNamesEngine(t *testing.T) {
	res := mustEvaluate(t, mustDecode(t, `{"version":2,"waveform":{"kind":"barker","length":13,"chip_s":1e-6}}`))
	b, err := json.Marshal(res.Report)
	if err != nil {
		t.Fatal(err)
	}
	var back Report
	if err := json.Unmarshal(b, &back); err != nil {
		t.Fatal(err)
	}
	if back.Engine == nil || *back.Engine != RunningEngine() || back.Engine.Version == "" {
		t.Fatalf("engine %+v in %s", back.Engine, b)
	}
	old := EngineInfo{Version: "v0.9.0", ScenarioFormat: 1, ReportFormat: 1}
	back.Engine = &old
	b2, _ := json.Marshal(&back)
	if !strings.Contains(string(b2), `"engine":{"version":"v0.9.0","scenario_format":1,"report_format":1}`) {
		t.Errorf("a report keeps its own engine: %s", b2)
	}
}
