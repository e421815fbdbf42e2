package scenarios

import (
	"fmt"
	"math"
	"math/rand/v2"
	"strings"
	"testing"
)

// The conversions against their exact definitions:
//   - 1 nmi = 1852 m (International Hydrographic Conference, Monaco 1929;
//     BIPM SI Brochure, 9th ed. 2019, Table 8);
//   - 1 kt = 1852/3600 m/s (the same sources: one nautical mile per hour);
//   - 1 km/h = 1000/3600 m/s (the definition of the kilometre and hour);
//   - 1 ft = 0.3048 m (international yard and pound agreement, 1959).
//
// Each SI value below is the definition worked by hand; a float64 check
// wants the double nearest to the exact value (Go's constant arithmetic
// is exact, so 1852.0/3600 is that double).
func TestUnitsExactDefinitions(t *testing.T) {
	nmi := Units{"nmi", "kt", "ft", "opening"}
	metric := Units{"km", "km/h", "m", "opening"}
	cases := []struct {
		name   string
		u      Units
		q      string
		v      float64 // in u
		siWant float64
	}{
		{"1 nmi", nmi, QRange, 1, 1852},
		{"12.5 nmi", nmi, QRange, 12.5, 23150},
		{"1 km", metric, QRange, 1, 1000},
		{"1 kt", nmi, QSpeed, 1, 1852.0 / 3600},
		{"10 kt", nmi, QSpeed, 10, 18520.0 / 3600},
		{"30 kt", nmi, QSpeed, 30, 15.433333333333333333},
		{"3.6 km/h", metric, QSpeed, 3.6, 1},
		{"100 km/h", metric, QSpeed, 100, 100000.0 / 3600},
		{"1 ft", nmi, QHeight, 1, 0.3048},
		{"1000 ft", nmi, QHeight, 1000, 304.8},
		{"10000 ft", nmi, QHeight, 10000, 3048},
		{"1 m height", metric, QHeight, 1, 1},
		{"-10 kt opening", nmi, QRate, -10, -18520.0 / 3600},
		{"10 kt closing", Units{"nmi", "kt", "ft", "closing"}, QRate, 10, -18520.0 / 3600},
		{"-3.6 km/h closing", Units{"km", "km/h", "m", "closing"}, QRate, -3.6, 1},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			if got := c.u.ToSI(c.q, c.v); got != c.siWant {
				t.Errorf("ToSI(%s, %v) = %.17g, want %.17g", c.q, c.v, got, c.siWant)
			}
			if got := c.u.FromSI(c.q, c.siWant); math.Abs(got-c.v) > 2e-16*math.Abs(c.v) {
				t.Errorf("FromSI(%s, %.17g) = %.17g, want %v", c.q, c.siWant, got, c.v)
			}
		})
	}
	// Typed decimals are exact before the one rounding: 12.3 nmi is the
	// double nearest to 22779.6 m (12.3 × 1852), 0.1 nmi nearest to 185.2.
	for _, c := range []struct {
		u    Units
		q    string
		text string
		want float64
	}{
		{nmi, QRange, "12.3", 22779.6}, {nmi, QRange, "0.1", 185.2}, {nmi, QRange, "−3", -5556},
		{nmi, QSpeed, "10", 18520.0 / 3600}, {nmi, QHeight, "1e3", 304.8},
		{Units{"nmi", "kt", "ft", "closing"}, QRate, "12", -12 * 1852.0 / 3600},
	} {
		got, err := c.u.Parse(c.q, c.text)
		if err != nil || got != c.want {
			t.Errorf("Parse(%s, %q) = %.17g, %v; want %.17g", c.q, c.text, got, err, c.want)
		}
	}
	for _, text := range []string{"12x", "1/2", "", "0x10", "0b11", "0o7", "1_000", "Inf", "1e400"} {
		if v, err := nmi.Parse(QRange, text); err == nil {
			t.Errorf("Parse(range, %q) = %v, want an error", text, v)
		}
	}
	// Exact powers: no rounding at all.
	if got := nmi.FromSI(QRange, 1852*7); got != 7 {
		t.Errorf("7·1852 m = %v nmi, want 7", got)
	}
	if got := nmi.FromSI(QHeight, 3048); got != 10000 {
		t.Errorf("3048 m = %v ft, want 10000", got)
	}
}

