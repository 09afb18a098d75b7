package diode

import (
	"math"
	"testing"
)

func TestThermalVoltage(t *testing.T) {
	// V_T = kT/q with the exact 2019 SI constants (BIPM, The International
	// System of Units, 9th ed., 2019): 25.852 mV at 300 K.
	if got := ThermalVoltage(300); math.Abs(got-0.025852) > 0.5e-6 {
		t.Errorf("V_T(300 K) = %.7g V, want 25.852 mV", got)
	}
	if got, want := ThermalVoltage(300.15), 1.380649e-23*300.15/1.602176634e-19; math.Abs(got-want) > 1e-15*want {
		t.Errorf("V_T(300.15 K) = %.17g, want %.17g", got, want)
	}
}

func testParams() Params {
	p := Defaults()
	p.SaturationCurrent = 3e-6
	p.Ideality = 1.05
	p.ZeroBiasCapacitance = 0.18e-12
	p.BuiltInPotential = 0.25
	p.Grading = 0.5
	p.TransitTime = 1e-10
	p.BreakdownVoltage = 3.8
	p.BreakdownCurrent = 100e-6
	return p
}

// TestDerivatives compares each law's derivatives with central differences
// of the law one order below.
func TestDerivatives(t *testing.T) {
	d := New(testParams(), 300.15)
	laws := map[string]func(float64) Law{
		"current": d.Current, "depletion": d.DepletionCharge, "diffusion": d.DiffusionCharge, "charge": d.Charge,
	}
	for name, f := range laws {
		for _, v := range []float64{-3.9, -3.8, -2, -0.3, 0, 0.05, 0.124, 0.126, 0.2, 0.25, 0.3, 0.5} {
			h := 1e-6
			lo, hi := f(v-h), f(v+h)
			l := f(v)
			checks := []struct {
				order     int
				got, want float64
			}{
				{1, l.D1, (hi.Value - lo.Value) / (2 * h)},
				{2, l.D2, (hi.D1 - lo.D1) / (2 * h)},
				{3, l.D3, (hi.D2 - lo.D2) / (2 * h)},
			}
			for _, c := range checks {
				scale := math.Max(math.Abs(c.want), math.Abs(c.got))
				if math.Abs(c.got-c.want) > 1e-5*scale+1e-30 {
					t.Errorf("%s at %g V: derivative %d = %g, central difference gives %g", name, v, c.order, c.got, c.want)
				}
			}
		}
	}
}

// TestDepletionLaw: up to V_bi/2 the charge's derivative is the textbook
// C_j0/(1 - V/V_bi)^m (Sze and Ng, ch. 2); at V_bi/2 the continuation
// matches value and three derivatives; past V_bi everything stays finite.
func TestDepletionLaw(t *testing.T) {
	d := New(testParams(), 300.15)
	vb, m, cj0 := d.BuiltInPotential, d.Params.Grading, d.ZeroBiasCapacitance
	for _, v := range []float64{-5, -1, 0, 0.1, vb / 2} {
		want := cj0 / math.Pow(1-v/vb, m)
		if got := d.DepletionCharge(v).D1; math.Abs(got-want) > 1e-14*want {
			t.Errorf("C_j(%g V) = %g F, textbook law gives %g F", v, got, want)
		}
	}
	knee := vb / 2
	below, above := d.DepletionCharge(math.Nextafter(knee, 0)), d.DepletionCharge(math.Nextafter(knee, 1))
	pairs := [][2]float64{{below.Value, above.Value}, {below.D1, above.D1}, {below.D2, above.D2}, {below.D3, above.D3}}
	for k, p := range pairs {
		if math.Abs(p[0]-p[1]) > 1e-9*math.Abs(p[0]) {
			t.Errorf("derivative %d jumps at V_bi/2: %g below, %g above", k, p[0], p[1])
		}
	}
	for _, v := range []float64{vb, 2 * vb, 10} {
		l := d.DepletionCharge(v)
		if math.IsNaN(l.Value) || math.IsInf(l.D1, 0) || l.D1 <= 0 {
			t.Errorf("depletion law at %g V (V_bi = %g V): %+v", v, vb, l)
		}
	}
}

// TestSaturationTemperatureLaw checks I_S(T) against the law of Gray,
// Hurst, Lewis, Meyer, ch. 1, evaluated independently here.
func TestSaturationTemperatureLaw(t *testing.T) {
	p := testParams()
	p.GapEnergy, p.SaturationExponent = 0.69, 2
	for _, tk := range []float64{233.15, 300.15, 358.15, 398.15} {
		d := New(p, tk)
		k, q := 1.380649e-23, 1.602176634e-19
		want := p.SaturationCurrent * math.Pow(tk/300.15, 2/1.05) * math.Exp(q*0.69/(1.05*k)*(1/300.15-1/tk))
		if math.Abs(d.SaturationCurrent-want) > 1e-12*want {
			t.Errorf("I_S(%g K) = %g A, want %g A", tk, d.SaturationCurrent, want)
		}
	}
}

