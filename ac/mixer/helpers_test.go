package mixer

import (
	"testing"

	"qpoint/ac/internal/fixture"
	"qpoint/smallsignal"
)

// portIndex returns the index of the named port.
func portIndex(tb testing.TB, nw *smallsignal.Network, name string) int {
	tb.Helper()
	for i, p := range nw.Ports {
		if p.Name == name {
			return i
		}
	}
	tb.Fatalf("no port %q", name)
	return -1
}

// besselI returns the modified Bessel function I_k(x) by its power series
// Σ_m (x/2)^(2m+k) / (m! (m+k)!) (Abramowitz and Stegun 9.6.10), whose
// terms are all positive, so that it keeps float64's precision.
func besselI(k int, x float64) float64 {
	term := 1.0
	for i := 1; i <= k; i++ {
		term *= x / 2 / float64(i)
	}
	sum := term
	for m := 1; m < 500; m++ {
		term *= (x / 2) * (x / 2) / (float64(m) * float64(m+k))
		sum += term
		if term < 1e-17*sum {
			break
		}
	}
	return sum
}

var (
	network   = fixture.Network
	linearise = fixture.Linearise
	demoFile  = fixture.Demo
)