// A value goes to a unit and back to the same double, or the next one
// (two roundings), for every unit.
func TestUnitsRoundTrip(t *testing.T) {
	rng := rand.New(rand.NewPCG(1, 1))
	all := []Units{{"km", "km/h", "ft", "closing"}, {"nmi", "kt", "ft", "opening"}, SIUnits()}
	for _, u := range all {
		for _, q := range []string{QRange, QSpeed, QRate, QHeight} {
			for range 1000 {
				v := (rng.Float64() - 0.5) * math.Pow(10, float64(rng.IntN(12)-3))
				back := u.ToSI(q, u.FromSI(q, v))
				if math.Abs(back-v) > 2*math.Abs(v)*0x1p-52 {
					t.Fatalf("%v %s: %.17g → %.17g", u, q, v, back)
				}
			}
		}
	}
}

func TestParseUnits(t *testing.T) {
	cases := []struct {
		in   string
		want Units
	}{
		{"", SIUnits()},
		{"si", SIUnits()},
		{"km,kt", Units{"km", "kt", "m", "opening"}},
		{"nautical", Units{"nmi", "kt", "ft", "opening"}},
		{"nautical,closing", Units{"nmi", "kt", "ft", "closing"}},
		{"m/s,nautical", Units{"nmi", "m/s", "ft", "opening"}}, // the system first, then the unit
		{"metric", Units{"km", "km/h", "m", "opening"}},
		{"nautical, m", Units{"m", "kt", "m", "opening"}},
		{"range=nmi,speed=km/h,height=ft,rate=closing", Units{"nmi", "km/h", "ft", "closing"}},
		{"kt,kt", Units{"m", "kt", "m", "opening"}},
	}
	for _, c := range cases {
		got, err := ParseUnits(c.in)
		if err != nil || got != c.want {
			t.Errorf("ParseUnits(%q) = %v, %v; want %v", c.in, got, err, c.want)
		}
		if again, err := ParseUnits(got.String()); err != nil || again != got {
			t.Errorf("ParseUnits(%q) = %v, %v; want %v back", got.String(), again, err, got)
		}
	}
	bad := []struct{ in, says string }{
		{"km,xx", `"xx" is not a unit or system; valid: `},
		{"furlongs", `"furlongs" is not a unit or system`},
		{"km,nmi", `gives the range unit as nmi after km`},
		{"range=mi", `range unit "mi" is not one of m, km, nmi`},
		{"speed=kt,kt/h", `"kt/h" is not a unit`},
		{"depth=m", `"depth" is not range, speed, height or rate`},
		{"rate=up", `rate unit "up" is not one of opening, closing`},
	}
	for _, c := range bad {
		_, err := ParseUnits(c.in)
		if err == nil || !strings.Contains(err.Error(), c.says) {
			t.Errorf("ParseUnits(%q) error = %v, want it to say %q", c.in, err, c.says)
		}
	}
}

func TestUnitsFormatAndRestate(t *testing.T) {
	u := Units{"nmi", "kt", "ft", "closing"}
	if got := u.Format(QRange, 6300, 1); got != "3.40173 nmi" {
		t.Errorf("Format 6300 m = %q", got)
	}
	if got := u.Signed(-2, 1); got != "+3.9 kt" { // 2 m/s closing = 3.887… kt
		t.Errorf("Signed(-2 m/s) closing = %q, want +3.9 kt", got)
	}
	if got := u.Signed(0, 1); got != "0.0 kt" {
		t.Errorf("Signed(0) = %q, want 0.0 kt", got)
	}
	in := "only 3.2 m apart, inside the 87.8 m resolution, at 12.34 km; at -5.0 m/s it sits 3 bins from x (+12.0 m/s); blind speed 30.0 m/s; ±39.82 m/s; 10 dBsm; 3 ms; 20 µs; 5 m² and 10 MHz"
	want := "only 0.00173 nmi apart, inside the 0.04741 nmi resolution, at 6.6631 nmi; at +9.7 kt it sits 3 bins from x (-23.3 kt); blind speed 58.3 kt; ±77.40 kt; 10 dBsm; 3 ms; 20 µs; 5 m² and 10 MHz"
	if got := u.Restate(in); got != want {
		t.Errorf("Restate:\n got %s\nwant %s", got, want)
	}
	// A span takes the unit once, for both ends: 1852–3704 m is 1–2 nmi.
	if got := u.Restate("cells over 1852–3704 m and 12.3–12.9 km"); got != "cells over 1.0000–2.0000 nmi and 6.6415–6.9654 nmi" {
		t.Errorf("Restate spans = %q", got)
	}
	if got := SIUnits().Restate(in); got != in {
		t.Errorf("Restate in SI changed the text: %s", got)
	}
	// Metres kept, knots asked: only speeds change.
	if got := (Units{"m", "kt", "m", "opening"}).Restate("at 12.34 km, -5.0 m/s"); got != "at 12.34 km, -9.7 kt" {
		t.Errorf("Restate m,kt = %q", got)
	}
}

