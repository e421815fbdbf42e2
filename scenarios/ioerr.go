package scenarios

import (
	"errors"
	"fmt"
	"io/fs"
	"syscall"
)

// IsNoSpace reports whether err is a write that failed for want of disk
// space or quota.
func IsNoSpace(err error) bool {
	return errors.Is(err, syscall.ENOSPC) || errors.Is(err, syscall.EDQUOT)
}

// IsReadOnly reports whether err is a write refused by a read-only file
// system or by permissions.
func IsReadOnly(err error) bool {
	return errors.Is(err, syscall.EROFS) || errors.Is(err, fs.ErrPermission)
}

// ErrNotRegular marks an entry of the store's directory that is not a
// regular file (a symbolic link, a directory, a device): the store never
// follows or reads one.
var ErrNotRegular = errors.New("not a regular file")

// ErrStorage marks a write the file system refused for a reason the user
// can act on: a full disk or a read-only directory. The error's text says
// which and what to do.
var ErrStorage = errors.New("storage")

// storageError explains a failed write of the store in dir.
type storageError struct {
	msg string
	err error
}

func (e *storageError) Error() string { return e.msg }
func (e *storageError) Unwrap() []error {
	return []error{ErrStorage, e.err}
}

// explainWrite turns the errors of a full disk or a read-only directory
// into a storageError naming dir; others pass unchanged.
func explainWrite(dir string, err error) error {
	switch {
	case err == nil:
		return nil
	case IsNoSpace(err):
		return &storageError{fmt.Sprintf("the disk holding %s is full: free some space and save again", dir), err}
	case IsReadOnly(err):
		return &storageError{fmt.Sprintf("the data directory %s is read-only or not writable by this user: make it writable, or start the server with --data-dir on a writable directory", dir), err}
	}
	return err
}
