package scenarios

import (
	"errors"
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
