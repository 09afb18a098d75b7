package mixer

import (
	"os"
	"path/filepath"
	"testing"

	"qpoint/bias"
	"qpoint/bias/circuit"
	"qpoint/smallsignal"
)

// network loads a circuit from YAML text and linearises it at its bias.
func network(tb testing.TB, src string) *smallsignal.Network {
	tb.Helper()
	c, err := circuit.Parse("test.yaml", []byte(src))
	if err != nil {
		tb.Fatal(err)
	}
	return linearise(tb, c)
}

func linearise(tb testing.TB, c *circuit.Circuit) *smallsignal.Network {
	tb.Helper()
	p, err := bias.Solve(c, bias.Settings{})
	if err != nil {
		tb.Fatal(err)
	}
	nw, err := smallsignal.New(p)
	if err != nil {
		tb.Fatal(err)
	}
	return nw
}

func demoFile(tb testing.TB, name string) string {
	tb.Helper()
	data, err := os.ReadFile(filepath.Join("..", "..", "testdata", "demo", name+".yaml"))
	if err != nil {
		tb.Fatal(err)
	}
	return string(data)
}

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
