package scenarios

import (
	"context"
	"errors"
	"fmt"
	"slices"
	"strings"
	"testing"
)

// TestShardPartition: for every n up to 40 and N up to 12, the shards
// K = 0…N−1 own each of the items 0…n−1 exactly once, Len counts them,
// Item lists them in increasing order and Owner inverts Item.
func TestShardPartition(t *testing.T) {
	for n := 0; n <= 40; n++ {
		for N := 1; N <= 12; N++ {
			seen := make([]int, n)
			for K := range N {
				s := Shard{K, N}
				prev := -1
				for j := range s.Len(n) {
					i := s.Item(j)
					if i <= prev || i >= n {
						t.Fatalf("n %d, shard %v: item %d is %d after %d", n, s, j, i, prev)
					}
					if k, jj := Owner(i, N); k != K || jj != j {
						t.Fatalf("n %d: Owner(%d, %d) = %d, %d; want %d, %d", n, i, N, k, jj, K, j)
					}
					seen[i]++
					prev = i
				}
				if next := s.Item(s.Len(n)); next < n {
					t.Fatalf("n %d, shard %v: Len %d leaves out item %d", n, s, s.Len(n), next)
				}
			}
			for i, c := range seen {
				if c != 1 {
					t.Fatalf("n %d, N %d: item %d owned %d times", n, N, i, c)
				}
			}
		}
	}
}

// TestShardBlocks: the blocks of shards 0…N−1 tile 0…n−1 in order,
// their lengths differ by at most one.
func TestShardBlocks(t *testing.T) {
	for _, n := range []int{0, 1, 5, 10, 97, 1000, 100000000} {
		for _, N := range []int{1, 2, 3, 7, 13, 1000} {
			next, lo, hi := 0, n, 0
			for K := range N {
				first, count := Shard{K, N}.Block(n)
				if first != next || count < 0 {
					t.Fatalf("n %d, shard %d/%d: block %d+%d, want it to start at %d", n, K, N, first, count, next)
				}
				next += count
				lo, hi = min(lo, count), max(hi, count)
			}
			if next != n || hi-lo > 1 {
				t.Errorf("n %d, N %d: blocks end at %d, lengths %d…%d", n, N, next, lo, hi)
			}
		}
	}
}

func TestParseShard(t *testing.T) {
	for _, c := range []struct {
		in   string
		want Shard
		err  string
	}{
		{"0/1", Shard{0, 1}, ""},
		{"6/7", Shard{6, 7}, ""},
		{" 2 / 3 ", Shard{2, 3}, ""},
		{"99999/100000", Shard{99999, 100000}, ""},
		{"3/3", Shard{}, `--shard "3/3": K = 3 is outside 0…2 (shards count from 0)`},
		{"-1/3", Shard{}, "K = -1 is outside 0…2"},
		{"0/0", Shard{}, "N = 0 is outside 1…100000"},
		{"0/100001", Shard{}, "N = 100001 is outside 1…100000"},
		{"1.5/3", Shard{}, `K "1.5" is not a whole number (valid: 0…2)`},
		{"1/x", Shard{}, `N "x" is not a whole number (valid: 1…100000)`},
		{"1-3", Shard{}, "want K/N"},
		{"", Shard{}, "want K/N"},
	} {
		got, err := ParseShard("--shard", c.in)
		switch {
		case c.err == "" && (err != nil || got != c.want):
			t.Errorf("%q: %v, %v; want %v", c.in, got, err, c.want)
		case c.err != "" && (err == nil || !errors.Is(err, ErrInvalid) || !strings.Contains(err.Error(), c.err)):
			t.Errorf("%q: error %v; want %q", c.in, err, c.err)
		}
	}
}

func TestShardStampRoundTrip(t *testing.T) {
	st := ShardStamp{Shard{2, 7}, "sweep", 120, "points", Hash([]byte("a")), Hash([]byte("b")), Hash([]byte("c"))}
	line := st.Line()
	if !strings.HasPrefix(line, "# shard 2/7 of sweep · 120 points · scenario sha256:ca978112ca1bbdca") || !strings.HasSuffix(line, "\n") {
		t.Errorf("line %q", line) // sha256("a") = ca978112…, as Python's hashlib.sha256 gives
	}
	got, err := ParseShardStamp(line)
	if err != nil || got != st {
		t.Fatalf("round trip: %+v, %v", got, err)
	}
	for _, bad := range []string{
		"# pulsewright devel",
		"# shard 2/7 of sweep · 120 points · scenario sha256:x · grid sha256:y",
		"# shard 7/7 of sweep · 120 points · scenario sha256:x · grid sha256:y · build sha256:z",
		"# shard 2/7 sweep · 120 points · scenario sha256:x · grid sha256:y · build sha256:z",
		"# shard 2/7 of sweep · many points · scenario sha256:x · grid sha256:y · build sha256:z",
		"# shard 2/7 of sweep · 120 points · scenario md5:x · grid sha256:y · build sha256:z",
		"# shard 2/7 of sweep · 120 points · scenario sha256:x · grid sha256:y · sha256:z",
	} {
		if _, err := ParseShardStamp(bad); err == nil || !errors.Is(err, ErrInvalid) {
			t.Errorf("%q: %v", bad, err)
		}
	}
}

