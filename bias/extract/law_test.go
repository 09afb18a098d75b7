package extract

import (
	"fmt"
	"math"
	"math/rand/v2"
	"strconv"
	"testing"

	"gonum.org/v1/gonum/diff/fd"
	"gonum.org/v1/gonum/mat"
	"gonum.org/v1/gonum/optimize"

	"qpoint/bias"
	"qpoint/bias/circuit"
	"qpoint/bias/diode"
)

// seriesCircuit is a voltage source across a diode of model p, with the
// series resistance in the model (external = 0) or as a resistor.
func seriesCircuit(t *testing.T, p diode.Params, external float64) *circuit.Circuit {
	t.Helper()
	g := func(v float64) string { return strconv.FormatFloat(v, 'g', -1, 64) }
	anode := "a"
	resistor := ""
	if external > 0 {
		anode = "b"
		resistor = fmt.Sprintf("  - {type: resistor, name: R1, between: [a, b], value: %s}\n", g(external))
	}
	text := fmt.Sprintf(`name: series check
diode_models:
  m: {saturation_current: %s, ideality: %s, series_resistance: %s}
parts:
  - {type: voltage_source, name: V1, plus: a, minus: gnd, value: 0.5}
%s  - {type: diode, name: D1, anode: %s, cathode: gnd, model: m}
`, g(p.SaturationCurrent), g(p.Ideality), g(p.SeriesResistance), resistor, anode)
	c, err := circuit.Parse("series.yaml", []byte(text))
	if err != nil {
		t.Fatal(err)
	}
	return c
}

// TestLawEqualsSolve: the Lambert W law the fit uses (Banwell and
// Jayakumar, Electronics Letters 36(4), 2000, through
// diode.Device.TerminalCurrent) gives the current that bias.Solve finds by
// Newton's method on the same diode and resistor, to 1e-12 relative, with
// the fitted model's own values, over the whole fitted range.
func TestLawEqualsSolve(t *testing.T) {
	p := diode.Defaults()
	p.SaturationCurrent, p.Ideality, p.SeriesResistance = 5e-11, 1.08, 6
	r, err := Fit(Data{Current: forwardPoints(p, 300.15, 1e-9, 1e-1, 41, 0.01, rand.New(rand.NewPCG(1, 18)))}, Settings{})
	if err != nil {
		t.Fatal(err)
	}
	fitted := r.Model
	for _, external := range []bool{false, true} {
		q := fitted
		rs := 0.0
		if external {
			q.SeriesResistance, rs = 0, fitted.SeriesResistance
		}
		c := seriesCircuit(t, q, rs)
		for _, v := range []float64{0.01, 0.1, 0.3, 0.5, 0.6, 0.7, 0.9, 1.2} {
			c.Parts[0].Value = v
			pt, err := bias.Solve(c, bias.Settings{})
			if err != nil {
				t.Fatal(err)
			}
			got := pt.Diodes[0].Current
			want := r.CurrentAt(v, 300.15)
			if rel := math.Abs(got-want) / want; rel > 1e-12 {
				t.Errorf("R_S external %v, %g V: bias.Solve %.15g A, the fit's law %.15g A (relative %.2g, want < 1e-12)", external, v, got, want, rel)
			}
		}
	}
}

