package dsp

import (
	"fmt"
	"math"
)

// mlsTaps returns the feedback taps of a maximal-length shift register of
// the given degree: the recurrence b[k] = XOR_{t ∈ taps} b[k−t] (the
// first tap is the degree). Source: the tap table of Xilinx application
// note XAPP052, P. Alfke, "Efficient Shift Registers, LFSR Counters, and
// Long Pseudo-Random Sequence Generators" (1996), Table 3, taken from
// memory; TestMLS proves every entry primitive (period 2^n − 1 and a
// two-valued periodic autocorrelation). Degree 2 is x² + x + 1.
func mlsTaps(degree int) []int {
	switch degree {
	case 2:
		return []int{2, 1}
	case 3:
		return []int{3, 2}
	case 4:
		return []int{4, 3}
	case 5:
		return []int{5, 3}
	case 6:
		return []int{6, 5}
	case 7:
		return []int{7, 6}
	case 8:
		return []int{8, 6, 5, 4}
	case 9:
		return []int{9, 5}
	case 10:
		return []int{10, 7}
	case 11:
		return []int{11, 9}
	case 12:
		return []int{12, 6, 4, 1}
	case 13:
		return []int{13, 4, 3, 1}
	case 14:
		return []int{14, 5, 3, 1}
	case 15:
		return []int{15, 14}
	case 16:
		return []int{16, 15, 13, 4}
	case 17:
		return []int{17, 14}
	case 18:
		return []int{18, 11}
	case 19:
		return []int{19, 6, 2, 1}
	case 20:
		return []int{20, 17}
	}
	return nil
}

// MLS returns one period of the maximal-length (m-) sequence of the given
// degree n ∈ 2…20 as binary phases: N = 2^n − 1 chips, bit b → phase b·π
// (0 → +1, 1 → −1). The bits follow b[k] = XOR_{t ∈ taps} b[k−t] from the
// all-ones state b[0…n−1] = 1, with the taps of a published table of
// primitive polynomials (see mlsTaps). A period holds 2^(n−1) chips of −1
// and 2^(n−1) − 1 of +1, and its periodic autocorrelation is N at lag 0
// and −1 at every other lag.
func MLS(degree int) ([]float64, error) {
	taps := mlsTaps(degree)
	if taps == nil {
		return nil, fmt.Errorf("dsp: mls degree %d: valid degrees are 2…20", degree)
	}
	n := 1<<degree - 1
	bits := make([]byte, n)
	for k := range n {
		if k < degree {
			bits[k] = 1
			continue
		}
		var b byte
		for _, t := range taps {
			b ^= bits[k-t]
		}
		bits[k] = b
	}
	ph := make([]float64, n)
	for k, b := range bits {
		ph[k] = float64(b) * math.Pi
	}
	return ph, nil
}
