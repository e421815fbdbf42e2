package dsp

import (
	"math"
	"math/cmplx"
	"slices"
	"strings"
	"testing"
)

// Sources: R-pN = Richards, Fundamentals of Radar Signal Processing, 2nd
// ed., McGraw-Hill 2014, page N of one electronic edition (search the book
// for the quoted words). "computed" = an independent numpy computation
// from the published definition.

const codeTol = 1e-9

func TestBarker(t *testing.T) {
	// Codes: R-p304 and Wikipedia "Barker code".
	// PSLR = 20log10(1/N): R-p304 (formula).
	// ISL two-sided: computed.
	tests := []struct {
		n      int
		code   string
		pslrDB float64
		isl    float64
	}{
		{2, "+-", -6.02, 2},
		{3, "++-", -9.54, 2},
		{4, "++-+", -12.04, 4},
		{5, "+++-+", -13.98, 4},
		{7, "+++--+-", -16.90, 6},
		{11, "+++---+--+-", -20.83, 10},
		{13, "+++++--++-+-+", -22.28, 12},
	}
	for _, tc := range tests {
		ph, err := Barker(tc.n)
		if err != nil {
			t.Fatalf("Barker(%d): %v", tc.n, err)
		}
		want, _ := BinaryPhases(tc.code)
		if !slices.Equal(ph, want) {
			t.Errorf("Barker(%d) = %v, want %s", tc.n, ph, tc.code)
		}
		if got := CodePSL(ph); math.Abs(got-1) > codeTol {
			t.Errorf("Barker(%d) PSL = %v, want 1", tc.n, got)
		}
		if got := CodePSLRDB(ph); math.Abs(got-tc.pslrDB) > 0.01 {
			t.Errorf("Barker(%d) PSLR = %.3f dB, want %.2f", tc.n, got, tc.pslrDB)
		}
		if got := CodeISL(ph); math.Abs(got-tc.isl) > codeTol {
			t.Errorf("Barker(%d) ISL = %v, want %v", tc.n, got, tc.isl)
		}
	}
	for _, n := range []int{0, 1, 6, 8, 12, 14, -3} {
		if _, err := Barker(n); err == nil || !strings.Contains(err.Error(), "2, 3, 4, 5, 7, 11, 13") {
			t.Errorf("Barker(%d) error = %v, want the valid set named", n, err)
		}
	}
}

func TestBarkerMeritAndNested(t *testing.T) {
	// Merit factor F = N²/(2Σ_{k≥1} r_k²) = N²/ISL: Golay (14.08 for
	// Barker-13, from memory); the others computed.
	for _, tc := range []struct {
		n int
		f float64
	}{{13, 14.083}, {11, 12.100}, {7, 8.167}, {5, 6.250}} {
		ph, _ := Barker(tc.n)
		if got := float64(tc.n*tc.n) / CodeISL(ph); math.Abs(got-tc.f) > 0.001 {
			t.Errorf("Barker-%d merit factor %.4f, want %.3f", tc.n, got, tc.f)
		}
	}
	// Nested B4⊗B5 (outer Barker-4, each chip carrying Barker-5), N = 20:
	// PSL 5, PSLR −12.04 dB (R-p307).
	b4, _ := Barker(4)
	b5, _ := Barker(5)
	var nested []float64
	for _, o := range b4 {
		for _, i := range b5 {
			nested = append(nested, o+i)
		}
	}
	if got := CodePSL(nested); math.Abs(got-5) > codeTol {
		t.Errorf("B4⊗B5 PSL = %v, want 5", got)
	}
	if got := CodePSLRDB(nested); math.Abs(got+12.04) > 0.01 {
		t.Errorf("B4⊗B5 PSLR = %.3f dB, want −12.04", got)
	}
}

func TestBarker13ACF(t *testing.T) {
	// R-p305: lags 0…12 of Barker-13 are 13,0,1,0,1,…
	ph, _ := Barker(13)
	r := CodeACF(nil, ph)
	want := []float64{13, 0, 1, 0, 1, 0, 1, 0, 1, 0, 1, 0, 1}
	for k, v := range r {
		if cmplx.Abs(v-complex(want[k], 0)) > codeTol {
			t.Errorf("r[%d] = %v, want %v", k, v, want[k])
		}
	}
}

func TestHexPhases(t *testing.T) {
	// Barker hex (computed from the codes above; MSB = first chip, bit 1 → +1):
	// 7: 72; 11: 712; 13: 1F35.
	for _, tc := range []struct {
		hex string
		n   int
	}{{"72", 7}, {"712", 11}, {"1F35", 13}, {"1f35", 13}} {
		got, err := HexPhases(tc.hex, tc.n)
		if err != nil {
			t.Fatal(err)
		}
		want, _ := Barker(tc.n)
		if !slices.Equal(got, want) {
			t.Errorf("HexPhases(%q, %d) = %v, want Barker-%d", tc.hex, tc.n, got, tc.n)
		}
	}
	for _, tc := range []struct {
		hex string
		n   int
	}{{"3F35", 13}, {"1F3", 13}, {"1G35", 13}, {"", 0}} {
		if _, err := HexPhases(tc.hex, tc.n); err == nil {
			t.Errorf("HexPhases(%q, %d): no error", tc.hex, tc.n)
		}
	}
}

