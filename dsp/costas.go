package dsp

import "fmt"

// maxWelchOrder bounds WelchCostas so that a user value cannot request an
// absurd allocation.
const maxWelchOrder = 1 << 16

// WelchCostas returns the Welch Costas array of order n = p − 1, p prime
// (Welch construction, as in Golomb & Taylor, Proc. IEEE 72(9), 1984):
// with g the smallest primitive root modulo p,
//
//	a_i = g^i mod p,  i = 1 … p−1,
//
// returned 0-based, order[i−1] = a_i − 1, a permutation of 0…n−1. Every
// displacement between two dots of the array is distinct (the Costas
// property). Valid n: 2 ≤ n ≤ 65536 with n + 1 prime.
func WelchCostas(n int) ([]int, error) {
	if n < 2 || n > maxWelchOrder || !isPrime(n+1) {
		return nil, fmt.Errorf("dsp: welch costas order %d: must be p−1 for a prime p, 2 ≤ order ≤ %d (2, 4, 6, 10, 12, 16, …)", n, maxWelchOrder)
	}
	p := n + 1
	g := primitiveRoot(p)
	order := make([]int, n)
	a := 1
	for i := range n {
		a = a * g % p
		order[i] = a - 1
	}
	return order, nil
}

func isPrime(p int) bool {
	if p < 2 {
		return false
	}
	for d := 2; d*d <= p; d++ {
		if p%d == 0 {
			return false
		}
	}
	return true
}

// primitiveRoot returns the smallest primitive root of the prime p: the
// smallest g whose powers g^((p−1)/q) ≠ 1 for every prime factor q of p−1.
func primitiveRoot(p int) int {
	if p == 2 {
		return 1
	}
	var factors []int
	m := p - 1
	for d := 2; d*d <= m; d++ {
		if m%d == 0 {
			factors = append(factors, d)
			for m%d == 0 {
				m /= d
			}
		}
	}
	if m > 1 {
		factors = append(factors, m)
	}
	for g := 2; g < p; g++ {
		ok := true
		for _, q := range factors {
			if powMod(g, (p-1)/q, p) == 1 {
				ok = false
				break
			}
		}
		if ok {
			return g
		}
	}
	panic("dsp: primitiveRoot: no primitive root (p not prime)")
}

func powMod(b, e, m int) int {
	r := 1
	b %= m
	for e > 0 {
		if e&1 == 1 {
			r = r * b % m
		}
		b = b * b % m
		e >>= 1
	}
	return r
}
