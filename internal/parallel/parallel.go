// Package parallel runs independent jobs over the available cores.
package parallel

import (
	"runtime"
	"sync"
)

// For calls fn(i) for i = 0…n−1 on up to runtime.GOMAXPROCS(0) goroutines
// and returns when all have finished. Each fn writes only its own slot, so
// results come out in input order whatever the scheduling. When progress is
// not nil it is called from the calling goroutine after each finished job,
// with the count done so far.
func For(n int, fn func(i int), progress func(done, total int)) {
	workers := runtime.GOMAXPROCS(0)
	if workers > n {
		workers = n
	}
	jobs := make(chan int)
	done := make(chan struct{})
	var wg sync.WaitGroup
	for w := 0; w < workers; w++ {
		wg.Add(1)
		go func() {
			defer wg.Done()
			for i := range jobs {
				fn(i)
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
}