func TestBinaryPhases(t *testing.T) {
	got, err := BinaryPhases("+−- +")
	if err != nil || !slices.Equal(got, []float64{0, math.Pi, math.Pi, 0}) {
		t.Errorf("BinaryPhases = %v, %v", got, err)
	}
	for _, s := range []string{"", "+x-", "10"} {
		if _, err := BinaryPhases(s); err == nil {
			t.Errorf("BinaryPhases(%q): no error", s)
		}
	}
}

// publishedMPSPSL is the optimal peak sidelobe of binary codes by length:
// R-p309 citing Keel 2010, and Coxson & Russo, IEEE TAES 41(1), 2005
// (from memory).
func publishedMPSPSL(n int) int {
	switch {
	case slices.Contains([]int{2, 3, 4, 5, 7, 11, 13}, n):
		return 1
	case n <= 21 || n == 25 || n == 28:
		return 2
	case n <= 48 || n == 51:
		return 3
	case n <= 82:
		return 4
	}
	return 5
}

func TestMPS(t *testing.T) {
	if MPSMaxLen() < 40 {
		t.Errorf("MPSMaxLen() = %d, want ≥ 40", MPSMaxLen())
	}
	for n := 2; n <= MPSMaxLen(); n++ {
		ph, err := MPS(n)
		if err != nil {
			t.Fatalf("MPS(%d): %v", n, err)
		}
		if len(ph) != n {
			t.Fatalf("MPS(%d) has %d chips", n, len(ph))
		}
		_, stored, _ := mpsCode(n)
		got := CodePSL(ph)
		if want := float64(publishedMPSPSL(n)); math.Abs(got-want) > codeTol || stored != int(want) {
			t.Errorf("MPS(%d) PSL = %v (stored %d), published optimum %v", n, got, stored, want)
		}
	}
	for _, n := range []int{0, 1, MPSMaxLen() + 1} {
		if _, err := MPS(n); err == nil {
			t.Errorf("MPS(%d): no error", n)
		}
	}
}

func TestMPSExampleCodes(t *testing.T) {
	// Example codes found by a separate, independent search (not copied
	// from a book): their PSL is the published optimum, which the
	// stored code of the same length must match.
	for _, tc := range []struct {
		hex    string
		n, psl int
	}{
		{"3E6B", 14, 2}, {"F15B", 16, 2}, {"FB2B1", 20, 2}, {"1C1129", 21, 2},
		{"3EE697", 22, 3}, {"1CE0549", 25, 2}, {"E702A49", 28, 2},
		{"FE49CF57", 32, 3}, {"3F98E9A97", 34, 3},
	} {
		ph, err := HexPhases(tc.hex, tc.n)
		if err != nil {
			t.Fatal(err)
		}
		mps, _ := MPS(tc.n)
		if a, b := CodePSL(ph), CodePSL(mps); a != float64(tc.psl) || b != a {
			t.Errorf("N=%d: example PSL %v, MPS PSL %v, want %d", tc.n, a, b, tc.psl)
		}
	}
}

func TestFrankPhasesM4(t *testing.T) {
	// Frank, IEEE Trans. IT-9, 1963 (and R-p311 eq. 4.138): Frank M=4 in
	// units of π/2: 0000 0123 0202 0321.
	ph, err := Frank(16)
	if err != nil {
		t.Fatal(err)
	}
	want := []int{0, 0, 0, 0, 0, 1, 2, 3, 0, 2, 0, 2, 0, 3, 2, 1}
	for i, p := range ph {
		if !samePhase(p, float64(want[i])*math.Pi/2) {
			t.Errorf("chip %d: %v rad, want %d·π/2", i, p, want[i])
		}
	}
}

// samePhase reports whether exp(ja) = exp(jb) to within codeTol.
func samePhase(a, b float64) bool {
	return cmplx.Abs(phasor(a)-phasor(b)) < codeTol
}

