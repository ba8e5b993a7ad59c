package parallel

import (
	"errors"
	"runtime"
	"runtime/debug"
	"sync"
)

// errStopped is what yield returns once Ordered has stopped.
var errStopped = errors.New("parallel: stopped")

// orderedBatch is how many items Ordered hands a worker at once: a
// channel operation and a wake-up cost about a microsecond, a fit tens.
const orderedBatch = 16

// Ordered is a pipeline: source yields items one by one (reading a file,
// say), work runs on up to runtime.GOMAXPROCS(0) goroutines while source
// is still yielding, and done receives every item with its result in the
// order source yielded them, on the calling goroutine, as soon as the
// results before it are done. Items travel in batches of a few; at most
// about window items (at least a batch per worker) are between yield and
// done at any time, so the memory held is a window of items, however many
// source yields.
//
// When done returns an error, or source does, the pipeline stops: yield
// returns an error from then on (source should return it), items not yet
// worked on are skipped, done is not called again, and Ordered returns the
// first of the two errors (done's) once every goroutine has ended. A panic
// in source, work or done stops it too, and is raised again in the calling
// goroutine once every goroutine has ended, as a *Panic (as For does).
func Ordered[T, R any](window int, source func(yield func(T) error) error, work func(T) R, done func(T, R) error) error {
	workers := runtime.GOMAXPROCS(0)
	batches := max(window/orderedBatch, workers) // batches between yield and done
	type job struct {
		seq   int
		items []T
	}
	type result struct {
		job
		res []R
		ok  bool
	}
	jobs := make(chan job, batches)
	results := make(chan result, batches)
	slots := make(chan struct{}, batches) // one per batch between yield and done
	stop := make(chan struct{})
	var stopOnce sync.Once
	halt := func() { stopOnce.Do(func() { close(stop) }) }

	var panicOnce sync.Once
	var first *Panic
	catch := func() {
		if r := recover(); r != nil {
			panicOnce.Do(func() { first = &Panic{Value: r, Stack: debug.Stack()} })
			halt()
		}
	}

	var srcErr error
	go func() {
		defer close(jobs)
		defer catch()
		seq := 0
		batch := make([]T, 0, orderedBatch)
		send := func() error {
			select {
			case slots <- struct{}{}:
			case <-stop:
				return errStopped
			}
			jobs <- job{seq, batch}
			seq++
			batch = make([]T, 0, orderedBatch)
			return nil
		}
		srcErr = source(func(item T) error {
			batch = append(batch, item)
			if len(batch) == orderedBatch {
				return send()
			}
			return nil
		})
		if srcErr == nil && len(batch) > 0 {
			srcErr = send()
		}
		if srcErr != nil {
			halt()
		}
	}()
	stopped := func() bool {
		select {
		case <-stop:
			return true
		default:
			return false
		}
	}
	var wg sync.WaitGroup
	for w := 0; w < workers; w++ {
		wg.Add(1)
		go func() {
			defer wg.Done()
			for j := range jobs {
				if stopped() {
					continue
				}
				res, ok := make([]R, len(j.items)), false
				func() {
					defer catch()
					for k, it := range j.items {
						res[k] = work(it)
					}
					ok = true
				}()
				if ok {
					results <- result{job: j, res: res}
				}
			}
		}()
	}
	go func() {
		wg.Wait()
		close(results)
	}()

	ring := make([]result, batches)
	next := 0
	var doneErr error
	collect := func(r result) {
		defer catch()
		r.ok = true
		ring[r.seq%batches] = r
		for !stopped() {
			slot := &ring[next%batches]
			if !slot.ok || slot.seq != next {
				break
			}
			for k, it := range slot.items {
				if err := done(it, slot.res[k]); err != nil {
					doneErr = err
					halt()
					break
				}
			}
			*slot = result{}
			next++
			<-slots
		}
	}
	for r := range results {
		if !stopped() {
			collect(r)
		}
	}
	if first != nil {
		panic(first)
	}
	if doneErr != nil {
		return doneErr
	}
	return srcErr
}
