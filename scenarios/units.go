package scenarios

import (
	"fmt"
	"math"
	"math/big"
	"regexp"
	"slices"
	"strconv"
	"strings"
	"unicode"
	"unicode/utf8"
)

// Units are the units a person reads ranges, speeds, heights and range
// rates in. Scenario files, links, the JSON report and CSV files keep SI
// and the file's sign convention (a range rate is positive when the range
// grows); text meant for people is written in Units.
//
// The conversions are exact ratios (math/big), rounded once to float64:
//   - 1 nmi = 1852 m: International Hydrographic Conference, Monaco 1929;
//     BIPM, The International System of Units, 9th ed. (2019), Table 8.
//   - 1 kt = 1 nmi/h = 1852/3600 m/s: the same sources.
//   - 1 km/h = 1000/3600 m/s.
//   - 1 ft = 0.3048 m: international yard and pound agreement, 1959.
type Units struct {
	Range  string // "m", "km" or "nmi"
	Speed  string // "m/s", "km/h" or "kt"; also the unit of range rates
	Height string // "m" or "ft"
	Rate   string // "opening" (positive when the range grows, the file's convention) or "closing"
}

// The units of each quantity as exact ratios: one unit is num/den SI
// units (m or m/s).
var (
	rangeRatios  = map[string][2]int64{"m": {1, 1}, "km": {1000, 1}, "nmi": {1852, 1}}
	speedRatios  = map[string][2]int64{"m/s": {1, 1}, "km/h": {1000, 3600}, "kt": {1852, 3600}}
	heightRatios = map[string][2]int64{"m": {1, 1}, "ft": {3048, 10000}}
	conventions  = []string{"opening", "closing"}
	unitSystems  = map[string]Units{
		"si":       {"m", "m/s", "m", "opening"},
		"metric":   {"km", "km/h", "m", "opening"},
		"nautical": {"nmi", "kt", "ft", "opening"},
	}
)

// SIUnits returns metres, m/s and range rates positive when opening: the
// scenario file's own units.
func SIUnits() Units { return unitSystems["si"] }

// UnitsHelp lists what ParseUnits accepts, for flag help and errors.
const UnitsHelp = "a system (si, metric, nautical) and/or units, comma-separated: " +
	"range m|km|nmi, speed m/s|km/h|kt, height m|ft, range rate opening|closing (positive when); " +
	"or key=value (range=nmi, speed=kt, height=ft, rate=closing)"

// ParseUnits reads a units choice: comma-separated items, each a system
// (si, metric = km, km/h, m; nautical = nmi, kt, ft), a unit whose
// quantity it names alone (km, nmi, m/s, km/h, kt, ft; "m" sets range
// and height), a convention (opening, closing), or key=value with key
// range, speed, height or rate. Systems apply first, then the others;
// one quantity given two different units is an error. The empty string
// is SIUnits.
func ParseUnits(s string) (Units, error) {
	u := SIUnits()
	if strings.TrimSpace(s) == "" {
		return u, nil
	}
	set := map[string]string{} // quantity → unit given explicitly
	give := func(item, q, v string) error {
		if old, ok := set[q]; ok && old != v {
			return fmt.Errorf("%q gives the %s unit as %s after %s; give each once", item, q, v, old)
		}
		set[q] = v
		return nil
	}
	items := strings.Split(s, ",")
	// Systems first, so that "kt,metric" and "metric,kt" agree.
	for _, it := range items {
		if sys, ok := unitSystems[strings.ToLower(strings.TrimSpace(it))]; ok {
			u = sys
		}
	}
	for _, raw := range items {
		it := strings.TrimSpace(raw)
		if _, ok := unitSystems[strings.ToLower(it)]; ok {
			continue
		}
		if k, v, ok := strings.Cut(it, "="); ok {
			k, v = strings.TrimSpace(k), strings.TrimSpace(v)
			var valid []string
			switch k {
			case "range":
				valid = unitNames(rangeRatios)
			case "speed":
				valid = unitNames(speedRatios)
			case "height":
				valid = unitNames(heightRatios)
			case "rate":
				valid = conventions
			default:
				return u, fmt.Errorf("%q: %q is not range, speed, height or rate", it, k)
			}
			if !slices.Contains(valid, v) {
				return u, fmt.Errorf("%q: %s unit %q is not one of %s", it, k, v, strings.Join(valid, ", "))
			}
			if err := give(it, k, v); err != nil {
				return u, err
			}
			continue
		}
		var err error
		switch {
		case it == "m":
			if err = give(it, "range", "m"); err == nil {
				err = give(it, "height", "m")
			}
		case it == "km" || it == "nmi":
			err = give(it, "range", it)
		case speedRatios[it] != [2]int64{}:
			err = give(it, "speed", it)
		case it == "ft":
			err = give(it, "height", it)
		case slices.Contains(conventions, it):
			err = give(it, "rate", it)
		default:
			return u, fmt.Errorf("%q is not a unit or system; valid: %s", it, UnitsHelp)
		}
		if err != nil {
			return u, err
		}
	}
	for q, v := range set {
		switch q {
		case "range":
			u.Range = v
		case "speed":
			u.Speed = v
		case "height":
			u.Height = v
		case "rate":
			u.Rate = v
		}
	}
	return u, nil
}