// TestScenarioAndGridHash: the scenario hash follows the canonical form
// (equal scenarios, equal hashes; any change, another hash), and the grid
// hash its axes, values and order.
func TestScenarioAndGridHash(t *testing.T) {
	s := demoScenario(t, "harbour-skiff")
	h1, err := ScenarioHash(s)
	if err != nil {
		t.Fatal(err)
	}
	c, _ := Canonical(s)
	s2, err := Decode(c)
	if err != nil {
		t.Fatal(err)
	}
	if h2, _ := ScenarioHash(s2); h2 != h1 {
		t.Errorf("decoded canonical form hashes to %s, not %s", h2, h1)
	}
	s2.Targets[0].RCSDBsm += 0.001
	if h3, _ := ScenarioHash(s2); h3 == h1 {
		t.Error("a changed RCS keeps the hash")
	}
	a, _ := ParseAxis("seed=1:3:1")
	b, _ := ParseAxis("receiver.window.sidelobe_db=-20,-30")
	b2, _ := ParseAxis("receiver.window.sidelobe_db=-20,-31")
	hashes := map[string]bool{}
	for _, g := range []*Grid{{Axes: []Axis{a, b}}, {Axes: []Axis{b, a}}, {Axes: []Axis{a, b2}}, {Axes: []Axis{a}}} {
		hashes[g.Hash()] = true
	}
	if len(hashes) != 4 {
		t.Errorf("%d distinct grid hashes of 4 grids", len(hashes))
	}
	if (&Grid{Axes: []Axis{a, b}}).Hash() != (&Grid{Base: s, Axes: []Axis{a, b}}).Hash() {
		t.Error("the grid hash depends on the base scenario (it has its own hash)")
	}
}

// TestCheckShards: the messages name the files, what differs, and the
// shards missing, repeated or interrupted with the --shard that re-runs
// them.
func TestCheckShards(t *testing.T) {
	stamp := func(k, n int) ShardStamp {
		return ShardStamp{Shard{k, n}, "sweep", 10, "points", "sha256:s", "sha256:g", "sha256:b"}
	}
	part := func(name string, k, n int) ShardPart {
		st := stamp(k, n)
		return ShardPart{Name: name, Engine: "# pulsewright devel", Stamp: st, Done: st.Shard.Len(st.Total)}
	}
	good := []ShardPart{part("c", 2, 3), part("a", 0, 3), part("b", 1, 3)}
	got, err := CheckShards(good, Shard.Len)
	if err != nil {
		t.Fatal(err)
	}
	var names []string
	for _, p := range got {
		names = append(names, p.Name)
	}
	if !slices.Equal(names, []string{"a", "b", "c"}) {
		t.Errorf("order %v", names)
	}
	// In blocks, shard 2/3 of 10 owns 4 items (6…9), not 3.
	if _, err := CheckShards(good, Shard.BlockLen); err == nil || !strings.Contains(err.Error(), "c (shard 2/3) holds 3 of its 4 points") {
		t.Errorf("blocks: %v", err)
	}
	// More shards than items: the empty ones hold 0 of 0.
	var many []ShardPart
	for k := range 13 {
		many = append(many, part(fmt.Sprint(k), k, 13))
	}
	if _, err := CheckShards(many, Shard.Len); err != nil {
		t.Errorf("13 shards of 10 points: %v", err)
	}

	mod := func(i int, f func(*ShardPart)) []ShardPart {
		ps := slices.Clone(good)
		f(&ps[i])
		return ps
	}
	// An unknown build is not compared: the engine lines decide.
	if _, err := CheckShards(mod(1, func(p *ShardPart) { p.Stamp.Build = UnknownBuild }), Shard.Len); err != nil {
		t.Errorf("an unknown build: %v", err)
	}
	for _, c := range []struct {
		parts []ShardPart
		want  string
	}{
		{nil, "no shard outputs given"},
		{mod(1, func(p *ShardPart) { p.Stamp.Scenario = "sha256:t" }), "c and a are shards of different scenarios (sha256:s and sha256:t)"},
		{mod(2, func(p *ShardPart) { p.Stamp.Grid = "sha256:h" }), "c and b are shards of different grids (sha256:g, 10 points and sha256:h, 10 points)"},
		{mod(2, func(p *ShardPart) { p.Stamp.Total = 11 }), "different grids"},
		{mod(1, func(p *ShardPart) { p.Engine = "# pulsewright v2" }), "c and a are shards of different engine versions (# pulsewright devel and # pulsewright v2)"},
		{mod(1, func(p *ShardPart) { p.Stamp.Command = "trials" }), "different commands (sweep and trials)"},
		{mod(1, func(p *ShardPart) { p.Stamp.Build = "sha256:c" }), "c and a are shards of different builds of the program (sha256:b and sha256:c; the engine lines agree, but the executables differ"},
		{mod(1, func(p *ShardPart) { p.Stamp.Shard = Shard{0, 4} }), "different shard counts (shard 2/3 and shard 0/4)"},
		{mod(1, func(p *ShardPart) { p.Stamp.Shard.K = 2 }), "shard 2/3 is given 2 times (c, a); give each shard once; shard 0 of 0…2 is missing; run it with --shard 0/3"},
		{mod(0, func(p *ShardPart) { p.Done = 1 }), "c (shard 2/3) holds 1 of its 3 points (interrupted?); re-run it with --shard 2/3"},
		{mod(0, func(p *ShardPart) { p.Done = 4 }), "holds 4 of its 3 points"},
		{good[:1], "2 shards of 0…2 are missing (0, 1); run them with --shard 0/3, --shard 1/3"},
	} {
		_, err := CheckShards(c.parts, Shard.Len)
		if err == nil || !errors.Is(err, ErrInvalid) || !strings.Contains(err.Error(), c.want) {
			t.Errorf("error %v; want %q", err, c.want)
		}
	}
}

