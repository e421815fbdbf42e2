package dsp

// fftSize returns the smallest integer ≥ n (n ≥ 1) whose only prime
// factors are 2, 3 and 5: the lengths gonum's mixed-radix FFT handles
// with its fast butterflies.
func fftSize(n int) int {
	if n <= 1 {
		return 1
	}
	best := 1
	for best < n {
		best *= 2
	}
	for p5 := 1; p5 < best; p5 *= 5 {
		for p35 := p5; p35 < best; p35 *= 3 {
			m := p35
			for m < n {
				m *= 2
			}
			if m < best {
				best = m
			}
		}
	}
	return best
}
