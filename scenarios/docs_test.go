package scenarios

import (
	"fmt"
	"go/ast"
	"go/parser"
	"go/token"
	"os"
	"path/filepath"
	"reflect"
	"regexp"
	"slices"
	"sort"
	"strconv"
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
		{"report: integration", reflect.TypeFor[IntegrationReport]()},
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

// TestDecoderReadsOnlyListedFields closes the loop between the decoder's
// code and its field lists, which the tests above compare with the
// documents: the decoder accepts exactly the fields its readers take
// (object.get marks a field used; finish reports the rest as unknown),
// and the lists only name them in messages. So this test reads the
// decoder's source and finds every field name a reader of an *object is
// called with (o.float("pri_s", …), o.child("scan"), o.used["id"], …);
// each must be in a list, so that a field read without being listed —
// accepted but undocumented — fails here. Readers called with a variable
// loop over a list (levelFields, airFields, iqFields) and need no check.
func TestDecoderReadsOnlyListedFields(t *testing.T) {
	listed := map[string]bool{"kind": true, "id": true}
	for _, l := range [][]string{topFields, radarFields, receiverFields, tapsFields, scheduleFields, cpiFields, scanFields,
		frontEndFields, propagationFields, airFields, levelFields, iqFields} {
		for _, f := range l {
			listed[f] = true
		}
	}
	for _, m := range []map[string][]string{waveformFields, windowFields, detectorFields, targetFields} {
		for _, fs := range m {
			for _, f := range fs {
				listed[f] = true
			}
		}
	}
	// The decoder's *object variables: the receiver o, a child c, the
	// document top, a schedule's CPI e (newObject and child in decode.go).
	isObject := func(x ast.Expr) bool {
		id, ok := x.(*ast.Ident)
		return ok && (id.Name == "o" || id.Name == "c" || id.Name == "top" || id.Name == "e")
	}
	readers := map[string]bool{"get": true, "has": true, "float": true, "intIn": true, "int": true, "int64": true, "str": true,
		"kind": true, "require": true, "child": true, "numbers": true, "oneOf": true, "sameLength": true}
	fset := token.NewFileSet()
	files, err := filepath.Glob("*.go")
	if err != nil {
		t.Fatal(err)
	}
	read := map[string]string{} // field → where
	for _, name := range files {
		if strings.HasSuffix(name, "_test.go") {
			continue
		}
		f, err := parser.ParseFile(fset, name, nil, 0)
		if err != nil {
			t.Fatal(err)
		}
		for _, d := range f.Decls {
			fd, ok := d.(*ast.FuncDecl)
			if !ok || fd.Body == nil {
				continue
			}
			ast.Inspect(fd.Body, func(n ast.Node) bool {
				var lit *ast.BasicLit
				switch x := n.(type) {
				case *ast.CallExpr:
					if sel, ok := x.Fun.(*ast.SelectorExpr); ok && readers[sel.Sel.Name] && isObject(sel.X) && len(x.Args) > 0 {
						lit, _ = x.Args[0].(*ast.BasicLit)
					}
				case *ast.IndexExpr: // o.used["id"] = true
					if sel, ok := x.X.(*ast.SelectorExpr); ok && sel.Sel.Name == "used" && isObject(sel.X) {
						lit, _ = x.Index.(*ast.BasicLit)
					}
				}
				if lit != nil && lit.Kind == token.STRING {
					if v, err := strconv.Unquote(lit.Value); err == nil {
						read[v] = fmt.Sprintf("%s (%s)", fset.Position(lit.Pos()), fd.Name.Name)
					}
				}
				return true
			})
		}
	}
	if len(read) < 60 {
		t.Fatalf("found only %d field names read by the decoder: the source scan is broken", len(read))
	}
	for f, where := range read {
		if !listed[f] {
			t.Errorf("the decoder reads %q at %s, but no field list names it (and so no document): add it to its list and to docs/scenario-format.md", f, where)
		}
	}
	for f := range listed {
		if _, ok := read[f]; !ok && !slices.Contains(levelFields, f) && !slices.Contains(airFields, f) && !slices.Contains(iqFields, f) {
			t.Errorf("field %q is listed (and documented) but no reader of the decoder takes it by name", f)
		}
	}
}

// TestReportTablesCoverEveryType: every struct type the report holds has
// its table in docs/report-format.md (listed in
// TestReportFormatDocumentsEveryField), so that a new nested object cannot
// go undocumented by being left out of that list. Embedded structs are
// inlined into their parent's table; Span ({start_m, stop_m}) is
// described in the breakthrough table's `spans` row.
func TestReportTablesCoverEveryType(t *testing.T) {
	covered := map[reflect.Type]bool{
		reflect.TypeFor[Report](): true, reflect.TypeFor[WaveformReport](): true, reflect.TypeFor[TargetReport](): true,
		reflect.TypeFor[EngineInfo](): true, reflect.TypeFor[ScheduleReport](): true, reflect.TypeFor[StaggerReport](): true,
		reflect.TypeFor[CPIReport](): true, reflect.TypeFor[CPITarget](): true, reflect.TypeFor[ScheduleTarget](): true,
		reflect.TypeFor[FalseAlarms](): true, reflect.TypeFor[ClutterSummary](): true, reflect.TypeFor[Breakthrough](): true,
		reflect.TypeFor[ScanReport](): true, reflect.TypeFor[ScanCPI](): true, reflect.TypeFor[IntegrationReport](): true,
		reflect.TypeFor[Span](): true, // inline in the breakthrough table
	}
	seen := map[reflect.Type]bool{}
	var walk func(typ reflect.Type, path string)
	walk = func(typ reflect.Type, path string) {
		for typ.Kind() == reflect.Pointer || typ.Kind() == reflect.Slice || typ.Kind() == reflect.Array || typ.Kind() == reflect.Map {
			typ = typ.Elem()
		}
		if typ.Kind() != reflect.Struct || seen[typ] {
			return
		}
		seen[typ] = true
		for i := range typ.NumField() {
			f := typ.Field(i)
			if !f.IsExported() || f.Tag.Get("json") == "-" {
				continue
			}
			name, _, _ := strings.Cut(f.Tag.Get("json"), ",")
			ft := f.Type
			for ft.Kind() == reflect.Pointer || ft.Kind() == reflect.Slice || ft.Kind() == reflect.Array || ft.Kind() == reflect.Map {
				ft = ft.Elem()
			}
			if f.Anonymous && name == "" {
				walk(ft, path) // inlined into this table
				continue
			}
			if ft.Kind() == reflect.Struct && ft.PkgPath() == typ.PkgPath() && !covered[ft] {
				t.Errorf("report field %s.%s holds %s, which has no table in docs/report-format.md", path, name, ft.Name())
			}
			walk(ft, path+"."+name)
		}
	}
	walk(reflect.TypeFor[Report](), "report")
	if len(seen) < len(covered) {
		t.Errorf("walked %d struct types, fewer than the %d tables: the walk is broken", len(seen), len(covered))
	}
}

// TestNothingPointsOutsideTheRepository: the repository stands alone (issue
// 18): no file of it — code, documents, scripts, CI — refers to a
// specification or a folder beside the clone ("../shared", "shared/spec"),
// which a user who clones the repository does not have. The project's
// docs/ are the format's truth.
func TestNothingPointsOutsideTheRepository(t *testing.T) {
	root := ".."
	bad := regexp.MustCompile(`\.\./shared\b|\bshared/spec\b`)
	files := 0
	err := filepath.WalkDir(root, func(path string, d os.DirEntry, err error) error {
		if err != nil {
			return err
		}
		if d.IsDir() {
			switch d.Name() {
			case ".git", "test-output", "vendor", "node_modules":
				return filepath.SkipDir
			}
			return nil
		}
		info, err := d.Info()
		if err != nil || info.Size() > 4<<20 {
			return err
		}
		data, err := os.ReadFile(path)
		if err != nil {
			return err
		}
		files++
		if path == "../scenarios/docs_test.go" {
			return nil // this test names the patterns
		}
		for i, line := range strings.Split(string(data), "\n") {
			if bad.MatchString(line) {
				t.Errorf("%s:%d points outside the repository: %s", strings.TrimPrefix(path, "../"), i+1, strings.TrimSpace(line))
			}
		}
		return nil
	})
	if err != nil {
		t.Fatal(err)
	}
	if files < 100 {
		t.Errorf("read only %d files from the module root: the walk is broken", files)
	}
}
