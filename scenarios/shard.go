package scenarios

import (
	"crypto/sha256"
	"encoding/hex"
	"encoding/json"
	"fmt"
	"strconv"
	"strings"
)

// MaxShards bounds N in --shard K/N: far more nodes than a study uses,
// small enough that the list of missing shards stays printable.
const MaxShards = 100000

// Shard is part K of N of a run whose work items are numbered 0…n−1 (the
// points of a sweep grid in row-major order, or the trials of a Monte
// Carlo study): shard K owns the items i with i mod N = K. The partition
// is round robin rather than in blocks so that the shards share the
// expensive and the cheap points of a grid whose cost grows along an
// axis. It depends on nothing but K, N and i: a seed derived from an
// item's index is the same in every shard, so the union of the N shards
// computes exactly what one run computes. The zero value is not a shard;
// Whole is the one shard of an unsharded run.
type Shard struct {
	K, N int
}

// Whole is the single shard of an unsharded run (0/1).
var Whole = Shard{0, 1}

// ParseShard reads "K/N" (0 ≤ K < N ≤ MaxShards), as given to the option
// named flag (for the error message, e.g. "--shard"). The error wraps
// ErrInvalid and names the option, the value and the valid range.
func ParseShard(flag, s string) (Shard, error) {
	bad := func(why string) error {
		return fmt.Errorf("%s %q: %s: %w", flag, s, why, ErrInvalid)
	}
	ks, ns, ok := strings.Cut(s, "/")
	if !ok {
		return Shard{}, bad("want K/N, shard K of N counted from 0 (0/4, 1/4, 2/4, 3/4)")
	}
	n, err := strconv.Atoi(strings.TrimSpace(ns))
	if err != nil {
		return Shard{}, bad(fmt.Sprintf("N %q is not a whole number (valid: 1…%d)", ns, MaxShards))
	}
	if n < 1 || n > MaxShards {
		return Shard{}, bad(fmt.Sprintf("N = %d is outside 1…%d", n, MaxShards))
	}
	k, err := strconv.Atoi(strings.TrimSpace(ks))
	if err != nil {
		return Shard{}, bad(fmt.Sprintf("K %q is not a whole number (valid: 0…%d)", ks, n-1))
	}
	if k < 0 || k >= n {
		return Shard{}, bad(fmt.Sprintf("K = %d is outside 0…%d (shards count from 0)", k, n-1))
	}
	return Shard{k, n}, nil
}

// String returns "K/N".
func (s Shard) String() string { return strconv.Itoa(s.K) + "/" + strconv.Itoa(s.N) }

// Len returns how many of the items 0…n−1 the shard owns: ⌈(n−K)/N⌉, 0
// when K ≥ n (more shards than items).
func (s Shard) Len(n int) int {
	if s.K >= n {
		return 0
	}
	return (n - s.K + s.N - 1) / s.N
}

// Item returns the index of the shard's j-th item (j from 0): K + j·N.
func (s Shard) Item(j int) int { return s.K + j*s.N }

// Block returns the shard's part of 0…n−1 in the other partition, in
// blocks: the contiguous items first … first+count−1, first = ⌊K·n/N⌋
// and first+count = ⌊(K+1)·n/N⌋ (block lengths differ by at most one).
// It suits work whose items all cost the same and whose results add up
// in any order, such as counts over a range of Monte Carlo trials (a
// trial's seed is drawn from its index, never from the shard). n must be
// at most 2⁶³⁄MaxShards so that K·n cannot overflow.
func (s Shard) Block(n int) (first, count int) {
	first = s.K * n / s.N
	return first, (s.K+1)*n/s.N - first
}

// BlockLen returns the count of Block(n): how many items the shard owns
// in the partition in blocks (for CheckShards).
func (s Shard) BlockLen(n int) int {
	_, c := s.Block(n)
	return c
}

// Owner returns the shard of N that owns item i, and the item's position
// within it.
func Owner(i, n int) (k, j int) { return i % n, i / n }

// Hash returns "sha256:" and the hexadecimal SHA-256 of data.
func Hash(data []byte) string {
	h := sha256.Sum256(data)
	return "sha256:" + hex.EncodeToString(h[:])
}

// ScenarioHash identifies a scenario by the hash of its canonical JSON
// (Canonical), so that two files that decode equal have the same hash
// whatever their spacing, field order or defaults written out.
func ScenarioHash(s *Scenario) (string, error) {
	c, err := Canonical(s)
	if err != nil {
		return "", err
	}
	return Hash(c), nil
}

