package circuit

import (
	"math"
	"strings"
	"testing"
)

const toleranceFile = `
diode_models:
  d1:
    saturation_current: 3uA
    spread: {saturation_current: {log_sigma: 0.3}, ideality: {sigma: 0.01}}
parts:
  - {type: resistor, name: R1, between: [a, b], value: 47k, tolerance: 1%}
  - {type: capacitor, name: C1, between: [a, gnd], value: 10pF, tolerance: {sigma: 3%}}
  - {type: voltage_source, name: V1, plus: a, minus: gnd, value: 0V, tolerance: {band: 10mV}}
  - {type: resistor, name: R2, between: [b, gnd], value: 1k, tolerance: {log_sigma: 0.05}}
  - {type: diode, name: D1, anode: b, cathode: gnd, model: d1}
  - {type: diode, name: D2, anode: b, cathode: gnd, model: d1}
tolerance_groups:
  - {name: one_lot, members: [D1.saturation_current, D2.saturation_current], correlation: 0.9}
`

func TestToleranceLoad(t *testing.T) {
	c, err := Parse("tol.yaml", []byte(toleranceFile))
	if err != nil {
		t.Fatal(err)
	}
	want := []struct {
		name  string
		dist  Distribution
		width float64
		group int
	}{
		{"R1.value", Uniform, 470, -1},
		{"C1.value", Normal, 0.3e-12, -1},
		{"V1.value", Uniform, 0.01, -1},
		{"R2.value", LogNormal, 0.05, -1},
		{"D1.saturation_current", LogNormal, 0.3, 0},
		{"D1.ideality", Normal, 0.01, -1},
		{"D2.saturation_current", LogNormal, 0.3, 0},
		{"D2.ideality", Normal, 0.01, -1},
	}
	if len(c.Tolerances) != len(want) {
		t.Fatalf("got %d tolerances %v, want %d", len(c.Tolerances), c.ToleranceNames(), len(want))
	}
	for k, w := range want {
		got := c.Tolerances[k]
		if got.Name != w.name || got.Distribution != w.dist || math.Abs(got.Width-w.width) > 1e-12*w.width || got.Group != w.group {
			t.Errorf("tolerance %d = %s %v %g group %d; want %s %v %g group %d", k, got.Name, got.Distribution, got.Width, got.Group, w.name, w.dist, w.width, w.group)
		}
	}
	if g := c.ToleranceGroups; len(g) != 1 || g[0].Correlation != 0.9 || len(g[0].Members) != 2 || g[0].Members[0] != 4 || g[0].Members[1] != 6 {
		t.Errorf("groups = %+v; want one_lot with members 4 and 6 at correlation 0.9", g)
	}
}

// TestToleranceAt checks the map from normal score to value: a band
// reaches its ends as Φ(z) reaches 0 and 1, and one standard score covers
// 68.27 % of the band (2Φ(1) - 1 = 0.6826894921, Abramowitz and Stegun,
// Table 26.1).
func TestToleranceAt(t *testing.T) {
	band := Tolerance{Nominal: 100, Distribution: Uniform, Width: 10}
	if got := band.At(1) - 100; math.Abs(got-6.826894921) > 1e-8 {
		t.Errorf("band At(1) - x0 = %.10g; want 10 × 0.6826894921", got)
	}
	if got := band.At(-40); got != 90 {
		t.Errorf("band At(-40) = %g; want the band's end 90", got)
	}
	normal := Tolerance{Nominal: 100, Distribution: Normal, Width: 3}
	if got := normal.At(-2); got != 94 {
		t.Errorf("normal At(-2) = %g; want 94", got)
	}
	logn := Tolerance{Nominal: 2e-9, Distribution: LogNormal, Width: 0.5}
	if got := logn.At(2); math.Abs(got/(2e-9*math.E)-1) > 1e-15 {
		t.Errorf("log-normal At(2) = %g; want 2 nA × e", got)
	}
}

