// Package parallel runs independent jobs over the available cores: the one
// worker pool of fickfit (batch fits, campaign fits, figure rendering,
// bootstrap replicates).
package parallel

import (
	"fmt"
	"runtime"
	"runtime/debug"
	"sync"
)

// For calls fn(i) for i = 0…n−1 on up to runtime.GOMAXPROCS(0) goroutines
// and returns when all have finished. Each fn writes only its own slot, so
// results come out in input order whatever the scheduling. When progress is
// not nil it is called from the calling goroutine after each finished job,
// with the count done so far.
func For(n int, fn func(i int), progress func(done, total int)) {
	Scratch(n, 0, func() struct{} { return struct{}{} }, func(i int, _ struct{}) { fn(i) }, progress)
}

// Scratch is For with a scratch value per worker: newScratch is called
// once for each goroutine (at most workers of them; workers ≤ 0 means
// runtime.GOMAXPROCS(0)) and its value is handed to every job that
// goroutine runs, so that jobs reuse buffers without sharing them. A job
// must not keep its scratch after it returns.
//
// A panic in a job does not crash the process from a worker goroutine:
// the remaining jobs run, and the first panic is raised again in the
// calling goroutine as a *Panic carrying the worker's stack, where the
// caller (the command line) can recover it.
func Scratch[S any](n, workers int, newScratch func() S, fn func(i int, s S), progress func(done, total int)) {
	if workers <= 0 {
		workers = runtime.GOMAXPROCS(0)
	}
	if workers > n {
		workers = n
	}
	jobs := make(chan int)
	done := make(chan struct{})
	var wg sync.WaitGroup
	var once sync.Once
	var first *Panic
	run := func(i int, s S) {
		defer func() {
			if r := recover(); r != nil {
				once.Do(func() { first = &Panic{Value: r, Stack: debug.Stack()} })
			}
		}()
		fn(i, s)
	}
	for w := 0; w < workers; w++ {
		wg.Add(1)
		go func() {
			defer wg.Done()
			var s S
			ok := func() (ok bool) {
				defer func() {
					if r := recover(); r != nil {
						once.Do(func() { first = &Panic{Value: r, Stack: debug.Stack()} })
					}
				}()
				s = newScratch()
				return true
			}()
			for i := range jobs {
				if ok {
					run(i, s)
				}
				done <- struct{}{}
			}
		}()
	}
	go func() {
		for i := 0; i < n; i++ {
			jobs <- i
		}
		close(jobs)
		wg.Wait()
		close(done)
	}()
	k := 0
	for range done {
		k++
		if progress != nil {
			progress(k, n)
		}
	}
	if first != nil {
		panic(first)
	}
}

// Panic is a panic of a job, raised again in the goroutine that called For
// or Scratch.
type Panic struct {
	Value any    // what the job panicked with
	Stack []byte // the worker's stack at the panic
}

// Error writes the panic's value and the worker's stack.
func (p *Panic) Error() string { return fmt.Sprintf("%v (in a worker)\n\n%s", p.Value, p.Stack) }