// Hash identifies the grid's axes: the hash of the JSON array of
// {"path", "values"} in axis order, the values as JSON. Two grids with
// the same hash make the same points in the same order.
func (g *Grid) Hash() string {
	type axis struct {
		Path   string            `json:"path"`
		Values []json.RawMessage `json:"values"`
	}
	axes := make([]axis, len(g.Axes))
	for k, a := range g.Axes {
		axes[k] = axis{a.Path, a.Values}
	}
	b, _ := json.Marshal(axes) // paths are strings, values valid JSON
	return Hash(b)
}

// UnknownBuild is the Build of a stamp whose program could not read its
// own executable; merge then relies on the engine line alone.
const UnknownBuild = "unknown"

// ShardStamp is what a shard's output says about itself, on the comment
// line that follows the engine's (docs/report-format.md, "Shards"):
//
//	# shard 2/7 of sweep · 120 points · scenario sha256:… · grid sha256:… · build sha256:…
//
// Command names the command that wrote it, Unit what it counts (points,
// trials) and Total how many the whole run has. Scenario and Grid are
// hashes (ScenarioHash, Grid.Hash); for a command other than sweep, Grid
// identifies whatever besides the scenario fixes the work (its axes,
// trial counts, options). Build identifies the program's executable (the
// hash of its file, or UnknownBuild): the engine line of a build that
// records no version or commit (a "devel" build, such as an image built
// without its repository's history) cannot tell two such builds apart.
type ShardStamp struct {
	Shard    Shard
	Command  string
	Total    int
	Unit     string
	Scenario string
	Grid     string
	Build    string
}

// String renders the stamp without the leading "# " or a newline.
func (s ShardStamp) String() string {
	return fmt.Sprintf("shard %s of %s · %d %s · scenario %s · grid %s · build %s", s.Shard, s.Command, s.Total, s.Unit, s.Scenario, s.Grid, s.Build)
}

// Line returns the stamp as a comment line, ending in a newline.
func (s ShardStamp) Line() string { return "# " + s.String() + "\n" }

// ParseShardStamp reads a line written by ShardStamp.Line (with or without
// its newline). The error wraps ErrInvalid.
func ParseShardStamp(line string) (ShardStamp, error) {
	line = strings.TrimSuffix(strings.TrimSuffix(line, "\n"), "\r")
	bad := func(why string) error {
		return fmt.Errorf("shard line %q: %s: %w", Clip(line, 120), why, ErrInvalid)
	}
	rest, ok := strings.CutPrefix(line, "# shard ")
	if !ok {
		return ShardStamp{}, bad(`want "# shard K/N of COMMAND · TOTAL UNIT · scenario HASH · grid HASH · build HASH"`)
	}
	parts := strings.Split(rest, " · ")
	if len(parts) != 5 {
		return ShardStamp{}, bad(fmt.Sprintf("%d parts separated by \" · \", want 5", len(parts)))
	}
	var st ShardStamp
	kn, cmd, ok := strings.Cut(parts[0], " of ")
	if !ok || cmd == "" {
		return ShardStamp{}, bad(`want "K/N of COMMAND" first`)
	}
	sh, err := ParseShard("shard", kn)
	if err != nil {
		return ShardStamp{}, bad(err.Error())
	}
	st.Shard, st.Command = sh, cmd
	tot, unit, ok := strings.Cut(parts[1], " ")
	n, err := strconv.Atoi(tot)
	if !ok || err != nil || n < 0 || unit == "" {
		return ShardStamp{}, bad(fmt.Sprintf("%q is not \"TOTAL UNIT\"", parts[1]))
	}
	st.Total, st.Unit = n, unit
	if st.Scenario, ok = strings.CutPrefix(parts[2], "scenario "); !ok || !strings.HasPrefix(st.Scenario, "sha256:") {
		return ShardStamp{}, bad(fmt.Sprintf("%q is not \"scenario sha256:…\"", parts[2]))
	}
	if st.Grid, ok = strings.CutPrefix(parts[3], "grid "); !ok || !strings.HasPrefix(st.Grid, "sha256:") {
		return ShardStamp{}, bad(fmt.Sprintf("%q is not \"grid sha256:…\"", parts[3]))
	}
	if st.Build, ok = strings.CutPrefix(parts[4], "build "); !ok || st.Build == "" {
		return ShardStamp{}, bad(fmt.Sprintf("%q is not \"build sha256:…\"", parts[4]))
	}
	return st, nil
}

// ShardPart is one shard output given to a merge: its name (a file name,
// for messages), the engine comment line it opens with, its stamp, and
// how many of its items it holds (an interrupted shard holds fewer than
// it owns).
type ShardPart struct {
	Name   string
	Engine string
	Stamp  ShardStamp
	Done   int
}

