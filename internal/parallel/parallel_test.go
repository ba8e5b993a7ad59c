package parallel

import (
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
