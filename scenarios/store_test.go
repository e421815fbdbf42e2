package scenarios

import (
	"errors"
	"os"
	"os/exec"
	"path/filepath"
	"strconv"
	"strings"
	"sync"
	"testing"
)

func mustLoadDemo(tb testing.TB, name string) *Scenario {
	tb.Helper()
	d, err := LoadDemo(name)
	if err != nil {
		tb.Fatal(err)
	}
	return d.Scenario
}

func TestStoreLifecycle(t *testing.T) {
	st, err := OpenStore(t.TempDir())
	if err != nil {
		t.Fatal(err)
	}
	s := mustLoadDemo(t, DefaultDemo)
	saved, created, err := st.Put("skiff", s, MatchNone)
	if err != nil || !created || saved.Revision == "" || saved.Title != s.Name {
		t.Fatalf("create: %+v %v %v", saved, created, err)
	}
	if _, _, err := st.Put("skiff", s, MatchNone); !errors.Is(err, ErrConflict) {
		t.Fatalf("second create: %v, want ErrConflict", err)
	}
	if _, _, err := st.Put("skiff", s, "0123456789abcdef"); !errors.Is(err, ErrConflict) {
		t.Fatalf("stale revision: %v, want ErrConflict", err)
	}
	s.Seed = 99
	again, created, err := st.Put("skiff", s, saved.Revision)
	if err != nil || created || again.Revision == saved.Revision {
		t.Fatalf("replace: %+v %v %v", again, created, err)
	}
	data, got, err := st.Get("skiff")
	if err != nil || got.Revision != again.Revision {
		t.Fatalf("get: %+v %v", got, err)
	}
	back, err := Decode(data)
	if err != nil || back.Seed != 99 {
		t.Fatalf("stored file does not decode to what was saved: %v", err)
	}
	list, err := st.List()
	if err != nil || len(list) != 1 || list[0].Name != "skiff" {
		t.Fatalf("list: %+v %v", list, err)
	}
	if err := st.Delete("skiff", saved.Revision); !errors.Is(err, ErrConflict) {
		t.Fatalf("delete stale: %v", err)
	}
	if err := st.Delete("skiff", again.Revision); err != nil {
		t.Fatal(err)
	}
	if err := st.Delete("skiff", MatchAny); !errors.Is(err, ErrNotFound) {
		t.Fatalf("delete missing: %v", err)
	}
	if _, _, err := st.Get("skiff"); !errors.Is(err, ErrNotFound) {
		t.Fatalf("get deleted: %v", err)
	}
}

func TestValidName(t *testing.T) {
	for _, ok := range []string{"a", "harbour-skiff_2", "v1.2", strings.Repeat("x", MaxSavedNameLen)} {
		if err := ValidName(ok); err != nil {
			t.Errorf("%q: %v", ok, err)
		}
	}
	for _, bad := range []string{"", ".", "..", ".hidden", "-x", "a/b", `a\b`, "a b", "ä", strings.Repeat("x", MaxSavedNameLen+1), "a\x00"} {
		if err := ValidName(bad); !errors.Is(err, ErrInvalid) {
			t.Errorf("%q accepted", bad)
		}
	}
}

// TestStoreConcurrent races writers on one name and on several; every
// write either wins or fails with ErrConflict, and what remains parses.
func TestStoreConcurrent(t *testing.T) {
	dir := t.TempDir()
	st, err := OpenStore(dir)
	if err != nil {
		t.Fatal(err)
	}
	base := mustLoadDemo(t, "rocky-coast")
	var wg sync.WaitGroup
	var mu sync.Mutex
	wins := map[string]int{}
	for i := range 16 {
		wg.Go(func() {
			name := []string{"one", "two"}[i%2]
			s := *base
			s.Seed = int64(i + 1)
			_, _, err := st.Put(name, &s, MatchNone)
			switch {
			case err == nil:
				mu.Lock()
				wins[name]++
				mu.Unlock()
			case !errors.Is(err, ErrConflict):
				t.Error(err)
			}
			if _, _, err := st.Put(name, &s, MatchAny); err != nil {
				t.Error(err)
			}
		})
	}
	wg.Wait()
	if wins["one"] != 1 || wins["two"] != 1 {
		t.Fatalf("creates that won: %v, want exactly one per name", wins)
	}
	files, _ := filepath.Glob(filepath.Join(dir, "*.json"))
	if len(files) != 2 {
		t.Fatalf("files left: %v", files)
	}
	for _, f := range files {
		data, err := os.ReadFile(f)
		if err != nil {
			t.Fatal(err)
		}
		if _, err := Decode(data); err != nil {
			t.Errorf("%s: %v", f, err)
		}
	}
}