func unitNames(m map[string][2]int64) []string {
	ks := make([]string, 0, len(m))
	for k := range m {
		ks = append(ks, k)
	}
	// Smallest unit first: m, km, nmi; m/s, km/h, kt; ft, m.
	slices.SortFunc(ks, func(a, b string) int {
		ra, rb := m[a], m[b]
		return big.NewRat(ra[0], ra[1]).Cmp(big.NewRat(rb[0], rb[1]))
	})
	return ks
}

// String is the choice as ParseUnits reads it back:
// "range=nmi,speed=kt,height=ft,rate=closing".
func (u Units) String() string {
	return fmt.Sprintf("range=%s,speed=%s,height=%s,rate=%s", u.Range, u.Speed, u.Height, u.Rate)
}

// IsSI reports whether u shows everything as the scenario file holds it.
func (u Units) IsSI() bool { return u == SIUnits() }

// Quantities converted by Units.
const (
	QRange  = "range"  // m
	QSpeed  = "speed"  // m/s, unsigned
	QRate   = "rate"   // m/s, signed: positive opening in SI
	QHeight = "height" // m
)

func (u Units) ratio(q string) [2]int64 {
	switch q {
	case QRange:
		return rangeRatios[u.Range]
	case QSpeed, QRate:
		return speedRatios[u.Speed]
	case QHeight:
		return heightRatios[u.Height]
	}
	panic("scenarios: unknown quantity " + q)
}

// Unit returns the unit symbol of quantity q ("nmi", "kt").
func (u Units) Unit(q string) string {
	switch q {
	case QRange:
		return u.Range
	case QHeight:
		return u.Height
	}
	return u.Speed
}

// Label is the unit of q as a heading shows it; a range rate adds its
// convention ("kt, closing +").
func (u Units) Label(q string) string {
	if q == QRate {
		return u.Speed + ", " + u.Rate + " +"
	}
	return u.Unit(q)
}

func (u Units) sign(q string) int {
	if q == QRate && u.Rate == "closing" {
		return -1
	}
	return 1
}

// FromSI converts an SI value (file convention) of quantity q to u: the
// float64 nearest to the exact product. NaN and ±Inf pass through.
func (u Units) FromSI(q string, v float64) float64 {
	r := u.ratio(q)
	return exactScale(float64(u.sign(q))*v, r[1], r[0])
}

// ToSI converts a value of quantity q in u to SI (file convention).
func (u Units) ToSI(q string, v float64) float64 {
	r := u.ratio(q)
	return exactScale(float64(u.sign(q))*v, r[0], r[1])
}

// Parse reads a number typed in u for quantity q ("12.3", "-1e3") and
// returns the float64 nearest to its exact SI value: "12.3" nmi is the
// double nearest to 22779.6 m, not 12.3 × 1852 rounded twice. The error
// names the text and the unit.
func (u Units) Parse(q, text string) (float64, error) {
	t := strings.TrimSpace(strings.Replace(text, "−", "-", 1))
	x, ok := new(big.Rat).SetString(t)
	if !ok || strings.ContainsAny(t, "/xXpPbBoO_") { // plain decimals only: no fractions, hex, binary or octal
		return 0, fmt.Errorf("%q is not a number in %s", text, u.Unit(q))
	}
	r := u.ratio(q)
	x.Mul(x, big.NewRat(int64(u.sign(q))*r[0], r[1]))
	f, _ := x.Float64()
	if math.IsInf(f, 0) {
		return 0, fmt.Errorf("%q %s is too large", text, u.Unit(q))
	}
	return f, nil
}

// exactScale returns the float64 nearest to v·num/den.
func exactScale(v float64, num, den int64) float64 {
	if num == den || math.IsNaN(v) || math.IsInf(v, 0) {
		return v
	}
	x := new(big.Rat).SetFloat64(v)
	x.Mul(x, big.NewRat(num, den))
	f, _ := x.Float64()
	return f
}

// decimalsIn is how many decimals a value in unit s needs for the
// precision `decimals` gives it in m or m/s (1e-4 nmi is 0.19 m; km/h,
// kt and ft are finer than m/s and m already).
func decimalsIn(s string, decimals int) int {
	switch s {
	case "km":
		decimals += 3
	case "nmi":
		decimals += 4
	}
	return max(decimals, 0)
}

