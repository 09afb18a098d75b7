package study

import (
	"errors"
	"math"
	"math/cmplx"
	"os"
	"reflect"
	"testing"

	"qpoint/ac"
	"qpoint/bias"
	"qpoint/bias/circuit"
	"qpoint/bias/diode"
	"qpoint/smallsignal"
)

func load(t testing.TB, src string) *circuit.Circuit {
	t.Helper()
	c, err := circuit.Parse("test.yaml", []byte(src))
	if err != nil {
		t.Fatal(err)
	}
	return c
}

func demo(t testing.TB, name string) *circuit.Circuit {
	t.Helper()
	c, err := circuit.Load("../../testdata/demo/" + name + ".yaml")
	if err != nil {
		t.Fatal(err)
	}
	return c
}

func axis(t testing.TB, c *circuit.Circuit, what string, from, to float64, n int) Axis {
	t.Helper()
	v, err := c.ResolveVary(what)
	if err != nil {
		t.Fatal(err)
	}
	vals, err := Grid(from, to, n, false)
	if err != nil {
		t.Fatal(err)
	}
	return Axis{v, vals}
}

// TestSensitivityCowleySorensen: a detector diode's current sensitivity is
// 1/(2 n V_T) at low frequency with no series resistance, and falls with
// frequency as 1/(1 + ω² C_j² R_S R_j) (Cowley and Sorensen, IEEE Trans.
// MTT 14(12), 1966).
func TestSensitivityCowleySorensen(t *testing.T) {
	for _, rs := range []float64{0, 0.5} {
		c := load(t, `
diode_models:
  det: {saturation_current: 5uA, ideality: 1.1, series_resistance: `+map[bool]string{true: "0", false: "0.5"}[rs == 0]+`, zero_bias_capacitance: 0.2pF, built_in_potential: 0.3V}
parts:
  - {type: current_source, name: I, from: gnd, to: a, value: 20uA}
  - {type: diode, name: D, anode: a, cathode: gnd, model: det}
ports:
  - {name: rf, node: a, impedance: 50, coupling: ac}
`)
		p, err := bias.Solve(c, bias.Settings{})
		if err != nil {
			t.Fatal(err)
		}
		nw, err := smallsignal.New(p)
		if err != nil {
			t.Fatal(err)
		}
		d := nw.Diodes[0]
		nvt := 1.1 * diode.ThermalVoltage(300.15)
		if rs == 0 {
			if got := d.CurrentSensitivity(1e3); math.Abs(got*2*nvt-1) > 1e-12 {
				t.Errorf("β at 1 kHz with R_S = 0: %.6g A/W, want 1/(2 n V_T) = %.6g A/W", got, 1/(2*nvt))
			}
			continue
		}
		rj := 1 / d.G1
		for _, f := range []float64{1e8, 1e9, 1e10, 3e10} {
			w := 2 * math.Pi * f
			ratio := d.CurrentSensitivity(f) / d.CurrentSensitivity(1)
			want := 1 / (1 + w*w*d.C1*d.C1*rs*rj)
			// R_S/R_j = 0.5/1.1k: the product form and the exact share
			// of absorbed power differ by that order.
			if math.Abs(ratio/want-1) > 1e-3 {
				t.Errorf("β(%g Hz)/β(0) = %.6g, Cowley and Sorensen's roll-off gives %.6g", f, ratio, want)
			}
		}
	}
}

