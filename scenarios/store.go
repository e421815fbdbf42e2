package scenarios

import (
	"crypto/sha256"
	"encoding/hex"
	"encoding/json"
	"errors"
	"fmt"
	"hash/fnv"
	"io/fs"
	"os"
	"path/filepath"
	"slices"
	"sort"
	"strings"
	"sync"
	"time"
)

// MaxSavedNameLen bounds the name of a saved scenario, in bytes.
const MaxSavedNameLen = 64

// Preconditions of Store.Put and Store.Delete.
const (
	// MatchNone makes Put create only: it fails with ErrConflict when the
	// name exists.
	MatchNone = ""
	// MatchAny makes Put and Delete require that the name exists, at any
	// revision.
	MatchAny = "*"
	// MatchNever is a precondition no revision meets (an If-Match that
	// lists only weak tags).
	MatchNever = "-"
)

// Saved describes one saved scenario.
type Saved struct {
	Name     string    `json:"name"`     // the file's name without .json
	Title    string    `json:"title"`    // the scenario's name field
	Revision string    `json:"revision"` // hash of the stored bytes
	Modified time.Time `json:"modified"` // time of the last write
}

// Store keeps saved scenarios as one canonical JSON file each,
// dir/NAME.json. Writes are atomic (temporary file, fsync, rename, fsync
// of the directory), so a crash leaves either the old or the new file,
// never a partial one. A Store is safe for concurrent use, also by
// several processes on one directory: each write checks its precondition
// and replaces the file under a lock on the directory (flock(2) on
// dir/.lock where the system has it), so an If-Match holds across
// processes.
type Store struct {
	dir   string
	locks [64]sync.Mutex // striped by name, within this process
	flock dirLock        // across processes
}

// OpenStore opens, creating it if need be, the store in dir, and removes
// temporary files that an interrupted write left behind: only when the
// directory's lock is free at that moment (every writer holds it while
// its temporary file exists, so none is in progress) and, without
// flock(2), only files older than an hour.
func OpenStore(dir string) (*Store, error) {
	if dir == "" {
		return nil, fmt.Errorf("open store: empty directory name")
	}
	if err := os.MkdirAll(dir, 0o700); err != nil {
		return nil, fmt.Errorf("open store: %w", explainWrite(dir, err))
	}
	st := &Store{dir: dir, flock: dirLock{filepath.Join(dir, ".lock")}}
	if unlock, ok := st.flock.tryLock(); ok {
		leftovers, _ := filepath.Glob(filepath.Join(dir, ".*.tmp"))
		for _, f := range leftovers {
			if fi, err := os.Lstat(f); err == nil && fi.Mode().IsRegular() && time.Since(fi.ModTime()) >= staleAfter {
				os.Remove(f)
			}
		}
		unlock()
	}
	return st, nil
}

// exclusive runs fn holding the lock of name in this process and the
// directory's lock across processes.
func (st *Store) exclusive(name string, fn func() error) error {
	mu := st.lock(name)
	mu.Lock()
	defer mu.Unlock()
	unlock, err := st.flock.lock()
	if err != nil {
		return fmt.Errorf("lock the store: %w", explainWrite(st.dir, err))
	}
	defer unlock()
	return fn()
}

// CheckWritable reports, with an error that says what to do, when the
// store's directory cannot take a save: read-only, not writable by this
// user, or full. It writes and removes a small temporary file.
func (st *Store) CheckWritable() error {
	f, err := os.CreateTemp(st.dir, ".probe.*.tmp")
	if err == nil {
		_, err = f.Write([]byte("probe\n"))
		if cerr := f.Close(); err == nil {
			err = cerr
		}
		os.Remove(f.Name())
	}
	return explainWrite(st.dir, err)
}

// Dir returns the store's directory.
func (st *Store) Dir() string { return st.dir }

