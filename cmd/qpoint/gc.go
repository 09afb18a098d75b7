package main

import (
	"os"
	"runtime"
	"runtime/debug"
	"runtime/metrics"
)

// The garbage collector's settings the command runs with, unless the user
// set GOGC or GOMEMLIMIT. The collector's default target (100 %) cost a
// parallel study a fifth of its two-worker scaling in BENCHMARKS.md's
// measurement (1.55 against 1.92 on the attenuator study) and `qpoint
// demo` half again its time (5.9 s against 3.7 s), so a small heap may
// grow to five times what is live (gcPercent). Unbounded, that let the
// demo peak at 91 MB; switching the collector off until 1 GiB, as earlier
// versions did, let it peak at 590 MB for no gain in speed. So the target
// is bounded: the heap may always grow to heapFloor, and beyond it to
// heapFactor times what was live at the last collection (boundHeap): a
// run whose live heap is large collects a little more often than at the
// default target. A factor of three let the demo with its mixer peak at
// 61-67 MB; two at 55-61 MB; 1.75 at 55-56 MB, at the same speed (three
// alternating runs each, 11.2-11.7 s), and a 2000-step attenuator study
// at 102 MB instead of 102-110 MB (two) and 139-143 MB (three), also at
// the same speed (BENCHMARKS.md).
const (
	gcPercent  = 400
	heapFloor  = 40 << 20
	heapFactor = 1.75
)

// tuneGC sets the collector's target and its bound, unless the user set
// GOGC or GOMEMLIMIT. Closing stop ends the bound's updates (main never
// does; a test does).
func tuneGC(stop <-chan struct{}) {
	if os.Getenv("GOGC") != "" || os.Getenv("GOMEMLIMIT") != "" {
		return
	}
	debug.SetGCPercent(gcPercent)
	debug.SetMemoryLimit(heapFloor)
	boundHeap(stop)
}

// gcMark is an object made only to be collected: its cleanup runs after
// the collection that frees it. It holds a pointer so that it is not
// batched with other small objects, which would delay its collection.
type gcMark struct{ _ *int }

// boundHeap arranges that after the next collection the memory limit
// becomes heapFactor times the heap then live, but not below heapFloor,
// and then arranges the same for the collection after, until stop is
// closed.
func boundHeap(stop <-chan struct{}) {
	runtime.AddCleanup(&gcMark{}, func(struct{}) {
		select {
		case <-stop:
			return
		default:
		}
		sample := []metrics.Sample{{Name: "/gc/heap/live:bytes"}}
		metrics.Read(sample)
		if sample[0].Value.Kind() == metrics.KindUint64 {
			debug.SetMemoryLimit(heapBound(sample[0].Value.Uint64()))
		}
		boundHeap(stop)
	}, struct{}{})
}

// heapBound is the memory limit for a live heap of live bytes.
func heapBound(live uint64) int64 {
	return max(heapFloor, int64(heapFactor*float64(live)))
}