// TestRunShard: the shards of a grid emit the points of Run, each with
// its grid index and the same report, in grid order within a shard.
func TestRunShard(t *testing.T) {
	a, _ := ParseAxis("receiver.window.sidelobe_db=-20:-40:-10")
	b, _ := ParseAxis("receiver.window.kind=taylor,chebyshev")
	g := &Grid{Base: demoScenario(t, "harbour-skiff"), Axes: []Axis{b, a}}
	whole := map[int]float64{}
	if err := g.Run(context.Background(), 2, func(p Point) error {
		whole[p.Index] = p.Report.Waveform.Mainlobe3dBM
		return nil
	}); err != nil {
		t.Fatal(err)
	}
	for _, n := range []int{2, 4, 7} {
		got := map[int]float64{}
		for k := range n {
			prev := -1
			if err := g.RunShard(context.Background(), Shard{k, n}, 2, func(p Point) error {
				if p.Index%n != k || p.Index <= prev {
					t.Errorf("shard %d/%d emitted point %d after %d", k, n, p.Index, prev)
				}
				if !slices.Equal(p.Values, g.Index(p.Index)) {
					t.Errorf("point %d: values %v, want %v", p.Index, p.Values, g.Index(p.Index))
				}
				prev = p.Index
				got[p.Index] = p.Report.Waveform.Mainlobe3dBM
				return nil
			}); err != nil {
				t.Fatal(err)
			}
		}
		if len(got) != len(whole) {
			t.Errorf("N %d: %d points, want %d", n, len(got), len(whole))
		}
		for i, v := range whole {
			if got[i] != v {
				t.Errorf("N %d: point %d main lobe %v, want %v", n, i, got[i], v)
			}
		}
	}
	if err := g.RunShard(context.Background(), Shard{3, 3}, 1, func(Point) error { return nil }); !errors.Is(err, ErrInvalid) {
		t.Errorf("shard 3/3: %v", err)
	}
}

// The points of a 10-point grid in 3 shards: round robin for a sweep,
// blocks for counts that add up.
func ExampleShard() {
	for k := range 3 {
		sh := Shard{K: k, N: 3}
		var items []int
		for j := range sh.Len(10) {
			items = append(items, sh.Item(j))
		}
		first, count := sh.Block(10)
		fmt.Printf("shard %v: items %v, block %d…%d\n", sh, items, first, first+count-1)
	}
	// Output:
	// shard 0/3: items [0 3 6 9], block 0…2
	// shard 1/3: items [1 4 7], block 3…5
	// shard 2/3: items [2 5 8], block 6…9
}