// TestShuntAttenuatorClosedForm: a shunt diode between 50 Ω ports, where
// its capacitance is negligible, has S21 = 2/(2 + Z0/R) with R = r_d + R_S
// (Pozar, "Microwave Engineering", ch. 4, shunt element).
func TestShuntAttenuatorClosedForm(t *testing.T) {
	c := load(t, `
diode_models:
  pin: {saturation_current: 2nA, ideality: 1.8, series_resistance: 1.5, zero_bias_capacitance: 0.3pF}
parts:
  - {type: current_source, name: Ictl, from: gnd, to: line, value: 1mA}
  - {type: diode, name: D, anode: line, cathode: gnd, model: pin}
ports:
  - {name: in,  node: line, impedance: 50, coupling: ac}
  - {name: out, node: line, impedance: 50, coupling: ac}
`)
	r, err := Run(c, Settings{Axis: axis(t, c, "Ictl.value", 0.1e-3, 10e-3, 12), FrequenciesHz: []float64{1e3}})
	if err != nil {
		t.Fatal(err)
	}
	for _, st := range r.Steps {
		// At 1 kHz the junction capacitance turns S21 by about 1e-7 rad
		// and changes its magnitude by a part in 1e14.
		rd := st.Diodes[0].DynamicResistance + 1.5
		want := 2 / (2 + 50/rd)
		if got := st.Responses[0].S[1][0]; math.Abs(cmplx.Abs(got)-want) > 1e-12 {
			t.Errorf("I = %g A: |S21| = %.15g, closed form %.15g", st.Values[0], cmplx.Abs(got), want)
		}
	}
}

// TestContinuationSavesIterations: a 100-step study needs far fewer Newton
// iterations than 100 cold starts.
func TestContinuationSavesIterations(t *testing.T) {
	c := demo(t, "attenuator")
	r, err := Run(c, Settings{Axis: axis(t, c, "Vctl.value", 0.8, 5, 100), Workers: 1})
	if err != nil {
		t.Fatal(err)
	}
	cold := 0
	for _, v := range r.Settings.Axis.Values {
		cc, temp := r.Settings.Axis.Vary.Apply(c, v)
		p, err := bias.Solve(cc, bias.Settings{TemperatureK: temp})
		if err != nil {
			t.Fatal(err)
		}
		cold += p.Stats.Iterations
	}
	t.Logf("100 steps: %d iterations with continuation, %d from cold", r.Newton, cold)
	if r.Newton > cold/2 {
		t.Errorf("continuation used %d iterations, cold starts %d: want well below", r.Newton, cold)
	}
}

// TestWorkersIdentical: the results do not depend on the worker count.
func TestWorkersIdentical(t *testing.T) {
	c := demo(t, "detector")
	s := Settings{Axis: axis(t, c, "Vcc.value", 0, 3.3, 37), FrequenciesHz: []float64{1e9, 2.45e9},
		Drive: ac.Drive{Input: 0, Output: ac.Output{Port: 1}, FrequencyHz: 2.45e9, EMF: ac.DBmToEMF(-30, 50)}}
	s.Workers = 1
	a, err := Run(c, s)
	if err != nil {
		t.Fatal(err)
	}
	s.Workers = 5
	b, err := Run(c, s)
	if err != nil {
		t.Fatal(err)
	}
	if !reflect.DeepEqual(a.Steps, b.Steps) {
		t.Error("1 worker and 5 workers give different steps")
	}
}

// TestTarget finds the control current for 6 dB of loss and checks it.
func TestTarget(t *testing.T) {
	c := demo(t, "attenuator")
	s := Settings{Axis: axis(t, c, "Vctl.value", 0.9, 5, 30), FrequenciesHz: []float64{900e6}}
	r, err := Run(c, s)
	if err != nil {
		t.Fatal(err)
	}
	m, err := ParseMeasure("s21@900MHz")
	if err != nil {
		t.Fatal(err)
	}
	sol, err := FindTarget(r, m, -6, 1e-9)
	if err != nil {
		t.Fatal(err)
	}
	if math.Abs(sol.Measure+6) > 1e-6 {
		t.Errorf("at Vctl = %g V, S21 = %g dB; want -6 dB", sol.Value, sol.Measure)
	}
	if _, err := FindTarget(r, m, -60, 1e-9); !errors.Is(err, ErrNoCrossing) {
		t.Errorf("impossible target: %v, want ErrNoCrossing", err)
	}
	best, err := Optimize(r, m, false, 1e-6)
	if err != nil {
		t.Fatal(err)
	}
	t.Logf("target -6 dB at %.6f V in %d evaluations; most loss %.3f dB at %.4f V", sol.Value, sol.Iterations, best.Measure, best.Value)
}

func TestMain(m *testing.M) { os.Exit(m.Run()) }
