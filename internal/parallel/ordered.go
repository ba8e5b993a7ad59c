package parallel

import (
	"errors"
	"runtime"
	"runtime/debug"
	"sync"
	"sync/atomic"
	"time"
)

// errStopped is what yield returns once Ordered has stopped.
var errStopped = errors.New("parallel: stopped")

// orderedBatch is the most items Ordered hands a worker at once: a channel
// operation and a wake-up cost about a microsecond, a fast fit ten or more.
const orderedBatch = 16

// batchWork is the work a batch should hold: Ordered sizes its batches
// from the measured time per item (at least one item, at most
// orderedBatch), so that items costing milliseconds (fits with profile
// intervals, numerical models) go to the workers one by one and every
// core gets some of a small input, while items costing microseconds travel
// in batches that make the hand-over negligible.
const batchWork = 200 * time.Microsecond

// Ordered is a pipeline: source yields items one by one (reading a file,
// say), work runs on up to runtime.GOMAXPROCS(0) goroutines while source
// is still yielding, and done receives every item with its result in the
// order source yielded them, on the calling goroutine, as soon as the
// results before it are done. Items travel in batches sized from the time
// an item takes (batchWork); at most window items (at least a full batch
// per worker) are between yield and done at any time, so the memory held
// is a window of items, however many source yields.
//
// When done returns an error, or source does, the pipeline stops: yield
// returns an error from then on (source should return it), items not yet
// worked on are skipped, done is not called again, and Ordered returns the
// first of the two errors (done's) once every goroutine has ended. A panic
// in source, work or done stops it too, and is raised again in the calling
// goroutine once every goroutine has ended, as a *Panic (as For does).
func Ordered[T, R any](window int, source func(yield func(T) error) error, work func(T) R, done func(T, R) error) error {
	workers := runtime.GOMAXPROCS(0)
	window = max(window, workers*orderedBatch) // items between yield and done
	type job struct {
		seq   int
		items []T
	}
	type result struct {
		job
		res []R
		ok  bool
	}
	// A batch holds at least one item, so at most window batches are out.
	jobs := make(chan job, window)
	results := make(chan result, window)
	tokens := make(chan struct{}, window) // one per item between yield and done
	stop := make(chan struct{})
	var stopOnce sync.Once
	halt := func() { stopOnce.Do(func() { close(stop) }) }
	var perItem atomic.Int64 // ns an item took in the last batch worked (0: none yet)
	batchSize := func() int {
		c := perItem.Load()
		if c <= 0 {
			return 1 // nothing measured yet: the first items go out one by one
		}
		return int(min(max(int64(batchWork)/c, 1), orderedBatch))
	}

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
		send := func() {
			jobs <- job{seq, batch}
			seq++
			batch = make([]T, 0, orderedBatch)
		}
		srcErr = source(func(item T) error {
			select {
			case tokens <- struct{}{}:
			case <-stop:
				return errStopped
			}
			batch = append(batch, item)
			if len(batch) >= batchSize() {
				send()
			}
			return nil
		})
		if srcErr == nil && len(batch) > 0 {
			send()
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
				t0 := time.Now()
				func() {
					defer catch()
					for k, it := range j.items {
						res[k] = work(it)
					}
					ok = true
				}()
				perItem.Store(max(int64(time.Since(t0))/int64(len(j.items)), 1))
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

	ring := make([]result, window)
	next := 0
	var doneErr error
	collect := func(r result) {
		defer catch()
		r.ok = true
		ring[r.seq%window] = r
		for !stopped() {
			slot := &ring[next%window]
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
			for range slot.items {
				<-tokens
			}
			*slot = result{}
			next++
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
