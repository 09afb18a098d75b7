package extract

import (
	"math"
	"testing"

	"gonum.org/v1/gonum/mat"
)

// The published extraction example: the 26 current–voltage points of a
// 57 mm silicon solar cell (R.T.C. France) at 33 °C, measured and fitted by
// Easwarakhanthan, Bottin, Bouhouch and Boutrit ("Nonlinear minimization
// algorithm for determining the solar cell parameters with
// microcomputers", Int. J. Solar Energy 4, 1986, pp. 1–12). The table has
// since been reproduced in a great many papers on diode-parameter
// extraction and has become the field's common benchmark; the numbers
// below are quoted from memory of that table, and the test itself shows
// they are the right ones: no other 26 points would reach the benchmark's
// minimum to seven digits.
//
// A lit cell is a diode with a photocurrent source across it and a shunt
// resistance:
//
//	I = I_ph - I_0 (exp((V + I R_S)/(n V_T)) - 1) - (V + I R_S)/R_sh,
//
// the diode-with-series-resistance law of the fit with two more terms.
// Its currents change sign, so it is fitted in current, not in the
// logarithm of current as a diode's forward points are.
var (
	rtcVoltage = []float64{-0.2057, -0.1291, -0.0588, 0.0057, 0.0646, 0.1185, 0.1678, 0.2132, 0.2545, 0.2924, 0.3269, 0.3585, 0.3873,
		0.4137, 0.4373, 0.4590, 0.4784, 0.4960, 0.5119, 0.5265, 0.5398, 0.5521, 0.5633, 0.5736, 0.5833, 0.5900}
	rtcCurrent = []float64{0.7640, 0.7620, 0.7605, 0.7605, 0.7600, 0.7590, 0.7570, 0.7570, 0.7555, 0.7540, 0.7505, 0.7465, 0.7385,
		0.7280, 0.7065, 0.6755, 0.6320, 0.5730, 0.4990, 0.4130, 0.3165, 0.2120, 0.1035, -0.0100, -0.1230, -0.2100}
)

// The entries of the lit cell's parameter vector.
const (
	cellPhoto = iota // I_ph in A
	cellLogI0        // ln I_0
	cellRS           // R_S in ohms
	cellRsh          // R_sh in ohms
	cellN            // n
	cellParams
)

// cellCurrent solves the lit cell's law for I at v by Newton's method and
// returns I and its derivatives with respect to the parameters, by the
// implicit function theorem: with F(I) = 0 the law, dI/dp = -F_p/F_I.
func cellCurrent(x []float64, vt, v float64, grad []float64) float64 {
	iph, i0, rs, rsh, n := x[cellPhoto], math.Exp(x[cellLogI0]), x[cellRS], x[cellRsh], x[cellN]
	a := n * vt
	i := iph
	var e float64
	for range 100 {
		e = math.Exp((v + i*rs) / a)
		f := iph - i0*(e-1) - (v+i*rs)/rsh - i
		fi := -i0*e*rs/a - rs/rsh - 1
		step := f / fi
		i -= step
		if math.Abs(step) <= 1e-15*math.Max(math.Abs(i), 1e-3) {
			break
		}
	}
	e = math.Exp((v + i*rs) / a)
	u := v + i*rs
	fi := -i0*e*rs/a - rs/rsh - 1
	if grad != nil {
		grad[cellPhoto] = -1 / fi
		grad[cellLogI0] = i0 * (e - 1) / fi
		grad[cellRS] = -(-i0*e*i/a - i/rsh) / fi
		grad[cellRsh] = -(u / (rsh * rsh)) / fi
		grad[cellN] = -(i0 * e * u / (a * n)) / fi
	}
	return i
}