func TestPolyphasePSLR(t *testing.T) {
	// Values computed from the published formulas (Lewis & Kretschmer,
	// IEEE TAES AES-17(3) 1981 and AES-18(5) 1982; Frank 1963; Chu, IEEE
	// Trans. IT-18, 1972); Frank N=16 also R-p311 "−21.1 dB"; Frank closed form
	// 20log10(1/(N sin(π/M))) from Principles of Modern Radar (secondary).
	type gen func(int) ([]float64, error)
	zc1 := func(n int) ([]float64, error) { return ZadoffChu(n, 1) }
	tests := []struct {
		name string
		f    gen
		n    int
		db   float64
	}{
		{"Frank", Frank, 16, -21.07}, {"Frank", Frank, 64, -27.78}, {"Frank", Frank, 100, -29.80}, {"Frank", Frank, 256, -33.97},
		{"P1", P1, 16, -21.07}, {"P1", P1, 64, -27.78}, {"P1", P1, 100, -29.80},
		{"P2", P2, 16, -21.07}, {"P2", P2, 64, -27.78}, {"P2", P2, 100, -29.80},
		{"P3", P3, 16, -18.75}, {"P3", P3, 20, -19.27}, {"P3", P3, 64, -24.36}, {"P3", P3, 100, -26.32}, {"P3", P3, 1000, -36.37},
		{"P4", P4, 16, -18.75}, {"P4", P4, 20, -19.27}, {"P4", P4, 64, -24.36}, {"P4", P4, 100, -26.32}, {"P4", P4, 1000, -36.37},
		{"ZC", zc1, 63, -24.30}, {"ZC", zc1, 64, -24.36}, {"ZC", zc1, 101, -26.37},
	}
	for _, tc := range tests {
		ph, err := tc.f(tc.n)
		if err != nil {
			t.Fatalf("%s(%d): %v", tc.name, tc.n, err)
		}
		if got := CodePSLRDB(ph); math.Abs(got-tc.db) > 0.01 {
			t.Errorf("%s(%d) PSLR = %.3f dB, want %.2f", tc.name, tc.n, got, tc.db)
		}
	}
	// Frank closed form, exact for even M (odd M = 3, 5 give lower PSL).
	for _, m := range []int{2, 4, 6, 8, 10, 16} {
		ph, _ := Frank(m * m)
		want := 20 * math.Log10(1/(float64(m*m)*math.Sin(math.Pi/float64(m))))
		if got := CodePSLRDB(ph); math.Abs(got-want) > 1e-9 {
			t.Errorf("Frank(%d) PSLR = %.6f dB, closed form %.6f", m*m, got, want)
		}
	}
	// ISLR, computed from the same formulas: P2 M=4, 8, 10: −10.04, −13.05, −14.00 dB;
	// P3/P4 N=64, 100: −11.06, −12.01 dB.
	for _, tc := range []struct {
		name string
		f    gen
		n    int
		db   float64
	}{{"P2", P2, 16, -10.04}, {"P2", P2, 64, -13.05}, {"P2", P2, 100, -14.00}, {"P3", P3, 64, -11.06}, {"P4", P4, 100, -12.01}} {
		ph, _ := tc.f(tc.n)
		got := 10 * math.Log10(CodeISL(ph)/float64(tc.n*tc.n))
		if math.Abs(got-tc.db) > 0.01 {
			t.Errorf("%s(%d) ISLR = %.3f dB, want %.2f", tc.name, tc.n, got, tc.db)
		}
	}
}

func TestPolyphaseErrors(t *testing.T) {
	for _, tc := range []struct {
		name string
		err  error
	}{
		{"Frank(15)", second(Frank(15))}, {"Frank(1)", second(Frank(1))}, {"P1(10)", second(P1(10))},
		{"P2(9)", second(P2(9))}, {"P2(25)", second(P2(25))}, {"P3(1)", second(P3(1))}, {"P4(0)", second(P4(0))},
		{"ZC(64,2)", second(ZadoffChu(64, 2))}, {"ZC(63,0)", second(ZadoffChu(63, 0))}, {"ZC(63,63)", second(ZadoffChu(63, 63))},
		{"ZC(1,1)", second(ZadoffChu(1, 1))},
	} {
		if tc.err == nil {
			t.Errorf("%s: no error", tc.name)
		}
	}
}

func second[T any](_ T, err error) error { return err }

func TestZadoffChuPeriodic(t *testing.T) {
	// Periodic ACF sidelobes are zero: Wikipedia "Zadoff–Chu sequence"
	// and Chu 1972, for every root coprime to N.
	for _, tc := range []struct{ n, u int }{{63, 1}, {63, 5}, {64, 1}, {64, 7}, {101, 1}, {101, 50}, {13, 4}} {
		ph, err := ZadoffChu(tc.n, tc.u)
		if err != nil {
			t.Fatal(err)
		}
		for k := 1; k < tc.n; k++ {
			var s complex128
			for i := range tc.n {
				s += phasor(ph[(i+k)%tc.n]) * cmplx.Conj(phasor(ph[i]))
			}
			if cmplx.Abs(s) > 1e-9 {
				t.Errorf("ZC(%d,%d) periodic r[%d] = %v", tc.n, tc.u, k, s)
			}
		}
	}
	// Trap 8: ZC with even N and u = 1 is the conjugate of P3.
	zc, _ := ZadoffChu(64, 1)
	p3, _ := P3(64)
	for i := range zc {
		if !samePhase(zc[i], -p3[i]) {
			t.Fatalf("ZC(64,1)[%d] = %v, want −P3 = %v", i, zc[i], -p3[i])
		}
	}
}
