package scenarios

import (
	"context"
	"encoding/json"
	"fmt"
	"sort"
	"strconv"
	"strings"
)

// Older format versions.
//
// A document of an older version is not rejected: Decode brings it to the
// current version step by step, each step an upgrade from version v to
// v+1 that renames or maps fields and status names in the generic JSON
// document, then reads the result as a current document. Each step
// returns one sentence per change that a user should hear of (a field
// whose meaning moved, a verdict the new rules decide differently); they
// end up in Scenario.Upgraded.
//
// To add version N+1: raise Version, write upgradeN (version N to N+1),
// add it to formatUpgrades, keep a version N file and link under
// testdata/formats/vN, and say what changed in CHANGELOG.md and
// docs/scenario-format.md.

// upgrade brings a generic JSON document (objects as map[string]any,
// numbers as json.Number) from one format version to the next, in place.
type upgrade func(doc map[string]any) (notes []string, err error)

// formatUpgrades maps each older version v to its upgrade to v+1.
var formatUpgrades = map[int]upgrade{1: upgrade1, 2: upgrade2}

// upgrade1 reads a version 1 scenario as version 2. No field of a
// scenario changed name or meaning; what changed is how the report
// decides statuses (docs/scenario-format.md, "Versions and older
// documents"): on Pd at receiver.detector.pd_required (0.9 unless set)
// rather than on the noise-free peak against the threshold, with
// below_noise renamed too_weak and a folded echo inside the window
// reported as folded. A scenario carries no status, so there is none to
// map here; the evaluation of a scenario read from version 1 names each
// target whose verdict the new rules change (report warnings, and
// UpgradeNotes).
func upgrade1(doc map[string]any) ([]string, error) {
	req := "0.9, the default"
	if r, ok := doc["receiver"].(map[string]any); ok {
		if d, ok := r["detector"].(map[string]any); ok {
			if v, ok := d["pd_required"].(json.Number); ok {
				req = v.String()
			}
		}
	}
	notes := []string{fmt.Sprintf("statuses are now decided on the probability of detection at receiver.detector.pd_required (%s) rather than on the noise-free peak against the threshold; below_noise is now called too_weak, and a folded echo inside the window is folded rather than out_of_window", req)}
	return append(notes, roleNotes(doc)...), nil
}

// readsAsCurrent lists the older versions whose documents Decode reads
// directly as the current version, without the generic round trip of
// upgradeDocument (which costs memory in proportion to the document):
// their upgrade changes nothing but refusing the fields added since,
// which Decode checks itself. Their upgrade function stays in
// formatUpgrades for the chain from older versions.
var readsAsCurrent = map[int]bool{2: true}

// upgrade2 reads a version 2 scenario as version 3. Version 3 added
// receiver.integration (coherent or noncoherent; docs/scenario-format.md);
// a version 2 document integrates a pulse train coherently, the default,
// so nothing changes name or meaning and there is nothing to tell. A
// version 2 document that already carries receiver.integration is
// refused: the field does not exist in version 2.
func upgrade2(doc map[string]any) ([]string, error) {
	if r, ok := doc["receiver"].(map[string]any); ok {
		if _, ok := r["integration"]; ok {
			return nil, fmt.Errorf("receiver.integration was added in format version 3: set \"version\": 3 to use it")
		}
	}
	return nil, nil
}

// UpgradeNotes returns what a user should hear of a scenario read from an
// older format version: its upgrade notes (Scenario.Upgraded) and, for a
// version 1 document, one sentence per target whose status the version 2
// rules decide differently, naming the target, its old and its new
// verdict. It analyses the scenario (without plot series) only when the
// document was of version 1; nil for a current document.
func UpgradeNotes(ctx context.Context, s *Scenario) ([]string, error) {
	if s.ReadVersion == 0 {
		return nil, nil
	}
	notes := append([]string(nil), s.Upgraded...)
	if s.ReadVersion != 1 {
		return notes, nil
	}
	rep, err := Analyse(ctx, s)
	if err != nil {
		return notes, err
	}
	for _, w := range rep.Warnings {
		if strings.Contains(w, v1Marker) {
			notes = append(notes, w)
		}
	}
	return notes, nil
}

// v1Marker is the words that open every verdict-change warning.
const v1Marker = "read from a format version 1 document"

// supportedVersions returns the versions that Decode reads with these
// upgrades, ascending: Version and every v whose chain of upgrades reaches
// it.
func supportedVersions(upgrades map[int]upgrade) []int {
	out := []int{Version}
	for v := Version - 1; upgrades[v] != nil; v-- {
		out = append(out, v)
	}
	sort.Ints(out)
	return out
}

func joinInts(vs []int) string {
	s := make([]string, len(vs))
	for i, v := range vs {
		s[i] = strconv.Itoa(v)
	}
	return strings.Join(s, ", ")
}

// upgradeDocument brings the document data of version from to Version
// and returns it as JSON, with the notes of every step.
func upgradeDocument(data []byte, from int, upgrades map[int]upgrade) ([]byte, []string, error) {
	g, err := decodeGeneric(data)
	if err != nil {
		return nil, nil, err
	}
	doc, ok := g.(map[string]any)
	if !ok {
		return nil, nil, fmt.Errorf("the document is not a JSON object")
	}
	var notes []string
	for v := from; v < Version; v++ {
		up := upgrades[v]
		if up == nil {
			return nil, nil, fmt.Errorf("version %d documents cannot be read (supported versions: %s)", from, joinInts(supportedVersions(upgrades)))
		}
		n, err := up(doc)
		if err != nil {
			return nil, nil, fmt.Errorf("reading version %d as %d: %w", v, v+1, err)
		}
		notes = append(notes, n...)
	}
	doc["version"] = Version
	out, err := json.Marshal(doc)
	if err != nil {
		return nil, nil, err
	}
	return out, notes, nil
}

// v1Names maps the statuses that format version 2 renamed or split to
// their version 1 names.
var v1Names = map[string]string{StatusTooWeak: "below_noise", StatusFolded: "out_of_window"}

// v1Name returns the version 1 name of a status.
func v1Name(status string) string {
	if n, ok := v1Names[status]; ok {
		return n
	}
	return status
}

// verdictChange is the warning for a target of a scenario read from a
// format version 1 document whose verdict version 2 decides differently.
func verdictChange(old string, v verdict, tr TargetReport, req float64) string {
	why := ""
	switch {
	case v.status == StatusFolded:
		why = ": a folded echo inside the window now has a status of its own"
	case v.status == StatusClutter:
		why = clutterChange
	case v.rule == rulePd && v.sceneOK:
		why = fmt.Sprintf(": Pd %s in the scene against the required %g (version 1 compared the noise-free peak with the threshold)", PdText(v.pdScene), req)
	case v.rule == rulePd:
		why = fmt.Sprintf(": Pd %s against noise alone, required %g (version 1 compared the noise-free peak with the threshold)", PdText(v.pdNoise), req)
	}
	return fmt.Sprintf("%s, whose rules called it %s; version 2 calls it %s%s.", v1Marker, old, tr.Status, why)
}
