// Package circuittest helps tests that write circuit files from random
// seeds: numbers written so they load back exactly, log-uniform draws, the
// seed range a run covers, and keeping a failing case's file.
package circuittest

import (
	"math"
	"math/rand/v2"
	"os"
	"path/filepath"
	"strconv"
	"testing"
)

// Num writes v so that the loader reads back exactly the same float64.
func Num(v float64) string { return strconv.FormatFloat(v, 'g', -1, 64) }

// LogUniform returns a number spread evenly in log between lo and hi.
func LogUniform(rng *rand.Rand, lo, hi float64) float64 {
	return lo * math.Pow(hi/lo, rng.Float64())
}

// Seeds returns the seeds a random test covers: 1 to full (short with
// -short), more with QPOINT_RANDOM_COUNT=N, or one alone with
// QPOINT_SEED=N.
func Seeds(t *testing.T, full, short uint64) (first, count uint64) {
	t.Helper()
	first, count = 1, full
	if testing.Short() {
		count = short
	}
	if s := os.Getenv("QPOINT_RANDOM_COUNT"); s != "" {
		n, err := strconv.ParseUint(s, 10, 64)
		if err != nil {
			t.Fatalf("QPOINT_RANDOM_COUNT=%q: %v", s, err)
		}
		count = n
	}
	if s := os.Getenv("QPOINT_SEED"); s != "" {
		n, err := strconv.ParseUint(s, 10, 64)
		if err != nil {
			t.Fatalf("QPOINT_SEED=%q: %v", s, err)
		}
		first, count = n, 1
	}
	return first, count
}

// KeepFailure writes a failing case's circuit file where it outlives the
// test, so that it can be loaded again (qpoint bias FILE), and returns the
// path: in $QPOINT_FAILURES when set, else in qpoint-failures under the
// system's temporary directory.
func KeepFailure(t *testing.T, name, text string) string {
	t.Helper()
	dir := os.Getenv("QPOINT_FAILURES")
	if dir == "" {
		dir = filepath.Join(os.TempDir(), "qpoint-failures")
	}
	if err := os.MkdirAll(dir, 0o755); err != nil {
		t.Fatalf("cannot keep the failing circuit: %v", err)
	}
	path := filepath.Join(dir, name)
	if err := os.WriteFile(path, []byte(text), 0o644); err != nil {
		t.Fatalf("cannot keep the failing circuit: %v", err)
	}
	return path
}
