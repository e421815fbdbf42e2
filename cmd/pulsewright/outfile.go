package main

import (
	"fmt"
	"io"
	"os"
	"path/filepath"
	"strings"

	"github.com/pulsewright/pulsewright/scenarios"
)

// outFile is an output written to a temporary file beside its target and
// renamed over it by Commit, so that a failed or refused run leaves the
// previous file (or none) rather than a truncated one.
type outFile struct {
	*os.File
	path string
}

// createOut opens the temporary file of an output path. It refuses a
// path that names an existing non-regular file (a directory, a device).
func createOut(path string) (*outFile, error) {
	if fi, err := os.Stat(path); err == nil && !fi.Mode().IsRegular() {
		return nil, fmt.Errorf("output %s is not a regular file", path)
	}
	dir, base := filepath.Split(path)
	if dir == "" {
		dir = "."
	}
	f, err := os.CreateTemp(dir, "."+base+".*.tmp")
	if err != nil {
		return nil, fmt.Errorf("create %s: %w", path, explainIO(err))
	}
	return &outFile{File: f, path: path}, nil
}

// Commit syncs, closes and renames the temporary file over the target.
func (f *outFile) Commit() error {
	err := f.Sync()
	if cerr := f.Close(); err == nil {
		err = cerr
	}
	if err == nil {
		err = os.Rename(f.Name(), f.path)
	}
	if err != nil {
		os.Remove(f.Name())
		return fmt.Errorf("write %s: %w", f.path, explainIO(err))
	}
	return nil
}

// Abort closes and removes the temporary file; the target is untouched.
func (f *outFile) Abort() {
	f.Close()
	os.Remove(f.Name())
}

// writeFile writes path atomically with fn, reporting the first error.
func writeFile(path string, fn func(io.Writer) error) error {
	f, err := createOut(path)
	if err != nil {
		return err
	}
	if err := fn(f); err != nil {
		f.Abort()
		return fmt.Errorf("write %s: %w", path, explainIO(err))
	}
	return f.Commit()
}

// explainIO adds what to do to the errors of a full or read-only disk.
func explainIO(err error) error {
	switch {
	case scenarios.IsNoSpace(err):
		return fmt.Errorf("%w (the disk is full: free some space)", err)
	case scenarios.IsReadOnly(err):
		return fmt.Errorf("%w (the file system is read-only: write somewhere else)", err)
	}
	return err
}

// checkOutputs refuses outputs that would overwrite the scenario being
// read (ref, when it is a file) or each other. Empty outputs are unset
// flags.
func checkOutputs(ref string, outs map[string]string) error {
	same := sameFile
	isFile := ref != "-" && !strings.HasPrefix(ref, "demo:") && !scenarios.IsLink(ref)
	seen := map[string]string{}
	for flag, path := range outs {
		if path == "" {
			continue
		}
		if isFile && same(ref, path) {
			return usageError{fmt.Sprintf("%s %s is the scenario being read: choose another output file", flag, path)}
		}
		for other, p := range seen {
			if same(p, path) {
				return usageError{fmt.Sprintf("%s and %s both name %s", other, flag, path)}
			}
		}
		seen[flag] = path
	}
	return nil
}

// sameFile reports whether a and b name one file (or one path, when
// either does not exist).
func sameFile(a, b string) bool {
	fa, ea := os.Stat(a)
	fb, eb := os.Stat(b)
	if ea == nil && eb == nil {
		return os.SameFile(fa, fb)
	}
	aa, e1 := filepath.Abs(a)
	ab, e2 := filepath.Abs(b)
	return e1 == nil && e2 == nil && aa == ab
}
