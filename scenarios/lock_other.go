//go:build !unix

package scenarios

import (
	"errors"
	"os"
	"time"
)

// dirLock is a lock on a store's directory shared by processes, where
// flock(2) is missing: the exclusive creation of dir/.lock.held. A holder
// that died leaves it behind; one older than lockStale is taken over.
type dirLock struct{ path string }

const lockStale = 30 * time.Second

func (l dirLock) held() string { return l.path + ".held" }

func (l dirLock) lock() (unlock func(), err error) {
	deadline := time.Now().Add(2 * lockStale)
	for {
		if u, ok := l.tryLock(); ok {
			return u, nil
		}
		if fi, err := os.Stat(l.held()); err == nil && time.Since(fi.ModTime()) > lockStale {
			os.Remove(l.held())
			continue
		}
		if time.Now().After(deadline) {
			return nil, errors.New("the store's lock file " + l.held() + " is held; remove it if no Pulsewright is running")
		}
		time.Sleep(10 * time.Millisecond)
	}
}

func (l dirLock) tryLock() (unlock func(), ok bool) {
	f, err := os.OpenFile(l.held(), os.O_RDWR|os.O_CREATE|os.O_EXCL, 0o600)
	if err != nil {
		return nil, false
	}
	f.Close()
	return func() { os.Remove(l.held()) }, true
}

// staleAfter is how old a temporary file must be, besides the lock being
// free, to be removed at start: without flock a writer that died holding
// nothing cannot be told from a slow one, so only old files go.
const staleAfter = time.Hour

// noFollow is 0 where O_NOFOLLOW is missing: the Lstat before the open and
// the check of the opened file remain.
const noFollow = 0

func isLinkRefused(error) bool { return false }
