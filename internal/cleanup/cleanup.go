// Package cleanup keeps track of the temporary files and folders fickfit
// creates while it writes its outputs, so that a run stopped by an
// interrupt (SIGINT, SIGTERM) removes them before it exits: an output is
// whole or absent, never half-written, and no temporary is left behind.
//
// Creating a temporary and registering it happen under one lock, and after
// Interrupt every request fails, so that no temporary can appear between
// the cleanup and the exit. A short step that must not be cut in the middle
// (moving a finished report into place) runs inside Hold: Interrupt waits
// for it to end, and a step that has not begun does not begin.
package cleanup

import (
	"errors"
	"os"
	"sync"
)

// ErrInterrupted is returned when a temporary is asked for after Interrupt.
var ErrInterrupted = errors.New("interrupted")

var (
	gate    sync.RWMutex // held for reading by Hold, for writing by Interrupt
	mu      sync.Mutex   // guards the fields below
	pending = map[int]func(){}
	next    int
	stopped bool
)

// Register adds fn to the functions Interrupt runs and returns the
// function that takes it off again (call it once the temporary is gone or
// has become an output). It fails after Interrupt.
func Register(fn func()) (forget func(), err error) {
	mu.Lock()
	defer mu.Unlock()
	if stopped {
		return nil, ErrInterrupted
	}
	return add(fn), nil
}

// add registers fn; mu must be held.
func add(fn func()) func() {
	id := next
	next++
	pending[id] = fn
	return func() {
		mu.Lock()
		delete(pending, id)
		mu.Unlock()
	}
}

// CreateTemp is os.CreateTemp with the file registered for removal at an
// interrupt; forget takes it off the list.
func CreateTemp(dir, pattern string) (f *os.File, forget func(), err error) {
	mu.Lock()
	defer mu.Unlock()
	if stopped {
		return nil, nil, ErrInterrupted
	}
	if f, err = os.CreateTemp(dir, pattern); err != nil {
		return nil, nil, err
	}
	name := f.Name()
	return f, add(func() { f.Close(); os.Remove(name) }), nil
}

// MkdirTemp is os.MkdirTemp with the folder (and whatever is in it)
// registered for removal at an interrupt; forget takes it off the list.
func MkdirTemp(dir, pattern string) (name string, forget func(), err error) {
	mu.Lock()
	defer mu.Unlock()
	if stopped {
		return "", nil, ErrInterrupted
	}
	if name, err = os.MkdirTemp(dir, pattern); err != nil {
		return "", nil, err
	}
	return name, add(func() { os.RemoveAll(name) }), nil
}

// Hold runs fn with interrupts held off: an Interrupt that arrives
// meanwhile waits until fn has returned. After an Interrupt fn is not run
// and Hold returns ErrInterrupted. Keep fn short (renames, not
// computations). fn may call Register and the Create functions.
func Hold(fn func() error) error {
	gate.RLock()
	defer gate.RUnlock()
	mu.Lock()
	s := stopped
	mu.Unlock()
	if s {
		return ErrInterrupted
	}
	return fn()
}

// Interrupt waits for the steps in Hold to end, then runs every registered
// function, newest first, and refuses every later request. Call it from
// the signal handler just before the process exits.
func Interrupt() {
	gate.Lock()
	defer gate.Unlock()
	mu.Lock()
	stopped = true
	fns := make([]func(), 0, len(pending))
	for id := next - 1; id >= 0; id-- {
		if fn, ok := pending[id]; ok {
			fns = append(fns, fn)
			delete(pending, id)
		}
	}
	mu.Unlock()
	for _, fn := range fns {
		fn()
	}
}

// Reset forgets every registration and accepts requests again (for tests
// that call Interrupt).
func Reset() {
	mu.Lock()
	defer mu.Unlock()
	pending = map[int]func(){}
	stopped = false
}

// Pending reports how many temporaries are registered (for tests).
func Pending() int {
	mu.Lock()
	defer mu.Unlock()
	return len(pending)
}
