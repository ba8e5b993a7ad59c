package parallel

import (
	"errors"
	"runtime"
	"sync"
)

// errStopped is what yield returns once Ordered has stopped.
var errStopped = errors.New("parallel: stopped")

// Ordered is a pipeline: source yields items one by one (reading a file,
// say), work runs on up to runtime.GOMAXPROCS(0) goroutines while source
// is still yielding, and done receives every item with its result in the
// order source yielded them, on the calling goroutine, as soon as the
// results before it are done. At most window items (at least one per
// worker) are between yield and done at any time, so the memory held is a
// window of items, however many source yields.
//
// When done returns an error, or source does, the pipeline stops: yield
// returns an error from then on (source should return it), items not yet
// worked on are skipped, done is not called again, and Ordered returns the
// first of the two errors once every goroutine has ended.
func Ordered[T, R any](window int, source func(yield func(T) error) error, work func(T) R, done func(T, R) error) error {
	workers := runtime.GOMAXPROCS(0)
	if window < workers {
		window = workers
	}
	type job struct {
		seq  int
		item T
	}
	type result struct {
		job
		res R
		ok  bool
	}
	jobs := make(chan job, window)
	results := make(chan result, window)
	slots := make(chan struct{}, window) // one per item between yield and done
	stop := make(chan struct{})
	var stopOnce sync.Once
	halt := func() { stopOnce.Do(func() { close(stop) }) }

	var srcErr error
	go func() {
		defer close(jobs)
		seq := 0
		srcErr = source(func(item T) error {
			select {
			case slots <- struct{}{}:
			case <-stop:
				return errStopped
			}
			jobs <- job{seq, item}
			seq++
			return nil
		})
		if srcErr != nil {
			halt()
		}
	}()
	var wg sync.WaitGroup
	for w := 0; w < workers; w++ {
		wg.Add(1)
		go func() {
			defer wg.Done()
			for j := range jobs {
				select {
				case <-stop:
					continue
				default:
				}
				results <- result{job: j, res: work(j.item)}
			}
		}()
	}
	go func() {
		wg.Wait()
		close(results)
	}()

	stopped := func() bool {
		select {
		case <-stop:
			return true
		default:
			return false
		}
	}
	ring := make([]result, window)
	next := 0
	var doneErr error
	for r := range results {
		if stopped() {
			continue
		}
		r.ok = true
		ring[r.seq%window] = r
		for !stopped() {
			slot := &ring[next%window]
			if !slot.ok || slot.seq != next {
				break
			}
			err := done(slot.item, slot.res)
			*slot = result{}
			next++
			<-slots
			if err != nil {
				doneErr = err
				halt()
			}
		}
	}
	if doneErr != nil {
		return doneErr
	}
	return srcErr
}