// TestToleranceStdDev integrates (At(z) - mean)² against the normal
// density by the trapezoidal rule over ±12 standard scores and compares
// the result with StdDev's closed forms (a/√3: JCGM 100:2008, 4.3.7;
// the log-normal moments: Johnson, Kotz and Balakrishnan, ch. 14).
func TestToleranceStdDev(t *testing.T) {
	for _, tol := range []Tolerance{
		{Nominal: 100, Distribution: Uniform, Width: 10},
		{Nominal: 100, Distribution: Normal, Width: 3},
		{Nominal: 2e-9, Distribution: LogNormal, Width: 0.7},
	} {
		const n, lim = 200000, 12.0
		h := 2 * lim / n
		var m0, m1, m2 float64
		for i := 0; i <= n; i++ {
			z := -lim + float64(i)*h
			w := h * math.Exp(-z*z/2) / math.Sqrt(2*math.Pi)
			if i == 0 || i == n {
				w /= 2
			}
			x := tol.At(z)
			m0 += w
			m1 += w * x
			m2 += w * x * x
		}
		mean := m1 / m0
		sd := math.Sqrt(m2/m0 - mean*mean)
		if math.Abs(sd/tol.StdDev()-1) > 1e-6 {
			t.Errorf("%v: integrated standard deviation %.9g; StdDev says %.9g", tol.Distribution, sd, tol.StdDev())
		}
	}
}

func TestToleranceInstance(t *testing.T) {
	c, err := Parse("tol.yaml", []byte(toleranceFile))
	if err != nil {
		t.Fatal(err)
	}
	values := make([]float64, len(c.Tolerances))
	for k := range values {
		values[k] = c.Tolerances[k].At(1)
	}
	var in Instance
	for round := 0; round < 2; round++ { // the second reuses the storage
		c.Instance(&in, values)
		got := &in.Circuit
		if got.Parts[0].Value != values[0] || got.Parts[2].Value != values[2] {
			t.Errorf("part values %g, %g; want %g, %g", got.Parts[0].Value, got.Parts[2].Value, values[0], values[2])
		}
		for _, d := range []struct {
			part int
			is   float64
			n    float64
		}{{4, values[4], values[5]}, {5, values[6], values[7]}} {
			p := got.Parts[d.part]
			m := got.Models[p.Model]
			if !strings.HasPrefix(p.Model, "d1@") || m == nil || m.Params.SaturationCurrent != d.is || m.Params.Ideality != d.n {
				t.Errorf("diode %s: model %q %+v; want its own model with I_S %g, n %g", p.Name, p.Model, m, d.is, d.n)
			}
		}
	}
	// The circuit itself is untouched.
	if c.Parts[0].Value != 47e3 || c.Parts[4].Model != "d1" || c.Models["d1"].Params.SaturationCurrent != 3e-6 || len(c.Models) != 1 {
		t.Errorf("Instance changed the circuit it copies: %+v, %+v", c.Parts[0], c.Models)
	}
}

// TestToleranceOverride: a value set from outside the file moves its
// tolerance's nominal, and a relative width with it.
func TestToleranceOverride(t *testing.T) {
	c, err := Parse("tol.yaml", []byte(toleranceFile))
	if err != nil {
		t.Fatal(err)
	}
	o, err := c.WithOverride("R1.value=100k")
	if err != nil {
		t.Fatal(err)
	}
	if o, err = o.WithOverride("d1.saturation_current=1uA"); err != nil {
		t.Fatal(err)
	}
	if got := o.Tolerances[0]; got.Nominal != 100e3 || math.Abs(got.Width-1000) > 1e-9 {
		t.Errorf("R1 after the override: nominal %g, band %g; want 100k and 1k", got.Nominal, got.Width)
	}
	if got := o.Tolerances[4]; got.Nominal != 1e-6 || got.Width != 0.3 {
		t.Errorf("D1.saturation_current after the override: nominal %g, log sigma %g; want 1µ and 0.3", got.Nominal, got.Width)
	}
	if c.Tolerances[0].Nominal != 47e3 || c.Tolerances[4].Nominal != 3e-6 {
		t.Errorf("the override changed the original circuit's tolerances")
	}
}
