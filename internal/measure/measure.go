// Package measure holds what the benchmarks measure besides time: the CPU
// time of the process (all cores) and the largest heap seen while a piece
// of work runs. It is for benchmarks; nothing else imports it.
package measure

import (
	"runtime/metrics"
	"sync/atomic"
	"time"
)

// PeakHeap samples the heap-object footprint every millisecond and keeps
// the largest value.
type PeakHeap struct {
	peak       atomic.Uint64
	stop, done chan struct{}
}

// StartPeakHeap starts sampling.
func StartPeakHeap() *PeakHeap {
	s := &PeakHeap{stop: make(chan struct{}), done: make(chan struct{})}
	sample := []metrics.Sample{{Name: "/memory/classes/heap/objects:bytes"}}
	go func() {
		defer close(s.done)
		tick := time.NewTicker(time.Millisecond)
		defer tick.Stop()
		for {
			metrics.Read(sample)
			if v := sample[0].Value.Uint64(); v > s.peak.Load() {
				s.peak.Store(v)
			}
			select {
			case <-s.stop:
				return
			case <-tick.C:
			}
		}
	}()
	return s
}

// Stop ends the sampling and returns the largest heap seen, in bytes.
func (s *PeakHeap) Stop() uint64 {
	close(s.stop)
	<-s.done
	return s.peak.Load()
}
