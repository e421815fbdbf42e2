//go:build unix

package scenarios

import (
	"errors"
	"os"
	"syscall"
)

// dirLock is an advisory lock on a store's directory, shared by every
// process that opens the store: flock(2) on dir/.lock. The kernel drops
// it when its holder exits, however it exits.
type dirLock struct{ path string }

// lock takes the lock, waiting for another holder; unlock releases it.
func (l dirLock) lock() (unlock func(), err error) {
	f, err := os.OpenFile(l.path, os.O_RDWR|os.O_CREATE, 0o600)
	if err != nil {
		return nil, err
	}
	for {
		err = syscall.Flock(int(f.Fd()), syscall.LOCK_EX)
		if !errors.Is(err, syscall.EINTR) {
			break
		}
	}
	if err != nil {
		f.Close()
		return nil, err
	}
	return func() {
		syscall.Flock(int(f.Fd()), syscall.LOCK_UN)
		f.Close()
	}, nil
}

// tryLock takes the lock only when it is free now.
func (l dirLock) tryLock() (unlock func(), ok bool) {
	f, err := os.OpenFile(l.path, os.O_RDWR|os.O_CREATE, 0o600)
	if err != nil {
		return nil, false
	}
	if err := syscall.Flock(int(f.Fd()), syscall.LOCK_EX|syscall.LOCK_NB); err != nil {
		f.Close()
		return nil, false
	}
	return func() {
		syscall.Flock(int(f.Fd()), syscall.LOCK_UN)
		f.Close()
	}, true
}

// staleAfter is how old a temporary file must be, besides the lock being
// free, to be removed at start; with flock the free lock alone proves
// that no writer is alive, so any age will do.
const staleAfter = 0

// noFollow makes an open fail on a symbolic link.
const noFollow = syscall.O_NOFOLLOW

// isLinkRefused reports whether err is an open refused by noFollow.
func isLinkRefused(err error) bool { return errors.Is(err, syscall.ELOOP) }
