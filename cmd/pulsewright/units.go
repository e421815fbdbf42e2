package main

import (
	"flag"
	"fmt"

	"github.com/pulsewright/pulsewright/scenarios"
)

// unitsFlag declares --units on a command that prints text for people.
func unitsFlag(fs *flag.FlagSet) *string {
	return fs.String("units", "", "units of the text output: "+scenarios.UnitsHelp+" (default si: m, m/s, range rate positive when opening)")
}

// parseUnitsFlag reads --units. applies says whether the chosen output
// is text; when it is not, a --units other than SI is refused with why
// (which output takes it, which keeps SI).
func parseUnitsFlag(v string, applies bool, why string) (scenarios.Units, error) {
	u, err := scenarios.ParseUnits(v)
	if err != nil {
		return u, usageError{fmt.Sprintf("--units %q: %v", v, err)}
	}
	if !applies && !u.IsSI() {
		return u, usageError{fmt.Sprintf("--units %q: %s", v, why)}
	}
	return u, nil
}