// CheckShards checks that parts are exactly the N shards of one run and
// returns them in shard order. owns says how many of the run's items a
// shard owns: Shard.Len for the round-robin partition (a sweep), or the
// count of Shard.Block. It refuses, with an error wrapping ErrInvalid:
//   - parts of different commands, engines, scenarios, grids or builds
//     (each compared with the first part, naming both files and both
//     values; an UnknownBuild is not compared), or of different N or
//     totals;
//   - a shard given twice, shards missing, and shards that hold fewer
//     items than they own (interrupted), all listed by index with the
//     --shard option that re-runs them.
func CheckShards(parts []ShardPart, owns func(Shard, int) int) ([]ShardPart, error) {
	if len(parts) == 0 {
		return nil, fmt.Errorf("merge: no shard outputs given: %w", ErrInvalid)
	}
	first := parts[0]
	a := first.Stamp
	for _, p := range parts[1:] {
		b := p.Stamp
		differ := func(what, x, y string) error {
			return fmt.Errorf("merge: %s and %s are shards of different %s (%s and %s); merge only the shards of one run: %w",
				first.Name, p.Name, what, Clip(x, 200), Clip(y, 200), ErrInvalid)
		}
		switch {
		case a.Command != b.Command:
			return nil, differ("commands", a.Command, b.Command)
		case first.Engine != p.Engine:
			return nil, differ("engine versions", first.Engine, p.Engine)
		case a.Scenario != b.Scenario:
			return nil, differ("scenarios", a.Scenario, b.Scenario)
		case a.Grid != b.Grid || a.Total != b.Total || a.Unit != b.Unit:
			return nil, differ("grids", fmt.Sprintf("%s, %d %s", a.Grid, a.Total, a.Unit), fmt.Sprintf("%s, %d %s", b.Grid, b.Total, b.Unit))
		case a.Build != b.Build && a.Build != UnknownBuild && b.Build != UnknownBuild:
			return nil, differ("builds of the program", a.Build, b.Build+"; the engine lines agree, but the executables differ: run every shard with one binary or image")
		case a.Shard.N != b.Shard.N:
			return nil, differ("shard counts", "shard "+a.Shard.String(), "shard "+b.Shard.String())
		}
	}
	n := a.Shard.N
	byK := make([][]ShardPart, n)
	for _, p := range parts {
		byK[p.Stamp.Shard.K] = append(byK[p.Stamp.Shard.K], p)
	}
	var problems []string
	var missing []int
	ordered := make([]ShardPart, 0, n)
	for k, ps := range byK {
		switch {
		case len(ps) == 0:
			missing = append(missing, k)
			continue
		case len(ps) > 1:
			names := make([]string, len(ps))
			for i, p := range ps {
				names[i] = p.Name
			}
			problems = append(problems, fmt.Sprintf("shard %d/%d is given %d times (%s); give each shard once", k, n, len(ps), strings.Join(names, ", ")))
			continue
		}
		p := ps[0]
		if want := owns(p.Stamp.Shard, a.Total); p.Done != want {
			problems = append(problems, fmt.Sprintf("%s (shard %d/%d) holds %d of its %d %s (interrupted?); re-run it with --shard %d/%d",
				p.Name, k, n, p.Done, want, a.Unit, k, n))
		}
		ordered = append(ordered, p)
	}
	if len(missing) > 0 {
		if len(missing) == 1 {
			problems = append(problems, fmt.Sprintf("shard %d of 0…%d is missing; run it with %s", missing[0], n-1, shardFlags(missing, n, 5)))
		} else {
			problems = append(problems, fmt.Sprintf("%d shards of 0…%d are missing (%s); run them with %s", len(missing), n-1, listInts(missing, 20), shardFlags(missing, n, 5)))
		}
	}
	if len(problems) > 0 {
		return nil, fmt.Errorf("merge: %s: %w", strings.Join(problems, "; "), ErrInvalid)
	}
	return ordered, nil
}

// listInts lists up to max values, then how many more.
func listInts(v []int, max int) string {
	s := make([]string, 0, min(len(v), max))
	for _, x := range v[:min(len(v), max)] {
		s = append(s, strconv.Itoa(x))
	}
	out := strings.Join(s, ", ")
	if len(v) > max {
		out += fmt.Sprintf(" and %d more", len(v)-max)
	}
	return out
}

func shardFlags(ks []int, n, max int) string {
	s := make([]string, 0, min(len(ks), max))
	for _, k := range ks[:min(len(ks), max)] {
		s = append(s, fmt.Sprintf("--shard %d/%d", k, n))
	}
	out := strings.Join(s, ", ")
	if len(ks) > max {
		out += ", …"
	}
	return out
}
