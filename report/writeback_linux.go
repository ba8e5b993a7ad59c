package report

import (
	"os"

	"golang.org/x/sys/unix"
)

// startWriteback starts the write to the disk of n bytes of f from off
// (sync_file_range with SYNC_FILE_RANGE_WRITE: it does not wait for the
// disk). It is advice: an error is left to the Sync that follows.
func startWriteback(f *os.File, off, n int64) {
	rc, err := f.SyscallConn()
	if err != nil {
		return
	}
	rc.Control(func(fd uintptr) {
		unix.SyncFileRange(int(fd), off, n, unix.SYNC_FILE_RANGE_WRITE)
	})
}
