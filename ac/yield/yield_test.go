package yield

import (
	"fmt"
	"math"
	"math/cmplx"
	"strconv"
	"strings"
	"testing"

	"gonum.org/v1/gonum/stat/distuv"

	"qpoint/ac"
	"qpoint/ac/study"
	"qpoint/bias/circuit"
)

func targets(t *testing.T, texts ...string) []Target {
	t.Helper()
	var ts []Target
	for _, s := range texts {
		tg, err := ParseTarget(s)
		if err != nil {
			t.Fatalf("ParseTarget(%q): %v", s, err)
		}
		ts = append(ts, tg)
	}
	return ts
}

func load(t testing.TB, name, text string) *circuit.Circuit {
	t.Helper()
	c, err := circuit.Parse(name, []byte(text))
	if err != nil {
		t.Fatal(err)
	}
	return c
}

func TestParseTarget(t *testing.T) {
	good := []struct {
		in    string
		name  string
		bound Bound
		limit float64
		freq  float64
	}{
		{"s21>-6.2dB@900MHz", "s21", AtLeast, -6.2, 900e6},
		{"s21@900MHz>-6.2dB", "s21", AtLeast, -6.2, 900e6},
		{"hd3<-50dBc", "hd3", AtMost, -50, 0},
		{"current.D1 < 2mA", "current", AtMost, 2e-3, 0},
		{"zin_re>45@1GHz", "zin_re", AtLeast, 45, 1e9},
	}
	for _, g := range good {
		tg, err := ParseTarget(g.in)
		if err != nil {
			t.Errorf("ParseTarget(%q): %v", g.in, err)
			continue
		}
		if tg.Measure.Name != g.name || tg.Bound != g.bound || math.Abs(tg.Limit-g.limit) > 1e-15 || tg.Measure.FrequencyHz != g.freq {
			t.Errorf("ParseTarget(%q) = %s %v %g @%g; want %s %v %g @%g", g.in, tg.Measure.Name, tg.Bound, tg.Limit, tg.Measure.FrequencyHz, g.name, g.bound, g.limit, g.freq)
		}
	}
	bad := []struct{ in, phrase string }{
		{"s21=-6dB", "MEASURE>VALUE"},
		{"s21>=-6dB", "alone"},
		{"s21>-6dB>-7dB", "MEASURE>VALUE"},
		{"s21@1GHz>-6dB@2GHz", "twice"},
		{"gain>3dB", "not a measure"},
		{">3dB", "MEASURE>VALUE"},
		{"s21>loud", "target value"},
	}
	for _, b := range bad {
		if _, err := ParseTarget(b.in); err == nil || !strings.Contains(err.Error(), b.phrase) {
			t.Errorf("ParseTarget(%q) = %v; want an error containing %q", b.in, err, b.phrase)
		}
	}
}

// TestWilson compares the score interval with the worked examples of
// Newcombe (Statistics in Medicine 17, 1998, Table II, method 3; from
// memory) and with the score test inverted numerically: the interval's
// ends are where (p̂ - p)² = z² p(1-p)/n, found by bisection with z from
// gonum's normal quantile.
func TestWilson(t *testing.T) {
	z := distuv.UnitNormal.Quantile(0.975)
	if math.Abs(z-z95) > 1e-12 {
		t.Fatalf("z95 = %.15g; gonum's Φ⁻¹(0.975) = %.15g", z95, z)
	}
	table := []struct {
		k, n   int
		lo, hi float64
	}{
		{81, 263, 0.2553, 0.3662},
		{15, 148, 0.0624, 0.1605},
		{0, 20, 0, 0.1611},
		{1, 29, 0.0061, 0.1718},
	}
	for _, c := range table {
		lo, hi := Wilson(c.k, c.n, z95)
		if math.Abs(lo-c.lo) > 5e-5 || math.Abs(hi-c.hi) > 5e-5 {
			t.Errorf("Wilson(%d, %d) = [%.4f, %.4f]; Newcombe's table gives [%.4f, %.4f]", c.k, c.n, lo, hi, c.lo, c.hi)
		}
	}
	for _, c := range []struct{ k, n int }{{0, 10}, {3, 10}, {50, 100}, {990, 1000}, {1000, 1000}, {9999, 10000}} {
		p := float64(c.k) / float64(c.n)
		score := func(q float64) float64 { return (p-q)*(p-q) - z*z*q*(1-q)/float64(c.n) }
		bisect := func(a, b float64) float64 { // score(a) > 0 ≥ score(b) or the reverse
			for i := 0; i < 200; i++ {
				m := (a + b) / 2
				if (score(m) > 0) == (score(a) > 0) {
					a = m
				} else {
					b = m
				}
			}
			return (a + b) / 2
		}
		wantLo, wantHi := 0.0, 1.0
		if c.k > 0 {
			wantLo = bisect(0, p)
		}
		if c.k < c.n {
			wantHi = bisect(p, 1)
		}
		lo, hi := Wilson(c.k, c.n, z95)
		if math.Abs(lo-wantLo) > 1e-12 || math.Abs(hi-wantHi) > 1e-12 {
			t.Errorf("Wilson(%d, %d) = [%.15g, %.15g]; the inverted score test gives [%.15g, %.15g]", c.k, c.n, lo, hi, wantLo, wantHi)
		}
	}
}

