// Command mpssearch finds minimum-peak-sidelobe (MPS) binary codes by
// branch-and-bound search and writes them as a Go source table for package
// dsp (file dsp/mpstable.go).
//
// For each length N it searches for a ±1 code whose aperiodic
// autocorrelation r_k = Σ_i a_i·a_{i+k} has max_{k≥1}|r_k| ≤ P, where P is
// the published optimum peak sidelobe for N (Keel 2010 and Coxson & Russo,
// IEEE Trans. AES 41(1), 2005, as summarised by Richards, Fundamentals of
// Radar Signal Processing, 2nd ed., 2014, R-p309). It stops at the first
// code found. Before that it runs the same search with bound P−1 for
// lengths up to -provebelow, which must fail, confirming exhaustively that
// P is optimal there.
//
// Search: chips are fixed in pairs from both ends inwards (a[m] and
// a[N−1−m] at depth m). After each step, every lag k has a known partial
// sum s_k over products whose two chips are fixed and u_k products still
// unknown; the branch is cut when |s_k| − u_k > P for some k, since each
// unknown product changes r_k by exactly ±1. Chips are held as bits of a
// uint64 (N ≤ 64), so s_k comes from two popcounts per lag. a[0] = +1 is fixed (negation
// symmetry).
//
// Hex convention of the output: the first chip is the most significant
// bit of an N-bit number, bit 1 → +1 (phase 0), bit 0 → −1 (phase π).
//
// Usage (slow for long codes; run in the background):
//
//	nice go run ./dsp/internal/mpssearch -min 2 -max 64 -provebelow 36 -budget 18m -o dsp/mpstable.go
//
// run.log is the progress output of the run that made dsp/mpstable.go on
// a shared 2-core machine: N = 2…50 found (N = 45 and 46 took 1.5 and
// 2 min; the rest seconds), PSL − 1 shown unreachable for N ≤ 36, and
// N = 51 (optimum PSL 3, few codes) not found within the budget.
package main

import (
	"flag"
	"fmt"
	"io"
	"log"
	"math/big"
	"math/bits"
	"os"
	"strings"
	"time"
)

// publishedPSL returns the optimum peak sidelobe |r_k| for length n
// (R-p309, citing Keel 2010; Nunn & Coxson; Coxson & Russo 2005).
func publishedPSL(n int) int {
	switch {
	case n <= 5 || n == 7 || n == 11 || n == 13:
		return 1
	case n <= 21 || n == 25 || n == 28:
		return 2
	case n <= 48 || n == 51:
		return 3
	case n <= 82:
		return 4
	default:
		return 5
	}
}

type searcher struct {
	n, psl   int
	a        []int8
	fixed    uint64 // bit i set: chip i is fixed
	plus     uint64 // bit i set: chip i is +1
	nodes    int64
	deadline time.Time
	timedOut bool
}

func newSearcher(n, psl int, deadline time.Time) *searcher {
	if n > 64 {
		log.Fatalf("length %d: at most 64", n)
	}
	return &searcher{n: n, psl: psl, a: make([]int8, n), deadline: deadline}
}

// ok reports whether every lag can still reach |r_k| ≤ psl. For lag k the
// known pairs (i, i+k) are the bits of F & (F>>k); a pair contributes −1
// when its chips differ, so s_k = c_k − 2·d_k with d_k the popcount of
// the differing known pairs, and u_k = (n−k) − c_k products are unknown.
func (s *searcher) ok() bool {
	f, v := s.fixed, s.plus
	for k := 1; k < s.n; k++ {
		known := f & (f >> k)
		c := bits.OnesCount64(known)
		d := bits.OnesCount64((v ^ (v >> k)) & known)
		sk := c - 2*d
		if sk < 0 {
			sk = -sk
		}
		if sk-(s.n-k-c) > s.psl {
			return false
		}
	}
	return true
}

func (s *searcher) set(i int, v int8) {
	s.a[i] = v
	s.fixed |= 1 << i
	if v > 0 {
		s.plus |= 1 << i
	} else {
		s.plus &^= 1 << i
	}
}

// search fixes pair m (chips m and n−1−m) and recurses.
func (s *searcher) search(m int) bool {
	n := s.n
	s.nodes++
	if s.nodes&0xfffff == 0 && time.Now().After(s.deadline) {
		s.timedOut = true
	}
	if s.timedOut {
		return false
	}
	l, r := m, n-1-m
	if l > r {
		return true // all chips fixed and every lag checked exactly
	}
	vals := []int8{1, -1}
	if m == 0 {
		vals = []int8{1} // a[0] = +1: negation symmetry
	}
	saveF, saveV := s.fixed, s.plus
	for _, vl := range vals {
		for _, vr := range []int8{1, -1} {
			if l == r && vr != vl {
				continue
			}
			s.set(l, vl)
			s.set(r, vr)
			if s.ok() && s.search(m+1) {
				return true
			}
			s.fixed, s.plus = saveF, saveV
		}
	}
	return false
}