// ValidName reports whether name can name a saved scenario: 1 to
// MaxSavedNameLen bytes of ASCII letters, digits, '-', '_' and '.', not
// starting with '.' or '-'. The error wraps ErrInvalid.
func ValidName(name string) error {
	bad := func(why string) error {
		return fmt.Errorf("scenario name %s %s: %w", clipQ(name), why, ErrInvalid)
	}
	switch {
	case name == "":
		return bad("is empty")
	case len(name) > MaxSavedNameLen:
		return bad(fmt.Sprintf("is longer than %d bytes", MaxSavedNameLen))
	case name[0] == '.' || name[0] == '-':
		return bad("starts with '.' or '-'")
	}
	for i := 0; i < len(name); i++ {
		c := name[i]
		if !(c >= 'a' && c <= 'z' || c >= 'A' && c <= 'Z' || c >= '0' && c <= '9' || c == '-' || c == '_' || c == '.') {
			return bad("may hold only letters, digits, '-', '_' and '.'")
		}
	}
	return nil
}

func (st *Store) lock(name string) *sync.Mutex {
	h := fnv.New32a()
	h.Write([]byte(name))
	return &st.locks[h.Sum32()%uint32(len(st.locks))]
}

func (st *Store) path(name string) string { return filepath.Join(st.dir, name+".json") }

func revision(data []byte) string {
	sum := sha256.Sum256(data)
	return hex.EncodeToString(sum[:8])
}

func describeSaved(name string, data []byte, mod time.Time) Saved {
	var head struct {
		Name string `json:"name"`
	}
	json.Unmarshal(data, &head) // a title is a courtesy; a file that does not parse has none
	return Saved{Name: name, Title: head.Name, Revision: revision(data), Modified: mod.UTC()}
}

// List returns the saved scenarios sorted by name.
func (st *Store) List() ([]Saved, error) {
	entries, err := os.ReadDir(st.dir)
	if err != nil {
		return nil, fmt.Errorf("list saved scenarios: %w", err)
	}
	out := []Saved{}
	for _, e := range entries {
		name, ok := strings.CutSuffix(e.Name(), ".json")
		if !ok || !e.Type().IsRegular() || ValidName(name) != nil {
			continue
		}
		data, mod, err := st.read(name)
		if errors.Is(err, ErrNotFound) {
			continue // deleted while listing
		}
		if err != nil {
			return nil, fmt.Errorf("list saved scenarios: %w", err)
		}
		out = append(out, describeSaved(name, data, mod))
	}
	sort.Slice(out, func(i, j int) bool { return out[i].Name < out[j].Name })
	return out, nil
}

// read returns the bytes and time of name's file. It refuses anything
// but a regular file: a symbolic link (which could point anywhere on the
// machine), a directory or a device: checked with Lstat, opened without
// following a link (O_NOFOLLOW where the system has it), and checked
// again on the opened file.
func (st *Store) read(name string) ([]byte, time.Time, error) {
	p := st.path(name)
	li, err := os.Lstat(p)
	if errors.Is(err, fs.ErrNotExist) {
		return nil, time.Time{}, fmt.Errorf("saved scenario %q: %w", name, ErrNotFound)
	}
	if err != nil {
		return nil, time.Time{}, err
	}
	notRegular := func() error {
		return fmt.Errorf("saved scenario %q: %s in %s is %w (a symbolic link, directory or device); the store reads only regular files", name, name+".json", st.dir, ErrNotRegular)
	}
	if !li.Mode().IsRegular() {
		return nil, time.Time{}, notRegular()
	}
	f, err := os.OpenFile(p, os.O_RDONLY|noFollow, 0)
	if errors.Is(err, fs.ErrNotExist) {
		return nil, time.Time{}, fmt.Errorf("saved scenario %q: %w", name, ErrNotFound)
	}
	if isLinkRefused(err) {
		return nil, time.Time{}, notRegular() // a link swapped in after the Lstat
	}
	if err != nil {
		return nil, time.Time{}, err
	}
	defer f.Close()
	fi, err := f.Stat()
	if err != nil {
		return nil, time.Time{}, err
	}
	if !fi.Mode().IsRegular() {
		return nil, time.Time{}, notRegular()
	}
	if fi.Size() > MaxDocumentBytes {
		return nil, time.Time{}, fmt.Errorf("saved scenario %q: %d bytes: %w", name, fi.Size(), ErrTooLarge)
	}
	data := make([]byte, fi.Size())
	if _, err := f.ReadAt(data, 0); err != nil && fi.Size() > 0 {
		return nil, time.Time{}, fmt.Errorf("read saved scenario %q: %w", name, err)
	}
	return data, fi.ModTime(), nil
}

