package extract

import (
	"errors"
	"math"
	"math/rand/v2"
	"strings"
	"testing"

	"qpoint/bias/diode"
	"qpoint/bias/measured"
)

func detectorParams() diode.Params {
	p := diode.Defaults()
	p.SaturationCurrent, p.Ideality, p.SeriesResistance = 3e-6, 1.05, 20
	p.ZeroBiasCapacitance, p.BuiltInPotential, p.Grading = 0.18e-12, 0.3, 0.45
	p.GapEnergy, p.SaturationExponent = 0.69, 2
	return p
}

func hasCaution(r *Result, kind CautionKind, key string) *Caution {
	for i, c := range r.Cautions {
		if c.Kind == kind && (key == "" || c.Key == key) {
			return &r.Cautions[i]
		}
	}
	return nil
}

// TestCautions: where the data do not determine a value, the fit says so
// with a typed caution and keeps the default; other doubts are typed too.
func TestCautions(t *testing.T) {
	p := detectorParams()
	rng := func() *rand.Rand { return rand.New(rand.NewPCG(5, 18)) }
	reverse := func(d diode.Params, v0, v1 float64, n int, extra func(v float64) float64) []measured.Point {
		dev := diode.New(d, 300.15)
		var pts []measured.Point
		for k := range n {
			v := v0 + (v1-v0)*float64(k)/float64(n-1)
			i, _ := dev.TerminalCurrent(v)
			if extra != nil {
				i += extra(v)
			}
			pts = append(pts, measured.Point{Voltage: v, Value: i, TemperatureK: 300.15})
		}
		return pts
	}
	cases := []struct {
		name  string
		data  func() Data
		kind  CautionKind
		key   string
		check func(t *testing.T, r *Result)
	}{
		{"no currents where R_S shows", func() Data {
			// Up to 10 µA the 20 Ω drop is 0.2 mV, a tenth of the 1 %
			// noise's voltage equivalent n V_T × 0.01 = 0.27 mV.
			return Data{Current: forwardPoints(p, 300.15, 1e-8, 1e-5, 30, 0.01, rng())}
		}, NotDetermined, "series_resistance", func(t *testing.T, r *Result) {
			if v := r.Value("series_resistance"); v.Status != Default || v.Value != 0 || !math.IsNaN(v.Error) {
				t.Errorf("series resistance %+v; want the default 0, no error", *v)
			}
			if v := r.Value("saturation_current"); v.Status != Fitted || math.Abs(v.Value-3e-6) > 3*v.Error {
				t.Errorf("saturation current %+v, drawn from 3 µA", *v)
			}
		}},
		{"one temperature", func() Data {
			return Data{Current: forwardPoints(p, 300.15, 1e-8, 1e-2, 30, 0.01, rng())}
		}, NotDetermined, "gap_energy", func(t *testing.T, r *Result) {
			if hasCaution(r, NotDetermined, "saturation_temperature_exponent") == nil {
				t.Error("no caution for the temperature exponent")
			}
			if v := r.Value("gap_energy"); v.Status != Default || v.Value != 1.11 {
				t.Errorf("gap energy %+v; want the default 1.11 eV", *v)
			}
		}},
		{"two temperatures", func() Data {
			return Data{Current: append(forwardPoints(p, 300.15, 1e-8, 1e-2, 30, 0.01, rng()), forwardPoints(p, 358.15, 1e-8, 1e-2, 30, 0.01, rng())...)}
		}, NotDetermined, "saturation_temperature_exponent", func(t *testing.T, r *Result) {
			if v := r.Value("saturation_temperature_exponent"); v.Status != Default || v.Value != 3 {
				t.Errorf("exponent %+v; want held at 3", *v)
			}
			if v := r.Value("gap_energy"); v.Status != Fitted {
				t.Errorf("gap energy %+v; want fitted", *v)
			}
		}},
		{"a zero current", func() Data {
			d := Data{Current: forwardPoints(p, 300.15, 1e-8, 1e-2, 30, 0.01, rng())}
			d.Current[3].Value = 0
			return d
		}, PointLeftOut, "", func(t *testing.T, r *Result) {
			c := hasCaution(r, PointLeftOut, "")
			if c.Index != 3 || c.Set != measured.CurrentVoltage || !strings.HasPrefix(c.Message, "line 5: ") || len(r.Forward) != 29 {
				t.Errorf("caution %+v with %d points fitted; want point 3 (line 5) left out of 30", *c, len(r.Forward))
			}
		}},
		{"no reverse points", func() Data {
			return Data{Current: forwardPoints(p, 300.15, 1e-8, 1e-2, 30, 0.01, rng())}
		}, NotDetermined, "breakdown_voltage", func(t *testing.T, r *Result) {
			if r.Model.BreakdownVoltage != 0 {
				t.Errorf("knee at %g V without reverse points", r.Model.BreakdownVoltage)
			}
		}},
		{"reverse points below breakdown", func() Data {
			q := p
			q.BreakdownVoltage, q.BreakdownCurrent = 8, 1e-3
			return Data{Current: append(reverse(q, -4, -0.2, 20, nil), forwardPoints(p, 300.15, 1e-8, 1e-2, 30, 0.01, rng())...)}
		}, NotDetermined, "breakdown_voltage", func(t *testing.T, r *Result) {
			if c := hasCaution(r, NotDetermined, "breakdown_voltage"); !strings.Contains(c.Message, "stay below breakdown") || r.Model.BreakdownVoltage != 0 {
				t.Errorf("caution %q, knee %g V", c.Message, r.Model.BreakdownVoltage)
			}
		}},
		{"leakage above the model", func() Data {
			// Generation current of 5 µA per volt, far above I_S = 3 µA.
			return Data{Current: append(reverse(p, -3, -0.2, 15, func(v float64) float64 { return 5e-6 * v * 10 }), forwardPoints(p, 300.15, 1e-8, 1e-2, 30, 0.01, rng())...)}
		}, LeakageAboveModel, "saturation_current", nil},
		{"recombination current at low bias", func() Data {
			// A second junction law with n = 2 (recombination in the
			// depletion region, Sze and Ng ch. 2) dominates below 1 µA.
			q := p
			q.SaturationCurrent, q.Ideality = 1e-9, 1
			pts := forwardPoints(q, 300.15, 1e-10, 1e-2, 40, 0, nil)
			dev := diode.New(q, 300.15)
			for k := range pts {
				_, vj := dev.TerminalCurrent(pts[k].Voltage)
				pts[k].Value += 2e-8 * math.Expm1(vj/(2*diode.ThermalVoltage(300.15)))
			}
			return Data{Current: pts}
		}, Systematic, "", nil},
		{"narrow C–V range", func() Data {
			return Data{Current: forwardPoints(p, 300.15, 1e-8, 1e-2, 30, 0.01, rng()),
				Capacitance: capacitancePoints(p, 300.15, -0.1, 0, 6, 0.01, rng())}
		}, NotDetermined, "grading_coefficient", func(t *testing.T, r *Result) {
			if v := r.Value("grading_coefficient"); v.Status != Default || v.Value != 0.5 {
				t.Errorf("grading coefficient %+v; want held at 0.5", *v)
			}
			if v := r.Value("zero_bias_capacitance"); v.Status != Fitted {
				t.Errorf("zero-bias capacitance %+v; want fitted", *v)
			}
		}},
		{"C–V points forward of V_bi/2", func() Data {
			return Data{Current: forwardPoints(p, 300.15, 1e-8, 1e-2, 30, 0.01, rng()),
				Capacitance: capacitancePoints(p, 300.15, -3, 0.25, 20, 0.01, rng())}
		}, OutsideLaw, "built_in_potential", nil},
		{"no C–V points", func() Data {
			return Data{Current: forwardPoints(p, 300.15, 1e-8, 1e-2, 30, 0.01, rng())}
		}, NotDetermined, "zero_bias_capacitance", func(t *testing.T, r *Result) {
			if r.Model.ZeroBiasCapacitance != 0 || r.Value("zero_bias_capacitance").Status != Default {
				t.Errorf("zero-bias capacitance %g F without C–V points", r.Model.ZeroBiasCapacitance)
			}
		}},
		{"a narrow current range", func() Data {
			return Data{Current: forwardPoints(p, 300.15, 1e-7, 2e-7, 12, 0.01, rng())}
		}, StrongCorrelation, "saturation_current", nil},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			r, err := Fit(c.data(), Settings{})
			if err != nil {
				t.Fatal(err)
			}
			if hasCaution(r, c.kind, c.key) == nil {
				t.Fatalf("no %v caution for %q; cautions: %+v", c.kind, c.key, r.Cautions)
			}
			if c.check != nil {
				c.check(t, r)
			}
		})
	}
}

