package scenarios

import (
	"os"
	"reflect"
	"regexp"
	"slices"
	"sort"
	"strings"
	"testing"
)

// The format documents under docs/ mark each table the decoder depends on
// with an HTML comment: "<!-- fields: NAME -->" before a table whose first
// column names one field per row, "<!-- kinds: NAME -->" before a table
// whose first column names a kind and whose second lists that kind's
// fields, and "<!-- report: NAME -->" before a table of report fields.
// These tests compare those tables with the decoder's own field lists and
// the report's JSON tags, so that a field added to one is added to the
// other.

var (
	docMarker = regexp.MustCompile(`^<!-- (fields|kinds|report): ([a-z_]+) -->$`)
	backticks = regexp.MustCompile("`([^`]+)`")
)

// docTables returns, for each marker "TYPE: NAME" of the document, the
// rows of the table that follows it, each row split into its cells.
func docTables(t *testing.T, path string) map[string][][]string {
	t.Helper()
	data, err := os.ReadFile(path)
	if err != nil {
		t.Fatalf("read %s: %v", path, err)
	}
	out := map[string][][]string{}
	lines := strings.Split(string(data), "\n")
	for i := 0; i < len(lines); i++ {
		m := docMarker.FindStringSubmatch(strings.TrimSpace(lines[i]))
		if m == nil {
			continue
		}
		key := m[1] + ": " + m[2]
		if _, dup := out[key]; dup {
			t.Fatalf("%s: marker %q appears twice", path, key)
		}
		var rows [][]string
		j := i + 1
		for ; j < len(lines) && strings.HasPrefix(lines[j], "|"); j++ {
			if j < i+3 {
				continue // the header and the separator
			}
			cells := strings.Split(strings.Trim(strings.TrimSpace(lines[j]), "|"), "|")
			for k := range cells {
				cells[k] = strings.TrimSpace(cells[k])
			}
			rows = append(rows, cells)
		}
		if len(rows) == 0 {
			t.Fatalf("%s:%d: marker %q is not followed by a table", path, i+1, key)
		}
		out[key] = rows
		i = j - 1
	}
	return out
}

// names returns the backticked names of a cell.
func names(cell string) []string {
	var out []string
	for _, m := range backticks.FindAllStringSubmatch(cell, -1) {
		out = append(out, m[1])
	}
	return out
}

// firstNames returns the set of names in the first column of a table.
func firstNames(t *testing.T, rows [][]string) []string {
	t.Helper()
	seen := map[string]bool{}
	for _, r := range rows {
		n := names(r[0])
		if len(n) != 1 {
			t.Errorf("row %q: the first cell must name exactly one field or kind in backticks", strings.Join(r, " | "))
			continue
		}
		seen[n[0]] = true
	}
	return sortedKeys(seen)
}

func sortedKeys(m map[string]bool) []string {
	out := make([]string, 0, len(m))
	for k := range m {
		out = append(out, k)
	}
	sort.Strings(out)
	return out
}

func sorted(s []string) []string {
	s = slices.Clone(s)
	sort.Strings(s)
	return slices.Compact(s)
}

// sameSet reports the differences between the documented and the
// accepted names.
func sameSet(t *testing.T, what string, documented, accepted []string) {
	t.Helper()
	documented, accepted = sorted(documented), sorted(accepted)
	for _, d := range documented {
		if !slices.Contains(accepted, d) {
			t.Errorf("%s: %q is documented but the decoder does not accept it", what, d)
		}
	}
	for _, a := range accepted {
		if !slices.Contains(documented, a) {
			t.Errorf("%s: %q is accepted by the decoder but not documented", what, a)
		}
	}
}

// kindFieldsUnion lists every field of every kind, with the fields every
// kind has.
func kindFieldsUnion(m map[string][]string, common ...string) []string {
	out := slices.Clone(common)
	for _, fs := range m {
		out = append(out, fs...)
	}
	return out
}

