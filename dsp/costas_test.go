package dsp

import "testing"

// isCostas checks the Costas (distinct-difference) property: for every
// row shift h, the differences a[i+h] − a[i] are distinct (Costas, Proc.
// IEEE 72(8), 1984; Golomb & Taylor 1984).
func isCostas(a []int) bool {
	n := len(a)
	for h := 1; h < n; h++ {
		seen := make(map[int]bool)
		for i := 0; i+h < n; i++ {
			d := a[i+h] - a[i]
			if seen[d] {
				return false
			}
			seen[d] = true
		}
	}
	return true
}

func TestWelchCostas(t *testing.T) {
	for _, n := range []int{2, 4, 6, 10, 12, 16, 18, 22, 28, 30, 36, 40, 42, 46, 52, 58, 60, 100, 106} {
		a, err := WelchCostas(n)
		if err != nil {
			t.Fatalf("WelchCostas(%d): %v", n, err)
		}
		seen := make([]bool, n)
		for _, v := range a {
			if v < 0 || v >= n || seen[v] {
				t.Fatalf("WelchCostas(%d) = %v: not a permutation of 0…%d", n, a, n-1)
			}
			seen[v] = true
		}
		if !isCostas(a) {
			t.Errorf("WelchCostas(%d) = %v: not a Costas array", n, a)
		}
		if err := (Costas{Order: a, Chip: 1e-6}).Validate(); err != nil {
			t.Errorf("Costas.Validate: %v", err)
		}
	}
	// Example: p = 11, smallest primitive root 2: 2^i mod 11 for
	// i = 1…10 is 2 4 8 5 10 9 7 3 6 1 (Welch construction, by hand).
	a, _ := WelchCostas(10)
	want := []int{1, 3, 7, 4, 9, 8, 6, 2, 5, 0}
	for i := range want {
		if a[i] != want[i] {
			t.Fatalf("WelchCostas(10) = %v, want %v", a, want)
		}
	}
	// The check itself must reject a non-Costas permutation.
	if isCostas([]int{0, 1, 2}) {
		t.Error("isCostas accepted 0 1 2")
	}
	for _, n := range []int{-1, 0, 1, 3, 5, 7, 8, 9, 14, 1 << 20} {
		if _, err := WelchCostas(n); err == nil {
			t.Errorf("WelchCostas(%d): no error", n)
		}
	}
}