// TestClean: data the law describes, over a range that determines every
// value, earn no caution beyond the ones for values no data touch.
func TestClean(t *testing.T) {
	p := detectorParams()
	rng := rand.New(rand.NewPCG(6, 18))
	var d Data
	for _, tk := range []float64{233.15, 300.15, 358.15} {
		d.Current = append(d.Current, forwardPoints(p, tk, 1e-8, 3e-2, 30, 0.01, rng)...)
	}
	d.Capacitance = capacitancePoints(p, 300.15, -4, 0.1, 30, 0.01, rng)
	r, err := Fit(d, Settings{})
	if err != nil {
		t.Fatal(err)
	}
	for _, c := range r.Cautions {
		if c.Key != "breakdown_voltage" {
			t.Errorf("caution %v %s: %s", c.Kind, c.Key, c.Message)
		}
	}
}

// TestDataErrors: data no fit can take get a DataError naming the point.
func TestDataErrors(t *testing.T) {
	p := detectorParams()
	good := func() []measured.Point { return forwardPoints(p, 300.15, 1e-8, 1e-2, 30, 0.01, nil) }
	cases := []struct {
		name  string
		data  Data
		set   measured.Kind
		index int
		says  string
	}{
		{"four forward points", Data{Current: forwardPoints(p, 300.15, 1e-8, 1e-2, 4, 0, nil)}, measured.CurrentVoltage, 3, "4 forward points"},
		{"no points", Data{}, measured.CurrentVoltage, -1, "0 forward points"},
		{"reverse points only", Data{Current: []measured.Point{{Voltage: -1, Value: -1e-6}, {Voltage: -2, Value: -2e-6}}}, measured.CurrentVoltage, 1, "0 forward points"},
		{"a negative forward current", Data{Current: func() []measured.Point { g := good(); g[7].Value = -g[7].Value; return g }()}, measured.CurrentVoltage, 7, "sign of its voltage"},
		{"not finite", Data{Current: func() []measured.Point { g := good(); g[2].Voltage = math.NaN(); return g }()}, measured.CurrentVoltage, 2, "not finite"},
		{"three C–V points", Data{Current: good(), Capacitance: capacitancePoints(p, 300.15, -2, 0, 3, 0, nil)}, measured.CapacitanceVoltage, 2, "3 C–V points"},
		{"a zero capacitance", Data{Current: good(), Capacitance: func() []measured.Point {
			c := capacitancePoints(p, 300.15, -2, 0, 8, 0, nil)
			c[4].Value = 0
			return c
		}()}, measured.CapacitanceVoltage, 4, "above zero"},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			_, err := Fit(c.data, Settings{})
			var de *DataError
			if !errors.As(err, &de) {
				t.Fatalf("error %v, want a *DataError", err)
			}
			if de.Set != c.set || de.Index != c.index || !strings.Contains(de.Msg, c.says) || !strings.Contains(de.Msg, "accepted") {
				t.Errorf("got %v point %d: %s\nwant %v point %d ...%s...; accepted ...", de.Set, de.Index, de.Msg, c.set, c.index, c.says)
			}
		})
	}
}

// TestCurrentFloor: a meter offset of 300 pA on every current pulls the
// fitted I_S up (the smallest currents, 100 pA, read 4 times too high);
// weighting each point by 1/sqrt(1 + (floor/I)²) lowers the pull the more
// the larger the floor given (here by about 15 % with the floor at the
// offset and by half at 1 nA). A floor reduces, and does not remove, an
// absolute error.
func TestCurrentFloor(t *testing.T) {
	p := detectorParams()
	p.SaturationCurrent = 1e-11
	pts := forwardPoints(p, 300.15, 1e-10, 1e-2, 33, 0, nil)
	for k := range pts {
		pts[k].Value += 3e-10
	}
	var off []float64
	for _, floor := range []float64{0, 3e-10, 1e-9} {
		r, err := Fit(Data{Current: pts}, Settings{CurrentFloor: floor})
		if err != nil {
			t.Fatal(err)
		}
		off = append(off, math.Abs(math.Log(r.Model.SaturationCurrent/1e-11)))
	}
	if !(off[2] < off[1] && off[1] < off[0]) {
		t.Errorf("I_S off by %.3g, %.3g, %.3g (ln) with floors 0, 300 pA, 1 nA; want the pull to fall as the floor rises", off[0], off[1], off[2])
	}
}
