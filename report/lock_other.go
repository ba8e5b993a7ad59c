//go:build !(linux || darwin || freebsd || netbsd || openbsd || dragonfly)

package report

import (
	"errors"
	"fmt"
	"io/fs"
	"os"
	"path/filepath"
)

// lockFolder creates the lock file .fickfit-lock in the folder, failing
// when it exists. A run killed before it could remove the file leaves it
// behind; the message says so.
func lockFolder(dir string) (unlock func(), err error) {
	p := filepath.Join(dir, lockName)
	fh, err := os.OpenFile(p, os.O_WRONLY|os.O_CREATE|os.O_EXCL, 0o644)
	if errors.Is(err, fs.ErrExist) {
		return nil, fmt.Errorf("%w (%s exists; if no run is writing the folder, a run was killed: delete the file)", ErrFolderBusy, p)
	}
	if err != nil {
		return nil, err
	}
	fh.Close()
	return func() { os.Remove(p) }, nil
}