// TestStoreHelperProcess is the child of TestStoreAcrossProcesses: with
// PULSEWRIGHT_STORE_HELPER=DIR it adds 1 to the seed of DIR's "counter"
// PULSEWRIGHT_STORE_ROUNDS times, each a read and a Put with If-Match of
// the revision read, again on a conflict.
func TestStoreHelperProcess(t *testing.T) {
	dir := os.Getenv("PULSEWRIGHT_STORE_HELPER")
	if dir == "" {
		t.Skip("child process of TestStoreAcrossProcesses")
	}
	rounds, _ := strconv.Atoi(os.Getenv("PULSEWRIGHT_STORE_ROUNDS"))
	st, err := OpenStore(dir)
	if err != nil {
		t.Fatal(err)
	}
	for done := 0; done < rounds; {
		data, saved, err := st.Get("counter")
		if err != nil {
			t.Fatal(err)
		}
		s, err := Decode(data)
		if err != nil {
			t.Fatal(err)
		}
		s.Seed++
		_, _, err = st.Put("counter", s, saved.Revision)
		switch {
		case errors.Is(err, ErrConflict):
			continue
		case err != nil:
			t.Fatal(err)
		}
		done++
	}
}

// TestStoreAcrossProcesses runs two processes (this test binary again)
// that increment one saved scenario with If-Match: no increment may be
// lost, so the final seed is the sum of their rounds. Without a lock
// across processes both read a revision, both pass the check and one
// write silently replaces the other.
func TestStoreAcrossProcesses(t *testing.T) {
	dir := t.TempDir()
	st, err := OpenStore(dir)
	if err != nil {
		t.Fatal(err)
	}
	s := mustLoadDemo(t, DefaultDemo)
	s.Seed = 0
	if _, _, err := st.Put("counter", s, MatchNone); err != nil {
		t.Fatal(err)
	}
	const procs, rounds = 2, 60
	var cmds []*exec.Cmd
	for range procs {
		cmd := exec.Command(os.Args[0], "-test.run=^TestStoreHelperProcess$")
		cmd.Env = append(os.Environ(), "PULSEWRIGHT_STORE_HELPER="+dir, "PULSEWRIGHT_STORE_ROUNDS="+strconv.Itoa(rounds))
		cmd.Stdout, cmd.Stderr = os.Stderr, os.Stderr
		if err := cmd.Start(); err != nil {
			t.Fatal(err)
		}
		cmds = append(cmds, cmd)
	}
	for _, c := range cmds {
		if err := c.Wait(); err != nil {
			t.Fatal(err)
		}
	}
	data, _, err := st.Get("counter")
	if err != nil {
		t.Fatal(err)
	}
	got, err := Decode(data)
	if err != nil {
		t.Fatal(err)
	}
	if got.Seed != procs*rounds {
		t.Fatalf("seed %d after %d increments: %d lost", got.Seed, procs*rounds, procs*rounds-int(got.Seed))
	}
}

// TestStoreKeepsLiveTempFiles: opening a store while another process's
// write is in progress (it holds the directory's lock and its temporary
// file exists) must not remove that file; once the lock is free, a
// leftover is removed.
func TestStoreKeepsLiveTempFiles(t *testing.T) {
	dir := t.TempDir()
	st, err := OpenStore(dir)
	if err != nil {
		t.Fatal(err)
	}
	tmp := filepath.Join(dir, ".skiff.12345.tmp")
	os.WriteFile(tmp, []byte("{"), 0o600)
	unlock, err := st.flock.lock()
	if err != nil {
		t.Fatal(err)
	}
	if _, err := OpenStore(dir); err != nil {
		t.Fatal(err)
	}
	if _, err := os.Stat(tmp); err != nil {
		t.Fatalf("a temporary file was removed while its writer held the lock: %v", err)
	}
	unlock()
	if staleAfter > 0 {
		return // without flock only old files go
	}
	if _, err := OpenStore(dir); err != nil {
		t.Fatal(err)
	}
	if _, err := os.Stat(tmp); err == nil {
		t.Fatal("a stale temporary file was kept")
	}
}
