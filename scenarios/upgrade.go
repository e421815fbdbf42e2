package scenarios

import (
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
// Version 1 is the first version, so there are none yet.
var formatUpgrades = map[int]upgrade{}

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