// shunt is one port into a resistor to ground, whose input resistance is
// the resistor itself: a measure that is exactly the drawn value.
const shunt = `
parts:
  - {type: resistor, name: R1, between: [a, gnd], value: 1k, tolerance: {sigma: 2%}}
ports:
  - {name: p, node: a, impedance: 50}
`

// TestYieldOfNormalMeasure: the input resistance is the resistor, normal
// with σ = 20 Ω, so the yield of zin_re < 1000 Ω + kσ is Φ(k)
// (Abramowitz and Stegun, Table 26.1: Φ(0.5) = 0.6914624613,
// Φ(-1) = 0.1586552539, Φ(1.5) = 0.9331927987, Φ(2) = 0.9772498681),
// within four standard errors √(Φ(1-Φ)/n) of the proportion.
func TestYieldOfNormalMeasure(t *testing.T) {
	c := load(t, "shunt.yaml", shunt)
	const n = 4000
	for _, x := range []struct {
		k, phi float64
	}{{0.5, 0.6914624613}, {-1, 0.1586552539}, {1.5, 0.9331927987}, {2, 0.9772498681}} {
		limit := 1000 + 20*x.k
		tg := targets(t, "zin_re<"+strconv.FormatFloat(limit, 'g', -1, 64)+"@1MHz")
		r, err := Run(c, Settings{Targets: tg, Runs: n, Seed: 7})
		if err != nil {
			t.Fatal(err)
		}
		se := math.Sqrt(x.phi * (1 - x.phi) / n)
		if math.Abs(r.Yield-x.phi) > 4*se {
			t.Errorf("yield of zin_re < %g Ω = %.4f; Φ(%g) = %.4f, standard error %.4f", limit, r.Yield, x.k, x.phi, se)
		}
		if !(r.Interval[0] < r.Yield && r.Yield < r.Interval[1]) {
			t.Errorf("interval %v does not hold the yield %g", r.Interval, r.Yield)
		}
		ts := r.Targets[0]
		if math.Abs(ts.Mean-1000) > 4*20/math.Sqrt(n) || math.Abs(ts.Std/20-1) > 4*math.Sqrt(0.5/n) {
			t.Errorf("zin_re mean %.4g, std %.4g; want 1000 and 20 within sampling error", ts.Mean, ts.Std)
		}
		if math.Abs(ts.LinearStd-20) > 1e-6*20 {
			t.Errorf("first-order standard deviation %.9g; want σ = 20 exactly, as zin_re is the value itself", ts.LinearStd)
		}
	}
}

// tpad is a 3 dB T attenuator between two 50 Ω ports (Z0 (K-1)/(K+1) =
// 8.55 Ω in series, 2 Z0 K/(K²-1) = 141.9 Ω across, K = 10^(3/20)) with
// small tolerances of each kind.
const tpad = `
parts:
  - {type: resistor, name: R1, between: [in, mid],  value: 8.55,  tolerance: 2%}
  - {type: resistor, name: R2, between: [mid, gnd], value: 141.9, tolerance: {sigma: 1%}}
  - {type: resistor, name: R3, between: [mid, out], value: 8.55,  tolerance: {log_sigma: 0.01}}
ports:
  - {name: in,  node: in,  impedance: 50}
  - {name: out, node: out, impedance: 50}
`

// tpadS21dB is |S21| in dB of the T network from its ABCD matrix,
// S21 = 2/(A + B/Z0 + C Z0 + D) (Pozar, Microwave Engineering, 4th ed.,
// Tables 4.1 and 4.2), independent of qpoint's network solver.
func tpadS21dB(r1, r2, r3 float64) float64 {
	const z0 = 50
	a, b, c, d := 1+r1/r2, r1+r3+r1*r3/r2, 1/r2, 1+r3/r2
	return 20 * math.Log10(cmplx.Abs(complex(2/(a+b/z0+c*z0+d), 0)))
}