// TestForwardJacobian compares the analytic derivatives of the forward
// residuals with central differences (gonum/diff/fd), at three
// temperatures so that every entry, E_g and p included, is exercised.
func TestForwardJacobian(t *testing.T) {
	p := diode.Defaults()
	p.SaturationCurrent, p.Ideality, p.SeriesResistance, p.GapEnergy, p.SaturationExponent = 3e-6, 1.05, 20, 0.69, 2
	fp := &forwardProblem{t0: 300.15, base: diode.Defaults()}
	for _, tk := range []float64{233.15, 300.15, 358.15} {
		for _, pt := range forwardPoints(p, tk, 1e-8, 3e-2, 12, 0, nil) {
			fp.v, fp.i, fp.temp, fp.w = append(fp.v, pt.Voltage), append(fp.i, pt.Value*1.01), append(fp.temp, tk), append(fp.w, 0.9)
		}
	}
	x := []float64{math.Log(2.5e-6), 1.1, 15, 0.75, 2.5}
	n := len(fp.v)
	got := mat.NewDense(n, nForward, nil)
	fp.eval(x, make([]float64, n), got)
	want := mat.NewDense(n, nForward, nil)
	// Steps of 1e-5 keep the differences' truncation error near 1e-10;
	// their rounding error is that of the law's current, I_S (e^x - 1),
	// whose -1 leaves about 1e-13 relative near zero bias, amplified by
	// 1/step.
	fd.Jacobian(want, func(r, x []float64) { fp.eval(x, r, nil) }, x, &fd.JacobianSettings{Formula: fd.Central, Step: 1e-5})
	for k := range n {
		for c := range nForward {
			g, w := got.At(k, c), want.At(k, c)
			if math.Abs(g-w) > 1e-6*math.Abs(w)+1e-7 {
				t.Errorf("point %d, entry %s: analytic %.9g, central difference %.9g", k, forwardKeys[c], g, w)
			}
		}
	}
}

// No published table of measured I–V points with the values its authors
// extracted is used here: none could be recalled reliably enough to quote
// its numbers, and invented "published" numbers would be worse than none.
// The checks against the outside are instead a published extraction
// method (below), a general-purpose minimiser over an independent
// evaluation of the law (TestGeneralPurposeMinimizer), the closed form of
// the knee (TestBreakdownKnee) and the statistics of TestRecovery.
//
// TestCheungMethod: on exact data the fit agrees with the extraction of
// Cheung and Cheung ("Extraction of Schottky diode parameters from forward
// current-voltage characteristics", Appl. Phys. Lett. 49(2), 1986), which
// reads n V_T and R_S as the intercept and slope of dV/d(ln I) against I
// (a straight line where I ≫ I_S), here with dV/d(ln I) from central
// differences of the data. The method's own error is that of the
// differences and of the neglected I_S/I, below 1e-3 relative here.
func TestCheungMethod(t *testing.T) {
	p := diode.Defaults()
	p.SaturationCurrent, p.Ideality, p.SeriesResistance = 2e-9, 1.12, 3.3
	pts := forwardPoints(p, 300.15, 1e-6, 1e-1, 201, 0, nil)
	r, err := Fit(Data{Current: pts}, Settings{})
	if err != nil {
		t.Fatal(err)
	}
	var sx, sy, sxx, sxy, m float64
	for k := 1; k+1 < len(pts); k++ {
		x := pts[k].Value
		y := (pts[k+1].Voltage - pts[k-1].Voltage) / (math.Log(pts[k+1].Value) - math.Log(pts[k-1].Value))
		sx, sy, sxx, sxy, m = sx+x, sy+y, sxx+x*x, sxy+x*y, m+1
	}
	slope := (m*sxy - sx*sy) / (m*sxx - sx*sx)
	intercept := (sy - slope*sx) / m
	n := intercept / diode.ThermalVoltage(300.15)
	if got := r.Model.Ideality; math.Abs(got-n) > 1e-3*n {
		t.Errorf("ideality: fit %.6g, Cheung and Cheung %.6g", got, n)
	}
	if got := r.Model.SeriesResistance; math.Abs(got-slope) > 1e-3*slope {
		t.Errorf("series resistance: fit %.6g Ω, Cheung and Cheung %.6g Ω", got, slope)
	}
	// And the fit of exact data returns the values it was drawn from.
	for _, c := range []struct {
		name      string
		got, want float64
	}{{"I_S", r.Model.SaturationCurrent, 2e-9}, {"n", r.Model.Ideality, 1.12}, {"R_S", r.Model.SeriesResistance, 3.3}} {
		if math.Abs(c.got-c.want) > 1e-8*c.want {
			t.Errorf("%s from exact data: %.12g, drawn from %.12g", c.name, c.got, c.want)
		}
	}
}