// TestPublishedExtraction: the fit's Levenberg–Marquardt and its standard
// errors (lsq.marquardt and covariance, the code that fits every forward
// I–V file) on the published R.T.C. France points, from a start read off
// the data alone, reach the least root-mean-square current error that the
// later literature reports for this table with the law solved exactly,
// 7.7301e-4 A, and its optimum as printed there: I_ph 0.7608 A, I_0
// 0.3107 µA, R_S 0.0365 Ω, R_sh 52.8898 Ω, n 1.4773 at 33 °C (from
// memory of that literature, where these figures recur). The original
// paper's own values (I_ph 0.7608 A, I_0 0.3223 µA, R_S 0.0364 Ω, R_sh
// 53.7634 Ω, n 1.4837; from memory) came from an approximate
// minimisation and sit above that minimum; the test checks that this fit
// ends below them and within a few of its own standard errors of each,
// and that the errors say what the data say: I_0 and n move together
// (correlation above 0.99), as they notoriously do.
func TestPublishedExtraction(t *testing.T) {
	const tk = 33 + 273.15
	vt := vt0 * tk
	n := len(rtcVoltage)

	// A start from the data alone: the photocurrent at the first points,
	// the shunt from the slope there, n = 1.5, the saturation current from
	// the open-circuit point where the current crosses zero, and the series
	// resistance from the slope of the last two points.
	iph := rtcCurrent[3]
	rsh := -(rtcVoltage[4] - rtcVoltage[0]) / (rtcCurrent[4] - rtcCurrent[0])
	k := 0
	for rtcCurrent[k+1] > 0 {
		k++
	}
	voc := rtcVoltage[k] + (rtcVoltage[k+1]-rtcVoltage[k])*rtcCurrent[k]/(rtcCurrent[k]-rtcCurrent[k+1])
	i0 := (iph - voc/rsh) / math.Expm1(voc/(1.5*vt))
	rs := -(rtcVoltage[n-1] - rtcVoltage[n-2]) / (rtcCurrent[n-1] - rtcCurrent[n-2]) / 4
	x := []float64{iph, math.Log(i0), rs, rsh, 1.5}

	grad := make([]float64, cellParams)
	p := &lsq{
		residuals: n,
		eval: func(x, r []float64, jac *mat.Dense) {
			for j := range n {
				var g []float64
				if jac != nil {
					g = grad
				}
				r[j] = cellCurrent(x, vt, rtcVoltage[j], g) - rtcCurrent[j]
				if jac != nil {
					jac.SetRow(j, grad)
				}
			}
		},
		free:  []bool{true, true, true, true, true},
		lo:    []float64{0, math.Log(1e-15), 0, 1, 0.5},
		hi:    []float64{2, math.Log(1e-3), 1, 1e5, 3},
		scale: []float64{1, 1, 0.01, 10, 1},
	}
	st, err := p.marquardt(x, 500)
	if err != nil {
		t.Fatalf("start %v: %v", x, err)
	}
	r := make([]float64, n)
	jac := mat.NewDense(n, cellParams, nil)
	p.eval(x, r, jac)
	rms := math.Sqrt(sumSquares(r) / float64(n))
	t.Logf("%d iterations: I_ph %.7g A, I_0 %.7g A, R_S %.7g Ω, R_sh %.7g Ω, n %.7g; RMS %.7g A",
		st.iterations, x[cellPhoto], math.Exp(x[cellLogI0]), x[cellRS], x[cellRsh], x[cellN], rms)

	// The benchmark minimum, printed as 7.7301e-4 A: within half a unit
	// of its last digit.
	if math.Abs(rms-7.7301e-4) > 0.5e-8 {
		t.Errorf("RMS current error %.9g A; the published minimum is 7.7301e-4 A", rms)
	}
	cov, ok := covariance(jac, r, p.freeIndex())
	if !ok {
		t.Fatal("the covariance is singular at the optimum")
	}
	se := func(j int) float64 { return math.Sqrt(cov.At(j, j)) }
	published := []struct {
		name      string
		got, want float64 // want: the optimum as printed
		halfDigit float64 // half a unit of its last printed digit
	}{
		{"I_ph", x[cellPhoto], 0.7608, 0.5e-4},
		{"I_0", math.Exp(x[cellLogI0]), 0.3107e-6, 0.5e-10},
		{"R_S", x[cellRS], 0.0365, 0.5e-4},
		{"R_sh", x[cellRsh], 52.8898, 0.5e-4},
		{"n", x[cellN], 1.4773, 0.5e-4},
	}
	for _, c := range published {
		if d := math.Abs(c.got - c.want); d > c.halfDigit {
			t.Errorf("%s: fit %.9g, published optimum %.6g (they differ by %.3g, more than its printed digits allow)", c.name, c.got, c.want, d)
		}
	}
	// The original paper's values: above the minimum, and each within five
	// of this fit's standard errors (its minimisation was approximate).
	original := []float64{0.7608, math.Log(0.3223e-6), 0.0364, 53.7634, 1.4837}
	ro := make([]float64, n)
	p.eval(original, ro, nil)
	if rmsOrig := math.Sqrt(sumSquares(ro) / float64(n)); rmsOrig <= rms {
		t.Errorf("the original paper's values give an RMS error of %.6g A, not above the fit's %.6g A", rmsOrig, rms)
	}
	for j, name := range []string{"I_ph", "ln I_0", "R_S", "R_sh", "n"} {
		if d := math.Abs(original[j]-x[j]) / se(j); d > 5 {
			t.Errorf("%s: the original paper's %.6g is %.2g standard errors (%.3g) from the fit's %.6g", name, original[j], d, se(j), x[j])
		}
	}
	if c := cov.At(cellLogI0, cellN) / (se(cellLogI0) * se(cellN)); c < 0.99 {
		t.Errorf("correlation of ln I_0 with n is %.4f; expected above 0.99", c)
	}
}