func TestScenarioFormatDocumentsEveryField(t *testing.T) {
	tables := docTables(t, "../docs/scenario-format.md")
	table := func(key string) [][]string {
		rows, ok := tables[key]
		if !ok {
			t.Fatalf("docs/scenario-format.md has no table marked %q", key)
		}
		return rows
	}
	sameSet(t, "top level", firstNames(t, table("fields: top")), topFields)
	sameSet(t, "radar", firstNames(t, table("fields: radar")), radarFields)
	sameSet(t, "receiver", firstNames(t, table("fields: receiver")), receiverFields)
	sameSet(t, "receiver.taps", firstNames(t, table("fields: taps")), tapsFields)
	sameSet(t, "radar.schedule", firstNames(t, table("fields: schedule")), scheduleFields)
	sameSet(t, "radar.schedule.cpis", firstNames(t, table("fields: cpi")), cpiFields)
	sameSet(t, "radar.scan", firstNames(t, table("fields: scan")), scanFields)
	sameSet(t, "front_end", firstNames(t, table("fields: frontend")), frontEndFields)
	sameSet(t, "propagation", firstNames(t, table("fields: propagation")), propagationFields)

	kinds := []struct {
		name   string
		kinds  []string
		fields map[string][]string
		common []string
	}{
		{"waveform", waveformKinds, waveformFields, []string{"kind"}},
		{"window", windowKinds, windowFields, []string{"kind"}},
		{"detector", detectorKinds, detectorFields, []string{"kind"}},
		{"target", targetKinds, targetFields, []string{"id", "kind"}},
	}
	for _, k := range kinds {
		rows := table("kinds: " + k.name)
		sameSet(t, k.name+" kinds", firstNames(t, rows), k.kinds)
		for _, r := range rows {
			kind := names(r[0])
			if len(kind) != 1 || len(r) < 2 {
				continue
			}
			got := names(r[1])
			if !slices.Equal(got, k.fields[kind[0]]) && !(len(got) == 0 && len(k.fields[kind[0]]) == 0) {
				t.Errorf("%s kind %q: documented fields %v, the decoder reads %v (in this order)", k.name, kind[0], got, k.fields[kind[0]])
			}
		}
		sameSet(t, k.name+" fields", firstNames(t, table("fields: "+k.name)), kindFieldsUnion(k.fields, k.common...))
	}
}

// jsonNames lists the JSON names of a struct type's fields.
func jsonNames(typ reflect.Type) []string {
	var out []string
	for i := range typ.NumField() {
		if f := typ.Field(i); f.Anonymous && f.Tag.Get("json") == "" {
			out = append(out, jsonNames(f.Type)...) // embedded: its fields are inlined
			continue
		}
		tag := typ.Field(i).Tag.Get("json")
		name, _, _ := strings.Cut(tag, ",")
		if name != "" && name != "-" {
			out = append(out, name)
		}
	}
	return out
}

func TestReportFormatDocumentsEveryField(t *testing.T) {
	tables := docTables(t, "../docs/report-format.md")
	for _, c := range []struct {
		key string
		typ reflect.Type
	}{
		{"report: top", reflect.TypeFor[Report]()},
		{"report: waveform", reflect.TypeFor[WaveformReport]()},
		{"report: target", reflect.TypeFor[TargetReport]()},
		{"report: engine", reflect.TypeFor[EngineInfo]()},
		{"report: schedule", reflect.TypeFor[ScheduleReport]()},
		{"report: stagger", reflect.TypeFor[StaggerReport]()},
		{"report: cpi", reflect.TypeFor[CPIReport]()},
		{"report: cpitarget", reflect.TypeFor[CPITarget]()},
		{"report: scheduletarget", reflect.TypeFor[ScheduleTarget]()},
		{"report: false_alarms", reflect.TypeFor[FalseAlarms]()},
		{"report: clutter", reflect.TypeFor[ClutterSummary]()},
		{"report: breakthrough", reflect.TypeFor[Breakthrough]()},
		{"report: scan", reflect.TypeFor[ScanReport]()},
		{"report: scancpi", reflect.TypeFor[ScanCPI]()},
	} {
		rows, ok := tables[c.key]
		if !ok {
			t.Fatalf("docs/report-format.md has no table marked %q", c.key)
		}
		sameSet(t, c.key, firstNames(t, rows), jsonNames(c.typ))
	}
}

// TestDocsMarkersParse guards the parser itself: a table it cannot read
// would make the tests above pass vacuously.
func TestDocsMarkersParse(t *testing.T) {
	tables := docTables(t, "../docs/scenario-format.md")
	if n := len(tables["fields: radar"]); n != len(radarFields) {
		t.Errorf("radar table: parsed %d rows, want %d", n, len(radarFields))
	}
	if got := names("`a`, `b` and `c`"); !slices.Equal(got, []string{"a", "b", "c"}) {
		t.Errorf("names: %v", got)
	}
}