// Number formats an SI value of quantity q in u with as many decimals
// as `decimals` would give in m or m/s, without the unit; never "-0".
func (u Units) Number(q string, v float64, decimals int) string {
	t := strconv.FormatFloat(u.FromSI(q, v), 'f', decimalsIn(u.Unit(q), decimals), 64)
	if strings.Trim(t, "-0.") == "" {
		return strings.TrimPrefix(t, "-")
	}
	return t
}

// Format is Number with the unit: "3.4017 nmi".
func (u Units) Format(q string, v float64, decimals int) string {
	return u.Number(q, v, decimals) + " " + u.Unit(q)
}

// Signed formats a range rate (SI, file convention) in u with an
// explicit sign: "+9.7 kt".
func (u Units) Signed(v float64, decimals int) string {
	t := u.Number(QRate, v, decimals)
	if !strings.HasPrefix(t, "-") && strings.Trim(t, "0.") != "" {
		t = "+" + t
	}
	return t + " " + u.Speed
}

// siInText finds numbers written in SI in a sentence: a range in m or
// km, a speed in m/s. The engine writes a range rate with an explicit
// sign ("%+.1f m/s") and an unsigned speed (a spread, a blind speed)
// without one.
// A span "1000–2000 m" is one unit for both ends.
var siInText = regexp.MustCompile(`([+\-−±]?)(?:(\d+(?:\.\d+)?)–)?(\d+(?:\.\d+)?(?:e[+-]?\d+)?) ?(km|m/s|m)`)

// Typed holds the values of a scenario a person types in Units (SI,
// the file's sign convention): ranges in m, range rates in m/s, heights
// in m. RestateTyped reads them back as typed.
type Typed struct {
	Range, Rate, Height []float64
}

// TypedIn lists s's typed ranges (targets' ranges and edges, the receive
// window), range rates and heights (targets', the antenna's).
func TypedIn(s *Scenario) Typed {
	var t Typed
	if s == nil {
		return t
	}
	t.Range = append(t.Range, s.Radar.WindowStartM, s.Radar.WindowStopM)
	t.Height = append(t.Height, s.Radar.AntennaHeightM)
	for _, g := range s.Targets {
		t.Range = append(t.Range, g.RangeM, g.RangeStartM, g.RangeStopM)
		t.Rate = append(t.Rate, g.RangeRateMPS)
		t.Height = append(t.Height, g.HeightM)
	}
	return t
}

// snap returns the value of vals nearest to v when the engine's rounding
// of it could have written v: within half the resolution res of the
// text. A rounded figure converted to another unit claims a precision it
// lacks ("18518.15 km" is 9999.0011 nmi, but the 9999 nmi typed wrote
// it); the typed value it came from reads back as typed.
func snap(vals []float64, v, res float64, abs bool) (float64, bool) {
	best, found := 0.0, false
	for _, x := range vals {
		if abs {
			x = math.Abs(x)
		}
		if x == 0 || math.IsNaN(x) || math.Abs(x-v) > res/2*(1+1e-9) {
			continue
		}
		if !found || math.Abs(x-v) < math.Abs(best-v) {
			best, found = x, true
		}
	}
	return best, found
}

// typedText is a value in the user's unit as a field shows it: up to 12
// significant digits, so that a value typed in that unit reads back as
// typed ("9999", "12.5"); never "-0".
func typedText(v float64) string {
	r, _ := strconv.ParseFloat(strconv.FormatFloat(v, 'g', 12, 64), 64)
	if r == 0 {
		return "0"
	}
	return strconv.FormatFloat(r, 'f', -1, 64)
}

// readBack is the number text (no unit) of the value of vals that v,
// with resolution res, was rounded from (snap), in u's unit of q, when
// there is one and it has no more decimals than the restatement would
// give v (`decimals` in m or m/s): a value typed in that unit ("9999",
// "12.5") reads back as typed; one typed in another unit (25 m/s is
// 48.596112311 kt) keeps the ordinary rounding.
func (u Units) readBack(q string, vals []float64, v, res float64, abs bool, decimals int) (string, bool) {
	x, ok := snap(vals, v, res, abs)
	if !ok {
		return "", false
	}
	t := typedText(u.FromSI(q, x))
	_, frac, _ := strings.Cut(t, ".")
	if len(frac) > decimalsIn(u.Unit(q), decimals) {
		return "", false
	}
	return t, true
}

// resolution is the step of the last digit of a number as the engine
// wrote it ("18518.15" → 0.01, "1.5e3" → 100).
func resolution(digits string) float64 {
	mant, exp, _ := strings.Cut(digits, "e")
	e, _ := strconv.Atoi(exp)
	_, frac, _ := strings.Cut(mant, ".")
	return math.Pow10(e - len(frac))
}