// TestBreakdownKnee: at v = -V_BV the current is -I_BV; at 0 it is zero.
func TestBreakdownKnee(t *testing.T) {
	d := New(testParams(), 300.15)
	if got := d.Current(-3.8).Value; math.Abs(got+100e-6+3e-6) > 1e-9 {
		t.Errorf("current at the knee %g A, want -I_BV - I_S = %g A", got, -103e-6)
	}
	if got := d.Current(0).Value; got != 0 {
		t.Errorf("current at zero bias %g A, want exactly 0", got)
	}
}

// TestLimit: a forward step far past the critical voltage is cut to a
// logarithmic step; a small step is left alone.
func TestLimit(t *testing.T) {
	d := New(testParams(), 300.15)
	v, lim := d.Limit(5, 0)
	if !lim || v > 0.3 {
		t.Errorf("Limit(5, 0) = %g, %v; want a limited step below 0.3 V", v, lim)
	}
	if v, lim := d.Limit(0.101, 0.1); lim || v != 0.101 {
		t.Errorf("Limit(0.101, 0.1) = %g, %v; want unchanged", v, lim)
	}
	if v, lim := d.Limit(-10, -3.7); !lim || v < -4.5 {
		t.Errorf("Limit(-10, -3.7) = %g, %v; want a limited step into breakdown", v, lim)
	}
}

// TestColdSaturationCurrent: far below T0, I_S(T) underflows a float64
// while the currents it implies do not. The law of Gray, Hurst, Lewis,
// Meyer (ch. 1) in logarithmic form gives ln I_S(10 K) near -1287.6 for a
// 1e-14 A silicon junction (E_g 1.11 eV, p = 3); the forward law at 1.1 V
// must then be exp(ln I_S + v/(n V_T)), a few hundred microamperes, not
// zero.
func TestColdSaturationCurrent(t *testing.T) {
	p := Defaults()
	p.SaturationCurrent = 1e-14
	d := New(p, 10)
	k, q := 1.380649e-23, 1.602176634e-19
	wantLog := math.Log(1e-14) + 3*math.Log(10/300.15) + q*1.11/k*(1/300.15-1.0/10)
	if math.Abs(d.LogSaturationCurrent-wantLog) > 1e-9*math.Abs(wantLog) {
		t.Errorf("ln I_S(10 K) = %.12g, want %.12g", d.LogSaturationCurrent, wantLog)
	}
	v := 1.1
	want := math.Exp(wantLog + v/d.NVT())
	got := d.ForwardCurrent(v)
	if math.Abs(got.Value-want) > 1e-9*want || math.Abs(got.D1-want/d.NVT()) > 1e-9*want/d.NVT() {
		t.Errorf("i_f(1.1 V) at 10 K = %+v, want %g A", got, want)
	}
	if d.OnTangent(v) {
		t.Errorf("1.1 V at 10 K reported on the tangent")
	}
}

// TestLawBound: beyond the voltage where the law implies MaxLawCurrent it
// continues along its tangent, continuous in value and slope, forward and
// into the breakdown knee alike.
func TestLawBound(t *testing.T) {
	d := New(testParams(), 300.15)
	top := d.NVT() * (math.Log(MaxLawCurrent) - d.LogSaturationCurrent)
	below, above := d.ForwardCurrent(top*(1-1e-12)), d.ForwardCurrent(top*(1+1e-12))
	if math.Abs(below.Value-above.Value) > 1e-6*MaxLawCurrent || math.Abs(below.D1-above.D1) > 1e-6*below.D1 {
		t.Errorf("forward law jumps at its bound: %+v then %+v", below, above)
	}
	if !d.OnTangent(top*1.01) || d.OnTangent(top*0.99) {
		t.Errorf("OnTangent wrong about the forward bound %g V", top)
	}
	far := d.Current(10 * top)
	if math.IsInf(far.Value, 0) || math.IsNaN(far.Value) || far.D1 != MaxLawCurrent/d.NVT() {
		t.Errorf("far beyond the bound: %+v", far)
	}
	knee := -d.Params.BreakdownVoltage - d.NVT()*(math.Log(MaxLawCurrent)-math.Log(d.Params.BreakdownCurrent))
	if !d.OnTangent(knee-0.01) || d.OnTangent(knee+0.01) {
		t.Errorf("OnTangent wrong about the breakdown bound %g V", knee)
	}
	if l := d.Current(3 * knee); math.IsInf(l.Value, 0) || math.IsNaN(l.Value) {
		t.Errorf("far into breakdown: %+v", l)
	}
}