// TestGeneralPurposeMinimizer: gonum/optimize's Nelder-Mead simplex (no
// derivatives), minimising the same sum of squared log residuals with each
// current found by bias.Solve's Newton iteration instead of the Lambert W
// law, ends at the values the fit reports, to a small fraction of their
// standard errors.
func TestGeneralPurposeMinimizer(t *testing.T) {
	p := diode.Defaults()
	p.SaturationCurrent, p.Ideality, p.SeriesResistance = 3e-6, 1.05, 20
	pts := forwardPoints(p, 300.15, 1e-8, 3e-2, 25, 0.01, rand.New(rand.NewPCG(4, 18)))
	r, err := Fit(Data{Current: pts}, Settings{})
	if err != nil {
		t.Fatal(err)
	}
	c := seriesCircuit(t, p, 0)
	m := c.Models["m"]
	sum := func(x []float64) float64 {
		m.Params.SaturationCurrent, m.Params.Ideality, m.Params.SeriesResistance = math.Exp(x[0]), x[1], x[2]
		s := 0.0
		for _, pt := range pts {
			c.Parts[0].Value = pt.Voltage
			sol, err := bias.Solve(c, bias.Settings{})
			if err != nil {
				return math.Inf(1)
			}
			d := math.Log(sol.Diodes[0].Current) - math.Log(pt.Value)
			s += d * d
		}
		return s
	}
	start := []float64{math.Log(2e-6), 1.1, 15}
	res, err := optimize.Minimize(optimize.Problem{Func: sum}, start,
		&optimize.Settings{Converger: &optimize.FunctionConverge{Relative: 1e-13, Iterations: 200}, MajorIterations: 5000},
		&optimize.NelderMead{})
	if err != nil {
		t.Fatal(err)
	}
	got := []float64{math.Exp(res.X[0]), res.X[1], res.X[2]}
	for i, key := range []string{"saturation_current", "ideality", "series_resistance"} {
		v := r.Value(key)
		if d := math.Abs(got[i]-v.Value) / v.Error; d > 0.01 {
			t.Errorf("%s: Nelder-Mead over bias.Solve gives %.9g, the fit %.9g ± %.3g (%.3g standard errors apart)", key, got[i], v.Value, v.Error, d)
		}
	}
}

// TestBreakdownKnee: the knee law fixes V_BV and I_BV only in the
// combination I_BV exp(-V_BV/(n V_T)) (the law's own form), so a knee drawn
// at (V_BV, I_BV) and fitted at another current I' must give
// V' = V_BV + n V_T ln(I'/I_BV): a closed form.
func TestBreakdownKnee(t *testing.T) {
	p := diode.Defaults()
	p.SaturationCurrent, p.Ideality, p.SeriesResistance = 1e-9, 1.1, 8
	p.BreakdownVoltage, p.BreakdownCurrent = 5.2, 20e-6
	pts := forwardPoints(p, 300.15, 1e-8, 1e-2, 20, 0, nil)
	d := diode.New(p, 300.15)
	var reverse = pts[:0:0]
	for k := range 40 {
		v := -6 + 0.125*float64(k)
		i, _ := d.TerminalCurrent(v)
		reverse = append(reverse, pts[0])
		reverse[len(reverse)-1].Voltage, reverse[len(reverse)-1].Value = v, i
	}
	r, err := Fit(Data{Current: append(reverse, pts...)}, Settings{})
	if err != nil {
		t.Fatal(err)
	}
	bv := r.Value("breakdown_voltage")
	if bv.Status != Fitted {
		t.Fatalf("breakdown voltage %v; cautions %v", bv.Status, r.Cautions)
	}
	want := 5.2 + 1.1*diode.ThermalVoltage(300.15)*math.Log(r.Model.BreakdownCurrent/20e-6)
	if math.Abs(bv.Value-want) > 1e-9 {
		t.Errorf("knee at %s: %.12g V, closed form %.12g V", fmt.Sprint(r.Model.BreakdownCurrent), bv.Value, want)
	}
	if r.Model.BreakdownCurrent != 1e-3 {
		t.Errorf("knee current %g A; the points pass 1 mA, the circuit file's default, which should be chosen", r.Model.BreakdownCurrent)
	}
}