// Restate rewrites the SI numbers of a sentence the engine wrote (a
// reason, a warning) in u, keeping their precision; a signed range rate
// also takes u's sign convention. Text in SI units comes back unchanged.
// A height ("914 m high") is restated in u's height unit.
func (u Units) Restate(s string) string { return u.RestateTyped(s, Typed{}) }

// RestateTyped is Restate that reads a number back as the value of typed
// (TypedIn) it was rounded from, when there is one: with range units nmi
// a target typed as 9999 nmi, which the engine writes "18518.15 km",
// reads "9999 nmi", not "9999.0011 nmi".
func (u Units) RestateTyped(s string, typed Typed) string {
	if u.Range == "m" && u.Speed == "m/s" && u.Rate == "opening" && u.Height == "m" {
		return s
	}
	var sb strings.Builder
	last := 0
	for _, m := range siInText.FindAllStringSubmatchIndex(s, -1) {
		end := m[1]
		if next, _ := utf8.DecodeRuneInString(s[end:]); end < len(s) && (unicode.IsLetter(next) || unicode.IsDigit(next) || next == '/' || next == '²' || next == '³') {
			continue // "ms", "m²", "m/s" read as "m"
		}
		if m[0] > 0 {
			if prev, _ := utf8.DecodeLastRuneInString(s[:m[0]]); unicode.IsLetter(prev) || unicode.IsDigit(prev) || prev == '.' {
				continue // part of a longer token
			}
		}
		sg, digits, unit := s[m[2]:m[3]], s[m[6]:m[7]], s[m[8]:m[9]]
		v, err := strconv.ParseFloat(digits, 64)
		if err != nil {
			continue
		}
		if m[4] >= 0 { // a span: both ends in the range unit
			if unit == "m/s" || u.Range == "m" {
				continue
			}
			from := s[m[4]:m[5]]
			a, _ := strconv.ParseFloat(from, 64)
			k, d := 1.0, len(fracDigits(digits))
			if unit == "km" {
				k, d = 1000, max(d-3, 0)
			}
			side := func(v float64, res string) string {
				if t, ok := u.readBack(QRange, typed.Range, v*k, resolution(res)*k, false, d); ok {
					return t
				}
				return u.Number(QRange, v*k, d)
			}
			sb.WriteString(s[last:m[0]])
			sb.WriteString(sg + side(a, from) + "–" + side(v, digits) + " " + u.Range)
			last = end
			continue
		}
		decimals := len(fracDigits(digits))
		res := resolution(digits)
		var out string
		switch {
		case unit == "m/s":
			if u.Speed == "m/s" && u.Rate == "opening" {
				continue
			}
			if sg == "+" || sg == "-" || sg == "−" {
				if sg != "+" {
					v = -v
				}
				if t, ok := u.readBack(QRate, typed.Rate, v, res, false, decimals); ok {
					if !strings.HasPrefix(t, "-") {
						t = "+" + t
					}
					out = t + " " + u.Speed
				} else {
					out = u.Signed(v, decimals)
				}
			} else if t, ok := u.readBack(QSpeed, typed.Rate, v, res, true, decimals); ok {
				out = sg + t + " " + u.Speed
			} else {
				out = sg + u.Format(QSpeed, v, decimals)
			}
		case unit == "m" && strings.HasPrefix(s[end:], " high"):
			if u.Height == "m" {
				continue
			}
			if t, ok := u.readBack(QHeight, typed.Height, v, res, false, decimals); ok {
				out = sg + t + " " + u.Height
			} else {
				out = sg + u.Format(QHeight, v, decimals)
			}
		case u.Range == "m":
			continue // the engine's own choice between m and km stays
		default:
			k, d := 1.0, decimals
			if unit == "km" {
				k, d = 1000, max(decimals-3, 0)
			}
			if t, ok := u.readBack(QRange, typed.Range, v*k, res*k, false, d); ok {
				out = sg + t + " " + u.Range
			} else {
				out = sg + u.Format(QRange, v*k, d)
			}
		}
		sb.WriteString(s[last:m[0]])
		sb.WriteString(out)
		last = end
	}
	sb.WriteString(s[last:])
	return sb.String()
}

// distance formats a range for a summary line: in metres, the engine's
// own choice of m or km (km from 1 km); otherwise in u's range unit.
func (u Units) distance(v float64) string {
	if u.Range == "m" {
		return km(v)
	}
	t := u.Number(QRange, v, 0)
	if strings.Contains(t, ".") {
		t = strings.TrimRight(strings.TrimRight(t, "0"), ".")
	}
	return t + " " + u.Range
}

// fracDigits returns the decimals of a number written as "12.34" or
// "1.5e3" ("34", "5").
func fracDigits(digits string) string {
	_, frac, _ := strings.Cut(strings.SplitN(digits, "e", 2)[0], ".")
	return frac
}