// TestGUMOnAttenuator: the law of propagation of uncertainty (JCGM
// 100:2008, 5.1.2), u²(S21) = Σ (∂S21/∂R_i)² u²(R_i), with the
// derivatives of the closed form and u = a/√3 for a band, σ for a
// normal spread and R0 e^(s²/2) √(e^(s²)-1) for a log-normal one. The
// first-order standard deviation must equal it, and the Monte Carlo
// variance must lie within four of its own standard errors
// √((m4 - s⁴)/n) of it (the small tolerances keep the response linear;
// for a fresh seed, four standard errors fail by chance once in 16000).
func TestGUMOnAttenuator(t *testing.T) {
	c := load(t, "tpad.yaml", tpad)
	nom := []float64{8.55, 141.9, 8.55}
	u := []float64{0.02 * 8.55 / math.Sqrt(3), 0.01 * 141.9, 8.55 * math.Exp(0.5e-4) * math.Sqrt(math.Expm1(1e-4))}
	var u2 float64
	for i := range nom {
		h := 1e-6 * nom[i]
		up, down := append([]float64(nil), nom...), append([]float64(nil), nom...)
		up[i] += h
		down[i] -= h
		ci := (tpadS21dB(up[0], up[1], up[2]) - tpadS21dB(down[0], down[1], down[2])) / (2 * h)
		u2 += ci * ci * u[i] * u[i]
	}
	const n = 40000
	r, err := Run(c, Settings{Targets: targets(t, "s21>-3.1dB@100MHz"), Runs: n, Seed: 1, Workers: 2})
	if err != nil {
		t.Fatal(err)
	}
	if got := tpadS21dB(nom[0], nom[1], nom[2]); math.Abs(r.Nominal[0]-got) > 1e-9 {
		t.Fatalf("nominal S21 %.12g dB; closed form %.12g dB", r.Nominal[0], got)
	}
	ts := r.Targets[0]
	if math.Abs(ts.LinearStd/math.Sqrt(u2)-1) > 1e-4 {
		t.Errorf("first-order standard deviation %.6g dB; the GUM law gives %.6g dB", ts.LinearStd, math.Sqrt(u2))
	}
	var m2, m4 float64
	for i := range r.Runs {
		d := r.Runs[i].Worst[0] - ts.Mean
		m2 += d * d
		m4 += d * d * d * d
	}
	m2 /= n
	m4 /= n
	s2 := ts.Std * ts.Std
	se := math.Sqrt((m4 - m2*m2) / n)
	if math.Abs(s2-u2) > 4*se {
		t.Errorf("Monte Carlo variance %.4g dB²; GUM %.4g dB², standard error of the variance %.2g", s2, u2, se)
	}
	t.Logf("S21 standard deviation: Monte Carlo %.5g dB, GUM %.5g dB (variance standard error %.2g %%)", ts.Std, math.Sqrt(u2), 100*se/u2)
	var shares float64
	for _, s := range r.Ranking(0) {
		shares += s.Share
	}
	if math.Abs(shares-1) > 1e-12 {
		t.Errorf("shares add up to %g; want 1", shares)
	}
}

// attenuator loads the demo attenuator, whose file gives tolerances.
func attenuator(t testing.TB) (*circuit.Circuit, study.Settings) {
	t.Helper()
	c, err := circuit.Load("../../testdata/demo/attenuator.yaml")
	if err != nil {
		t.Fatal(err)
	}
	// -10 dBm into 50 Ω: an EMF of 2 √(2 · 50 Ω · 0.1 mW) peak.
	emf := 2 * math.Sqrt(2*50*1e-4)
	return c, study.Settings{FrequenciesHz: []float64{900e6},
		Drive: ac.Drive{Input: 0, Output: ac.Output{Port: 1}, FrequencyHz: 900e6, EMF: emf}}
}