// Get returns the stored JSON of a saved scenario and its description.
// A missing name gives an error wrapping ErrNotFound.
func (st *Store) Get(name string) ([]byte, Saved, error) {
	if err := ValidName(name); err != nil {
		return nil, Saved{}, err
	}
	data, mod, err := st.read(name)
	if err != nil {
		return nil, Saved{}, err
	}
	return data, describeSaved(name, data, mod), nil
}

// check tests the precondition match against the current file of name.
func (st *Store) check(name, match string) (exists bool, err error) {
	data, _, err := st.read(name)
	switch {
	case errors.Is(err, ErrNotFound):
		if match != MatchNone {
			return false, fmt.Errorf("saved scenario %q no longer exists: %w", name, ErrConflict)
		}
		return false, nil
	case err != nil:
		return false, err
	case match == MatchNone:
		return true, fmt.Errorf("saved scenario %q already exists; give its revision to replace it: %w", name, ErrConflict)
	case match == MatchNever:
		return true, fmt.Errorf("saved scenario %q: a weak entity tag never matches (If-Match compares strongly); send the ETag as given: %w", name, ErrConflict)
	case match != MatchAny && !slices.Contains(strings.Split(match, ","), revision(data)):
		return true, fmt.Errorf("saved scenario %q changed since revision %s (now %s): %w", name, match, revision(data), ErrConflict)
	}
	return true, nil
}

// Put saves s under name as canonical JSON. match is MatchNone to create
// a new name, MatchAny to replace an existing one, or the revision the
// caller last read (or several, comma-separated: any of them will do); a failed precondition gives an error wrapping
// ErrConflict. It reports whether the name was created.
func (st *Store) Put(name string, s *Scenario, match string) (Saved, bool, error) {
	if err := ValidName(name); err != nil {
		return Saved{}, false, err
	}
	data, err := Canonical(s)
	if err != nil {
		return Saved{}, false, fmt.Errorf("save scenario %q: %w", name, err)
	}
	data = append(data, '\n')
	var exists bool
	err = st.exclusive(name, func() error {
		var err error
		if exists, err = st.check(name, match); err != nil {
			return err
		}
		if err := st.writeAtomic(name, data); err != nil {
			return fmt.Errorf("save scenario %q: %w", name, explainWrite(st.dir, err))
		}
		return nil
	})
	if err != nil {
		return Saved{}, false, err
	}
	return describeSaved(name, data, time.Now()), !exists, nil
}

// writeAtomic replaces dir/name.json with data: a temporary file in the
// same directory is written and synced, renamed over the target, and the
// directory is synced so that the rename itself is durable.
func (st *Store) writeAtomic(name string, data []byte) error {
	tmp, err := os.CreateTemp(st.dir, "."+name+".*.tmp")
	if err != nil {
		return err
	}
	defer os.Remove(tmp.Name()) // fails harmlessly after the rename
	if _, err := tmp.Write(data); err != nil {
		tmp.Close()
		return err
	}
	if err := tmp.Sync(); err != nil {
		tmp.Close()
		return err
	}
	if err := tmp.Close(); err != nil {
		return err
	}
	if err := os.Rename(tmp.Name(), st.path(name)); err != nil {
		return err
	}
	return st.syncDir()
}

func (st *Store) syncDir() error {
	d, err := os.Open(st.dir)
	if err != nil {
		return err
	}
	defer d.Close()
	if err := d.Sync(); err != nil && !errors.Is(err, os.ErrInvalid) {
		return err
	}
	return nil
}

// Delete removes a saved scenario. match is MatchAny or the revision the
// caller last read; a stale revision gives an error wrapping ErrConflict
// and a missing name one wrapping ErrNotFound.
func (st *Store) Delete(name, match string) error {
	if err := ValidName(name); err != nil {
		return err
	}
	if match == MatchNone {
		match = MatchAny
	}
	return st.exclusive(name, func() error {
		if _, _, err := st.read(name); err != nil {
			return err
		}
		if _, err := st.check(name, match); err != nil {
			return err
		}
		if err := os.Remove(st.path(name)); err != nil {
			return fmt.Errorf("delete saved scenario %q: %w", name, explainWrite(st.dir, err))
		}
		return st.syncDir()
	})
}
