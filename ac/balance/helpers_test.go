package balance

import (
	"fmt"
	"math"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"qpoint/ac"
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

func readFile(tb testing.TB, path string) string {
	tb.Helper()
	data, err := os.ReadFile(path)
	if err != nil {
		tb.Fatal(err)
	}
	return string(data)
}

func demo(tb testing.TB, name string) string {
	return readFile(tb, filepath.Join("..", "..", "testdata", "demo", name+".yaml"))
}

// fileDrive builds the drive a circuit's analysis.distortion section
// describes (a peak voltage is what the generator delivers into a
// matched load, half its EMF).
func fileDrive(tb testing.TB, c *circuit.Circuit) ac.Drive {
	tb.Helper()
	d := c.Analysis.Distortion
	drive := ac.Drive{Input: -1, Output: ac.Output{Port: -1, Node: d.Output}, FrequencyHz: d.FrequencyHz}
	for i, p := range c.Ports {
		if p.Name == d.Input {
			drive.Input = i
		}
		if p.Name == d.Output {
			drive.Output = ac.Output{Port: i}
		}
	}
	if drive.Input < 0 {
		tb.Fatalf("input %q is not a port", d.Input)
	}
	z0 := c.Ports[drive.Input].Impedance
	if d.Level.IsPower {
		drive.EMF = ac.DBmToEMF(d.Level.DBm, z0)
	} else {
		drive.EMF = 2 * d.Level.PeakVolts
	}
	return drive
}

// besselI returns the modified Bessel function I_k(x) by its power series
// sum_m (x/2)^(2m+k) / (m! (m+k)!) (Abramowitz and Stegun 9.6.10), which
// converges quickly for x <= 3.
func besselI(k int, x float64) float64 {
	term := math.Pow(x/2, float64(k))
	for j := 2; j <= k; j++ {
		term /= float64(j)
	}
	sum := term
	for m := 1; m < 80; m++ {
		term *= (x / 2) * (x / 2) / (float64(m) * float64(m+k))
		sum += term
	}
	return sum
}

// ladder returns the YAML of the diode-loaded LC ladder of package ac's
// benchmarks with exactly n unknowns: k sections (series inductor, shunt
// capacitor, a Schottky diode with series resistance) between two 50 Ω
// ports, all diodes biased from a 3.3 V supply through one resistor and
// the inductors; 3k + 3 unknowns, the remainder made up by resistive
// nodes at the input. The values are invented for the benchmark.
func ladder(n int) string {
	k := (n - 3) / 3
	var b strings.Builder
	b.WriteString(`name: benchmark ladder
diode_models:
  sk: {saturation_current: 1uA, ideality: 1.05, series_resistance: 10, zero_bias_capacitance: 0.2pF, built_in_potential: 0.3V, grading_coefficient: 0.5}
parts:
  - {type: voltage_source, name: Vcc, plus: vcc, minus: gnd, value: 3.3V}
  - {type: resistor, name: Rbias, between: [vcc, n0], value: 1k}
`)
	for i := 1; i <= k; i++ {
		fmt.Fprintf(&b, "  - {type: inductor, name: L%d, between: [n%d, n%d], value: 2nH}\n", i, i-1, i)
		fmt.Fprintf(&b, "  - {type: capacitor, name: C%d, between: [n%d, gnd], value: 0.8pF}\n", i, i)
		fmt.Fprintf(&b, "  - {type: diode, name: D%d, anode: n%d, cathode: gnd, model: sk}\n", i, i)
	}
	for j := 0; j < n-3-3*k; j++ {
		fmt.Fprintf(&b, "  - {type: resistor, name: X%d, between: [n0, x%d], value: 1k}\n", j, j)
		fmt.Fprintf(&b, "  - {type: resistor, name: Y%d, between: [x%d, gnd], value: 1k}\n", j, j)
	}
	fmt.Fprintf(&b, "ports:\n  - {name: in, node: n0, impedance: 50}\n  - {name: out, node: n%d, impedance: 50}\n", k)
	return b.String()
}