// TestWorkersAgree: every run's values and readings are the same, bit
// for bit, with one worker or three, over two temperatures.
func TestWorkersAgree(t *testing.T) {
	c, a := attenuator(t)
	s := Settings{Targets: targets(t, "s21>-4.8dB@900MHz", "hd3<-37dBc"), Runs: 150, Seed: 11,
		TemperaturesK: []float64{233.15, 358.15}, Analysis: a}
	var results []*Result
	for _, w := range []int{1, 3} {
		s.Workers = w
		r, err := Run(c, s)
		if err != nil {
			t.Fatal(err)
		}
		results = append(results, r)
	}
	one, three := results[0], results[1]
	t.Logf("nominal worst readings %v; passed %d of %d", one.Nominal, one.Passed, len(one.Runs))
	if one.Passed != three.Passed || one.Passed == 0 || one.Passed == len(one.Runs) {
		t.Errorf("passed %d with one worker, %d with three, of %d; want equal and neither none nor all", one.Passed, three.Passed, len(one.Runs))
	}
	for i := range one.Runs {
		a, b := &one.Runs[i], &three.Runs[i]
		for k := range a.Values {
			if math.Float64bits(a.Values[k]) != math.Float64bits(b.Values[k]) {
				t.Fatalf("run %d value %d: %v with one worker, %v with three", i, k, a.Values[k], b.Values[k])
			}
		}
		for k := range a.Readings {
			if math.Float64bits(a.Readings[k]) != math.Float64bits(b.Readings[k]) {
				t.Fatalf("run %d reading %d: %v with one worker, %v with three", i, k, a.Readings[k], b.Readings[k])
			}
		}
	}
}

// TestGroupCorrelation: two resistors of one reel, each the input
// resistance of its own port, with normal scores correlated at ρ: the
// drawn values of normal spreads have correlation ρ, within four
// standard errors (1 - ρ²)/√n of the sample correlation (Fisher 1915, the
// large-sample variance); at ρ = 1 they move together exactly.
func TestGroupCorrelation(t *testing.T) {
	for _, rho := range []string{"1", "0.6"} {
		c := load(t, "reel.yaml", `
parts:
  - {type: resistor, name: R1, between: [a, gnd], value: 1k, tolerance: {sigma: 2%}}
  - {type: resistor, name: R2, between: [b, gnd], value: 2k, tolerance: {sigma: 1%}}
ports:
  - {name: p, node: a, impedance: 50}
  - {name: q, node: b, impedance: 50}
tolerance_groups:
  - {name: reel, members: [R1.value, R2.value], correlation: `+rho+`}
`)
		const n = 4000
		r, err := Run(c, Settings{Targets: targets(t, "zin_re<1050@1MHz"), Runs: n, Seed: 5})
		if err != nil {
			t.Fatal(err)
		}
		var sx, sy, sxx, syy, sxy float64
		for i := range r.Runs {
			x, y := (r.Runs[i].Values[0]-1000)/20, (r.Runs[i].Values[1]-2000)/20
			sx, sy, sxx, syy, sxy = sx+x, sy+y, sxx+x*x, syy+y*y, sxy+x*y
		}
		corr := (sxy - sx*sy/n) / math.Sqrt((sxx-sx*sx/n)*(syy-sy*sy/n))
		want, _ := strconv.ParseFloat(rho, 64)
		if math.Abs(corr-want) > 4*(1-want*want)/math.Sqrt(n)+1e-12 {
			t.Errorf("ρ = %s: the values' correlation is %.4f", rho, corr)
		}
		// The group's share is all of zin_re's variance: only R1 moves it.
		for _, g := range r.Groups {
			if math.Abs(g.Share-1) > 1e-9 {
				t.Errorf("ρ = %s: group share %g; want 1", rho, g.Share)
			}
		}
	}
}

func ExampleRun() {
	c, err := circuit.Load("../../testdata/demo/attenuator.yaml")
	if err != nil {
		fmt.Println(err)
		return
	}
	var targets []Target
	for _, s := range []string{"s21>-4.4dB@900MHz", "s21<-4.0dB@900MHz"} {
		t, err := ParseTarget(s)
		if err != nil {
			fmt.Println(err)
			return
		}
		targets = append(targets, t)
	}
	r, err := Run(c, Settings{Targets: targets, Runs: 1000, Seed: 1})
	if err != nil {
		fmt.Println(err)
		return
	}
	fmt.Printf("yield %.3f, 95 %% interval %.3f to %.3f\n", r.Yield, r.Interval[0], r.Interval[1])
	top := r.Ranking(0)[0]
	fmt.Printf("largest share of %s: %s\n", r.Targets[0].Target.Text, top.Value)
	// Output:
	// yield 0.970, 95 % interval 0.957 to 0.979
	// largest share of s21>-4.4dB@900MHz: Dshunt.ideality
}
