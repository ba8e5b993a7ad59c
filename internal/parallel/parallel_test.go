package parallel

import (
	"strings"
	"sync/atomic"
	"testing"
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