func peak(a []int8) int {
	p := 0
	for k := 1; k < len(a); k++ {
		v := 0
		for i := 0; i+k < len(a); i++ {
			v += int(a[i]) * int(a[i+k])
		}
		if v < 0 {
			v = -v
		}
		p = max(p, v)
	}
	return p
}

func hexOf(a []int8) string {
	v := new(big.Int)
	for _, c := range a {
		v.Lsh(v, 1)
		if c > 0 {
			v.SetBit(v, 0, 1)
		}
	}
	h := strings.ToUpper(v.Text(16))
	w := (len(a) + 3) / 4
	return strings.Repeat("0", w-len(h)) + h
}

type result struct {
	n, psl  int
	hex     string
	proved  bool
	elapsed time.Duration
	nodes   int64
}

func main() {
	minN := flag.Int("min", 2, "shortest length")
	maxN := flag.Int("max", 48, "longest length")
	budget := flag.Duration("budget", 35*time.Minute, "total wall-clock budget")
	prove := flag.Int("provebelow", 0, "for N ≤ this, also show that PSL−1 is unreachable")
	out := flag.String("o", "", "output Go file (default stdout)")
	flag.Parse()
	log.SetFlags(0)
	deadline := time.Now().Add(*budget)

	var res []result
	for n := *minN; n <= *maxN; n++ {
		p := publishedPSL(n)
		t0 := time.Now()
		proved := false
		if n <= *prove && p > 1 {
			s := newSearcher(n, p-1, deadline)
			if s.search(0) {
				log.Fatalf("N=%d: found PSL %d < published %d: %s", n, p-1, p, hexOf(s.a))
			}
			if s.timedOut {
				log.Printf("N=%d: budget exhausted during proof", n)
				break
			}
			proved = true
		}
		s := newSearcher(n, p, deadline)
		found := s.search(0)
		if s.timedOut || !found {
			log.Printf("N=%d: no code (timed out %v) after %v", n, s.timedOut, time.Since(t0))
			break
		}
		if got := peak(s.a); got != p {
			log.Fatalf("N=%d: found code has PSL %d, want %d", n, got, p)
		}
		r := result{n, p, hexOf(s.a), proved, time.Since(t0), s.nodes}
		log.Printf("N=%d PSL=%d %s proved=%v nodes=%d %v", n, p, r.hex, proved, s.nodes, r.elapsed.Round(time.Millisecond))
		res = append(res, r)
	}

	w := io.Writer(os.Stdout)
	if *out != "" {
		f, err := os.Create(*out)
		if err != nil {
			log.Fatal(err)
		}
		defer f.Close()
		w = f
	}
	writeTable(w, res)
}

func writeTable(w io.Writer, res []result) {
	fmt.Fprintf(w, `// Code generated by dsp/internal/mpssearch; DO NOT EDIT.

package dsp

// mpsCode returns the stored minimum-peak-sidelobe binary code of length n
// as hex, with the peak sidelobe max_{k≥1}|r_k| it achieves (equal to the
// published optimum, R-p309 citing Keel 2010 and Coxson & Russo 2005), or
// ok = false when no code of that length is stored. The codes were found
// by the branch-and-bound search in dsp/internal/mpssearch; lengths marked
// "proved" were also searched exhaustively with bound PSL−1, which found
// no code.
//
// Hex convention: the first chip is the most significant bit of an n-bit
// number (leading zero digits kept), bit 1 → +1 (phase 0), bit 0 → −1
// (phase π).
func mpsCode(n int) (hex string, psl int, ok bool) {
	switch n {
`)
	for _, r := range res {
		note := ""
		if r.proved {
			note = " // proved"
		}
		fmt.Fprintf(w, "\tcase %d:\n\t\treturn %q, %d, true%s\n", r.n, r.hex, r.psl, note)
	}
	fmt.Fprintf(w, "\t}\n\treturn \"\", 0, false\n}\n")
	if len(res) > 0 {
		fmt.Fprintf(w, "\n// mpsMaxLen is the longest stored MPS code length.\nconst mpsMaxLen = %d\n", res[len(res)-1].n)
	}
}
