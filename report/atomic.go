package report

import (
	"bufio"
	"errors"
	"fmt"
	"io"
	"io/fs"
	"os"
	"path/filepath"

	"github.com/fickfit/fickfit/internal/cleanup"
)

// ErrWouldOverwriteInput is returned when an output path is one of the
// inputs: fickfit never replaces an input file.
var ErrWouldOverwriteInput = errors.New("output would overwrite an input file")

// ErrExists is returned when an output file exists and replacing it was
// not asked for (--force).
var ErrExists = errors.New("output file exists")

// ErrNotRegular is returned when an output path names something other
// than a regular file (a folder, a device such as /dev/null, a named pipe,
// a socket): fickfit writes by renaming a finished temporary file over the
// target, which would replace such a thing by a plain file, so it refuses.
var ErrNotRegular = errors.New("not a regular file")

// Output writes output files safely: each file goes to a temporary file in
// the target folder and is renamed over the target only when completely
// written, so that a reader never sees a half-written output and a failed
// or interrupted run leaves the old file in place and no temporary behind.
// The zero value refuses to replace an existing file and protects no
// inputs.
type Output struct {
	// Force allows replacing existing files (never inputs).
	Force bool
	// Inputs are files that must never be replaced, whatever Force says.
	// They are compared by identity (os.SameFile), so another spelling of
	// the same path, a symbolic link or a hard link to it, or a path
	// through a linked folder is caught too.
	Inputs []string
}

// Target checks that path may be written and returns the file to replace:
// path itself, or the file a symbolic link at path points to (the link is
// kept and its target replaced). It refuses a path that exists and is not
// a regular file, that is one of the inputs, or that exists when Force is
// not set.
func (o Output) Target(path string) (string, error) {
	fi, err := os.Lstat(path)
	if errors.Is(err, fs.ErrNotExist) {
		return path, nil
	}
	if err != nil {
		return "", fmt.Errorf("%s: %w", path, err)
	}
	target := path
	if fi.Mode()&fs.ModeSymlink != 0 {
		if target, err = filepath.EvalSymlinks(path); err != nil {
			return "", fmt.Errorf("%s is a symbolic link that leads nowhere (%v): remove it or choose another output name", path, unwrapPath(err))
		}
		if fi, err = os.Stat(target); err != nil {
			return "", fmt.Errorf("%s: %w", path, err)
		}
	}
	if !fi.Mode().IsRegular() {
		return "", fmt.Errorf("%s: %w (%s): fickfit replaces only regular files; choose another output name%s",
			path, ErrNotRegular, fileKind(fi.Mode()), streamHint(fi.Mode()))
	}
	if in := o.inputAt(fi); in != "" {
		return "", fmt.Errorf("%s: %w (%s); choose another output name", path, ErrWouldOverwriteInput, in)
	}
	if !o.Force {
		return "", fmt.Errorf("%s: %w; use --force to replace it or choose another output name", path, ErrExists)
	}
	return target, nil
}

// inputAt returns the input that is the file fi, or "".
func (o Output) inputAt(fi os.FileInfo) string {
	for _, in := range o.Inputs {
		if ii, err := os.Stat(in); err == nil && os.SameFile(fi, ii) {
			return in
		}
	}
	return ""
}

// fileKind names what a non-regular file is, for messages.
func fileKind(m fs.FileMode) string {
	switch {
	case m.IsDir():
		return "a folder"
	case m&fs.ModeCharDevice != 0:
		return "a character device"
	case m&fs.ModeDevice != 0:
		return "a block device"
	case m&fs.ModeNamedPipe != 0:
		return "a named pipe"
	case m&fs.ModeSocket != 0:
		return "a socket"
	}
	return "not a regular file"
}

// streamHint tells how to write to a device or pipe instead.
func streamHint(m fs.FileMode) string {
	if m.IsDir() {
		return ""
	}
	return " (to write to a device or a pipe, use -o - and redirect standard output)"
}

// unwrapPath drops the operation and path of an *fs.PathError, which the
// message names already.
func unwrapPath(err error) error {
	var pe *fs.PathError
	if errors.As(err, &pe) {
		return pe.Err
	}
	return err
}

// WriteFile writes path atomically with write. On any error, and when the
// run is interrupted, the target is untouched and the temporary file
// removed.
func (o Output) WriteFile(path string, write func(io.Writer) error) (err error) {
	target, err := o.Target(path)
	if err != nil {
		return err
	}
	dir := filepath.Dir(target)
	tmp, forget, err := cleanup.CreateTemp(dir, "."+filepath.Base(target)+".tmp-*")
	if err != nil {
		return fmt.Errorf("cannot write in %s: %w", dir, unwrapPath(err))
	}
	defer forget()
	name := tmp.Name()
	defer func() {
		if err != nil {
			tmp.Close()
			os.Remove(name)
		}
	}()
	bw := bufio.NewWriterSize(newWriteback(tmp), 64<<10)
	if err = write(bw); err != nil {
		return fmt.Errorf("%s: %w", path, err)
	}
	if err = bw.Flush(); err != nil {
		return fmt.Errorf("%s: %w", path, err)
	}
	if err = tmp.Sync(); err != nil {
		return fmt.Errorf("%s: %w", path, err)
	}
	if err = tmp.Close(); err != nil {
		return fmt.Errorf("%s: %w", path, err)
	}
	if err = os.Chmod(name, 0o644); err != nil {
		return fmt.Errorf("%s: %w", path, err)
	}
	// Check again just before the rename: the target may have changed
	// while the output was computed and written.
	err = cleanup.Hold(func() error {
		if _, err := o.Target(target); err != nil {
			return err
		}
		if err := os.Rename(name, target); err != nil {
			return fmt.Errorf("%s: %w", path, err)
		}
		return nil
	})
	return err
}

// WriteFileAtomic writes path through a temporary file in the same folder
// and a rename, replacing an existing regular file. Use Output to refuse
// replacing existing files or inputs.
func WriteFileAtomic(path string, write func(io.Writer) error) error {
	return Output{Force: true}.WriteFile(path, write)
}