// TestRestateTyped: a value the user typed reads back as typed in a
// sentence the engine wrote from it, though the engine rounded it first
// (km(): 10 m; "%+.1f m/s"; "%.0f m high"). Converting the rounded figure
// gave false precision: 9999 nmi typed, "18518.15 km" written, "9999.0011
// nmi" read. The conversions are exact ratios (1 nmi = 1852 m, 1 kt =
// 1852/3600 m/s, 1 ft = 0.3048 m; see Units); the expected strings are
// the typed text.
func TestRestateTyped(t *testing.T) {
	naut := Units{"nmi", "kt", "ft", "opening"}
	metric := Units{"km", "km/h", "m", "closing"}
	parse := func(u Units, q, text string) float64 {
		v, err := u.Parse(q, text)
		if err != nil {
			t.Fatal(err)
		}
		return v
	}
	s := &Scenario{Radar: Radar{AntennaHeightM: parse(naut, QHeight, "60"), WindowStartM: 1000, WindowStopM: parse(metric, QRange, "7.3")}}
	s.Targets = []Target{
		{ID: "far", RangeM: parse(naut, QRange, "9999"), RangeRateMPS: parse(naut, QRate, "12.5"), HeightM: parse(naut, QHeight, "3000")},
		{ID: "near", RangeM: parse(metric, QRange, "7.3"), RangeRateMPS: parse(metric, QRate, "30")},
	}
	typed := TypedIn(s)
	far, near := s.Targets[0], s.Targets[1]
	// The engine's own wording and rounding (reason.go, horizon.go, train.go).
	text := fmt.Sprintf("at %s it lies beyond the horizon of an antenna %.0f m high and a target %.0f m high; at %+.1f m/s, folded to %s",
		km(far.RangeM), s.Radar.AntennaHeightM, far.HeightM, far.RangeRateMPS, km(1234.5))
	if text != "at 18518.15 km it lies beyond the horizon of an antenna 18 m high and a target 914 m high; at +6.4 m/s, folded to 1.23 km" {
		t.Fatalf("engine text changed: %s", text)
	}
	// 1.23 km was not typed: it keeps the precision it had (0.01 km is
	// 10 m, shown to 1e-4 nmi as before).
	want := "at 9999 nmi it lies beyond the horizon of an antenna 60 ft high and a target 3000 ft high; at +12.5 kt, folded to 0.6641 nmi"
	if got := naut.RestateTyped(text, typed); got != want {
		t.Errorf("nautical:\n got %s\nwant %s", got, want)
	}
	if got := naut.Restate(text); got == want || !strings.Contains(got, "9999.0011 nmi") {
		t.Errorf("without the typed values the rounded figure is converted as it was: %s", got)
	}
	// km and km/h (closing positive): 7.3 km typed, "7.30 km" written.
	text = fmt.Sprintf("at %s, %+.1f m/s; window %s–%s", km(near.RangeM), near.RangeRateMPS, km(s.Radar.WindowStartM), km(s.Radar.WindowStopM))
	want = "at 7.3 km, +30 km/h; window 1 km–7.3 km" // 30 km/h typed closing is -8.33 m/s in the file
	if got := metric.RestateTyped(text, typed); got != want {
		t.Errorf("metric:\n got %s\nwant %s", got, want)
	}
	// SI units: the text is untouched, typed values or not.
	if got := SIUnits().RestateTyped(text, typed); got != text {
		t.Errorf("SI changed the text: %s", got)
	}
	// Metres for range, m/s opening, but feet for height: only the height changes.
	if got := (Units{"m", "m/s", "ft", "opening"}).RestateTyped("a target 914 m high at 18518.15 km", typed); got != "a target 3000 ft high at 18518.15 km" {
		t.Errorf("m, m/s, ft: %s", got)
	}
	// A value typed in another unit is not read back to 12 digits: 25 m/s
	// is 48.596112311 kt; "+25.0 m/s" reads "+48.6 kt" as before.
	if got := naut.RestateTyped("at +25.0 m/s", Typed{Rate: []float64{25}}); got != "at +48.6 kt" {
		t.Errorf("typed in m/s, read in kt: %s", got)
	}
	// A number that no typed value rounds to keeps the old restatement:
	// 18518.16 km is not 9999 nmi.
	if got := naut.RestateTyped("at 18518.16 km", typed); got != "at 9999.0065 nmi" {
		t.Errorf("untyped: %s", got)
	}
}
