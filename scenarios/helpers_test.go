package scenarios

import "strconv"

// ftoa formats v in the shortest form that reads back exactly; tests of
// several files build JSON with it.
func ftoa(v float64) string { return strconv.FormatFloat(v, 'g', -1, 64) }
