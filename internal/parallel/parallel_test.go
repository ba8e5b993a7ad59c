package parallel

import (
	"errors"
	"runtime"
	"strings"
	"sync"
	"sync/atomic"
	"testing"
	"time"
)

// TestFor: every job runs once, its slot is written, progress counts up to n.
func TestFor(t *testing.T) {
	for _, n := range []int{0, 1, 7, 1000} {
		out := make([]int, n)
		var calls atomic.Int64
		last := 0
		For(n, func(i int) { out[i] = i * i; calls.Add(1) }, func(done, total int) {
			if done != last+1 || total != n {
				t.Errorf("progress %d/%d after %d", done, total, last)
			}
			last = done
		})
		if int(calls.Load()) != n || last != n {
			t.Errorf("n=%d: %d calls, progress ended at %d", n, calls.Load(), last)
		}
		for i, v := range out {
			if v != i*i {
				t.Fatalf("slot %d = %d", i, v)
			}
		}
	}
}

// TestScratch: each worker gets its own scratch, created once, and no two
// jobs use one scratch at the same time.
func TestScratch(t *testing.T) {
	type buf struct{ busy atomic.Bool }
	var made atomic.Int64
	out := make([]int, 500)
	Scratch(len(out), 3, func() *buf { made.Add(1); return &buf{} }, func(i int, b *buf) {
		if !b.busy.CompareAndSwap(false, true) {
			t.Error("a scratch value is shared by two running jobs")
		}
		out[i] = i + 1
		b.busy.Store(false)
	}, nil)
	if m := made.Load(); m < 1 || m > 3 {
		t.Errorf("%d scratch values for 3 workers", m)
	}
	for i, v := range out {
		if v != i+1 {
			t.Fatalf("slot %d not written", i)
		}
	}
}

// TestOrdered: every item is done once, in the order yielded, with its own
// result, and never more than about window items are between yield and
// done.
func TestOrdered(t *testing.T) {
	for _, n := range []int{0, 1, 7, 1000} {
		var inFlight, most atomic.Int64
		next := 0
		err := Ordered(8, func(yield func(int) error) error {
			for i := 0; i < n; i++ {
				if err := yield(i); err != nil {
					return err
				}
				if f := inFlight.Add(1); f > most.Load() {
					most.Store(f)
				}
			}
			return nil
		}, func(i int) int {
			if i%5 == 0 {
				time.Sleep(50 * time.Microsecond) // finish out of order
			}
			return i * i
		}, func(i, sq int) error {
			inFlight.Add(-1)
			if i != next || sq != i*i {
				t.Errorf("done(%d, %d) after %d items", i, sq, next)
			}
			next++
			return nil
		})
		if err != nil || next != n {
			t.Errorf("n=%d: %d done, error %v", n, next, err)
		}
		// A window of 8 holds at least a batch per worker, and the batch
		// being filled.
		if m, bound := most.Load(), int64(max(8, runtime.GOMAXPROCS(0)*orderedBatch)+orderedBatch); m > bound {
			t.Errorf("n=%d: %d items in flight, more than %d", n, m, bound)
		}
	}
}

// TestOrderedErrors: an error from done or from source stops the pipeline
// and is returned; yield fails from then on and done is not called again.
func TestOrderedErrors(t *testing.T) {
	bad := errors.New("bad")
	calls := 0
	yieldErr := error(nil)
	err := Ordered(4, func(yield func(int) error) error {
		for i := 0; i < 1000; i++ {
			if err := yield(i); err != nil {
				yieldErr = err
				return err
			}
		}
		return nil
	}, func(i int) int { return i }, func(i, _ int) error {
		calls++
		if i == 10 {
			return bad
		}
		return nil
	})
	if err != bad || calls != 11 || yieldErr == nil {
		t.Errorf("done error: got %v after %d calls (yield %v)", err, calls, yieldErr)
	}
	calls = 0
	err = Ordered(4, func(yield func(int) error) error {
		for i := 0; i < 10; i++ {
			if err := yield(i); err != nil {
				return err
			}
		}
		return bad
	}, func(i int) int { return i }, func(i, _ int) error { calls++; return nil })
	if err != bad || calls > 10 {
		t.Errorf("source error: got %v after %d calls", err, calls)
	}
}

// Common practice, no source: a panic in a job reaches the caller as a
// *Panic after the other jobs ran, instead of killing the process from a
// worker goroutine.
func TestPanicReachesCaller(t *testing.T) {
	ran := make([]bool, 50)
	defer func() {
		r := recover()
		p, ok := r.(*Panic)
		if !ok {
			t.Fatalf("recovered %v (%T), want *Panic", r, r)
		}
		if p.Value != "job 7" || !strings.Contains(p.Error(), "job 7") || len(p.Stack) == 0 {
			t.Errorf("panic value %v, message %q", p.Value, p.Error())
		}
		for i, ok := range ran {
			if i != 7 && !ok {
				t.Errorf("job %d did not run", i)
			}
		}
	}()
	For(len(ran), func(i int) {
		if i == 7 {
			panic("job 7")
		}
		ran[i] = true
	}, nil)
	t.Fatal("For returned normally")
}

// TestOrderedPanic: a panic in work, source or done reaches the caller as
// a *Panic once the pipeline has stopped, instead of killing the process
// from a goroutine (common practice, no source).
func TestOrderedPanic(t *testing.T) {
	for _, where := range []string{"work", "source", "done"} {
		func() {
			defer func() {
				p, ok := recover().(*Panic)
				if !ok || p.Value != where {
					t.Errorf("%s: recovered %v", where, p)
				}
			}()
			Ordered(32, func(yield func(int) error) error {
				for i := 0; i < 1000; i++ {
					if where == "source" && i == 500 {
						panic("source")
					}
					if err := yield(i); err != nil {
						return err
					}
				}
				return nil
			}, func(i int) int {
				if where == "work" && i == 300 {
					panic("work")
				}
				return i
			}, func(i, _ int) error {
				if where == "done" && i == 100 {
					panic("done")
				}
				return nil
			})
			t.Errorf("%s: Ordered returned normally", where)
		}()
	}
}

// TestOrderedSpreadsFewItems: the items of a short input reach different
// workers (each of two items waits until both have started), so a handful
// of slow fits (profile intervals, numerical models) use every core. With
// batches of a fixed size both went to one worker (common practice, no
// source).
func TestOrderedSpreadsFewItems(t *testing.T) {
	defer runtime.GOMAXPROCS(runtime.GOMAXPROCS(2))
	var started sync.WaitGroup
	started.Add(2)
	both := make(chan struct{})
	go func() { started.Wait(); close(both) }()
	together := 0
	err := Ordered(64, func(yield func(int) error) error {
		for i := 0; i < 2; i++ {
			if err := yield(i); err != nil {
				return err
			}
		}
		return nil
	}, func(int) bool {
		started.Done()
		select {
		case <-both:
			return true
		case <-time.After(10 * time.Second):
			return false
		}
	}, func(_ int, ok bool) error {
		if ok {
			together++
		}
		return nil
	})
	if err != nil || together != 2 {
		t.Errorf("%d of 2 items were worked on together (error %v)", together, err)
	}
}
