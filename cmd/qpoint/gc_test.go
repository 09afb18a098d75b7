package main

import (
	"math"
	"runtime"
	"runtime/debug"
	"testing"
	"time"
)

// TestHeapBound: after tuneGC the memory limit starts at heapFloor and,
// once a collection finds more live than heapFloor/heapFactor, follows
// heapFactor times the live heap, so a large run is never held to the
// floor (which would make the collector run without pause).
func TestHeapBound(t *testing.T) {
	t.Setenv("GOGC", "")
	t.Setenv("GOMEMLIMIT", "")
	defer debug.SetGCPercent(debug.SetGCPercent(100))
	defer debug.SetMemoryLimit(debug.SetMemoryLimit(math.MaxInt64))
	stop := make(chan struct{})
	defer close(stop)
	tuneGC(stop)
	if got := debug.SetMemoryLimit(-1); got < heapFloor {
		t.Fatalf("limit %d after tuneGC, want at least the floor %d", got, heapFloor)
	}
	keep := make([]byte, 60<<20) // live: 60 MiB, above the floor
	for i := range keep {
		keep[i] = byte(i)
	}
	want := int64(heapFactor * 60 << 20)
	deadline := time.Now().Add(5 * time.Second)
	for debug.SetMemoryLimit(-1) < want && time.Now().Before(deadline) {
		runtime.GC()
		time.Sleep(10 * time.Millisecond)
	}
	if got := debug.SetMemoryLimit(-1); got < want {
		t.Errorf("limit %d MiB with 60 MiB live, want at least %d MiB", got>>20, want>>20)
	}
	runtime.KeepAlive(keep)
	if got := heapBound(1 << 20); got != heapFloor {
		t.Errorf("bound for 1 MiB live %d, want the floor %d", got, heapFloor)
	}
}
