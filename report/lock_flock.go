//go:build linux || darwin || freebsd || netbsd || openbsd || dragonfly

package report

import (
	"errors"
	"os"
	"syscall"
)

// lockFolder takes an exclusive advisory lock (flock) on the folder
// itself, without waiting: no lock file is left behind, and the lock goes
// with the process however it ends.
func lockFolder(dir string) (unlock func(), err error) {
	fh, err := os.Open(dir)
	if err != nil {
		return nil, err
	}
	if err := syscall.Flock(int(fh.Fd()), syscall.LOCK_EX|syscall.LOCK_NB); err != nil {
		fh.Close()
		if errors.Is(err, syscall.EWOULDBLOCK) {
			return nil, ErrFolderBusy
		}
		return nil, err
	}
	return func() {
		syscall.Flock(int(fh.Fd()), syscall.LOCK_UN)
		fh.Close()
	}, nil
}
