package line

import (
	"math"
	"math/cmplx"
	"math/rand/v2"
	"testing"
)

// TestLosslessABCD: a lossless line's transmission matrix is
// [[cos βl, jZ0 sin βl], [j sin βl / Z0, cos βl]] (Pozar, "Microwave
// Engineering", 4th ed., sec. 4.4, Table 4.1), βl = ωT; and its S-matrix
// against its own Z0 is [[0, e^(-jβl)], [e^(-jβl), 0]] (Pozar sec. 2.3).
func TestLosslessABCD(t *testing.T) {
	l := Ideal{Impedance: 75, Delay: 123e-12}
	for _, f := range []float64{0, 1e6, 1e9, 2.0325e9, 5.8e9, 37e9} {
		bl := 2 * math.Pi * f * l.Delay
		a, b, c, d := l.At(f).ABCD()
		want := [4]complex128{complex(math.Cos(bl), 0), complex(0, 75*math.Sin(bl)), complex(0, math.Sin(bl)/75), complex(math.Cos(bl), 0)}
		for i, got := range [4]complex128{a, b, c, d} {
			scale := 1.0
			if i == 1 {
				scale = 75
			} else if i == 2 {
				scale = 1.0 / 75
			}
			if cmplx.Abs(got-want[i]) > 1e-14*scale {
				t.Errorf("f=%g: ABCD[%d] = %v, Pozar %v", f, i, got, want[i])
			}
		}
		s := make([]complex128, 4)
		l.At(f).Scattering(75, s)
		e := cmplx.Exp(complex(0, -bl))
		if cmplx.Abs(s[0]) > 1e-14 || cmplx.Abs(s[3]) > 1e-14 || cmplx.Abs(s[1]-e) > 1e-14 || cmplx.Abs(s[2]-e) > 1e-14 {
			t.Errorf("f=%g: S = %v, want [0 e^-jβl; e^-jβl 0] with e^-jβl = %v", f, s, e)
		}
	}
}

// TestLowLossAttenuation: the stated loss is the attenuation at its
// frequency, α = Re γ ≈ R/(2 Z0) + G Z0/2 (Pozar eqs. 2.80-2.81), which
// holds to second order in the loss; the conductor part grows as √f and
// the dielectric part as f. The conductor's internal reactance, equal to
// its skin resistance (Wheeler 1942), lowers the conductor's share by
// R/(2ωL) to first order, as a larger inductance does in R/(2 Z0).
func TestLowLossAttenuation(t *testing.T) {
	const dbc, dbd = 0.15, 0.05 // dB/m at 1 GHz
	l := Ideal{Impedance: 50, Length: 10, Delay: 10 / (0.66 * SpeedOfLight),
		ConductorLoss: dbc * NepersPerDB, DielectricLoss: dbd * NepersPerDB, LossHz: 1e9}
	for _, f := range []float64{1e8, 1e9, 4e9} {
		s := l.At(f)
		alpha := real(cmplx.Sqrt(s.Z*s.Y)) / l.Length / NepersPerDB // dB/m
		r := 2 * l.Impedance * dbc * NepersPerDB * math.Sqrt(f/1e9) // R per metre
		wl := 2 * math.Pi * f * l.Impedance * l.Delay / l.Length    // ωL per metre
		want := dbc*math.Sqrt(f/1e9)*(1-r/(2*wl)) + dbd*f/1e9
		if math.Abs(alpha/want-1) > 3e-4 { // second-order terms: (R/ωL)², RG
			t.Errorf("at %g Hz: %.6f dB/m, want %.6f", f, alpha, want)
		}
	}
}

// TestRelationScattering: DC relations as S-matrices (Kurokawa 1965):
// open ports reflect +1, ports shorted to their return -1, a through pair
// of equal references transmits fully, and a resistance R on a port of
// reference Z reflects (R - Z)/(R + Z) (Pozar eq. 2.35).
func TestRelationScattering(t *testing.T) {
	refs := []float64{50, 50}
	check := func(name string, r Relation, want []float64) {
		t.Helper()
		s, err := r.Scattering(refs[:r.Ports])
		if err != nil {
			t.Fatalf("%s: %v", name, err)
		}
		for i := range want {
			if math.Abs(s[i]-want[i]) > 1e-15 {
				t.Errorf("%s: S = %v, want %v", name, s, want)
				return
			}
		}
	}
	check("open", Open(2), []float64{1, 0, 0, 1})
	check("short", Resistance(2, []float64{0, 0, 0, 0}), []float64{-1, 0, 0, -1})
	check("through", Through(2, [][]int{{0, 1}}), []float64{0, 1, 1, 0})
	check("line at DC", SeriesRelation(0), []float64{0, 1, 1, 0})
	check("resistor", Resistance(1, []float64{150}), []float64{0.5})
}

// TestLargestSingularValue against matrices whose singular values are
// known: a unitary matrix has all of them 1; diag(0.5, 2j) has 2 and 0.5;
// a rank-one u vᴴ has |u||v|.
func TestLargestSingularValue(t *testing.T) {
	c := complex(math.Cos(0.3), 0)
	s := complex(math.Sin(0.3), 0)
	u := []complex128{c, 1i * s, 1i * s, c}
	if v := LargestSingularValue(u, 2); math.Abs(v-1) > 1e-14 {
		t.Errorf("unitary: %v", v)
	}
	if v := LargestSingularValue([]complex128{0.5, 0, 0, 2i}, 2); math.Abs(v-2) > 1e-14 {
		t.Errorf("diag: %v", v)
	}
	a, b := []complex128{1, 2i, -1}, []complex128{0.5, 1 - 1i, 2}
	m := make([]complex128, 9)
	for i := range a {
		for j := range b {
			m[i*3+j] = a[i] * cmplx.Conj(b[j])
		}
	}
	want := math.Sqrt(1+4+1) * math.Sqrt(0.25+2+4)
	if v := LargestSingularValue(m, 3); math.Abs(v-want) > 1e-13*want {
		t.Errorf("rank one: %v, want %v", v, want)
	}
}

// TestInterpolationKeepsPassivity: between two passive matrices the
// interpolated S never has a larger singular value than the larger of
// theirs (the norm's triangle inequality); at the data's frequencies it
// is the data.
func TestInterpolationKeepsPassivity(t *testing.T) {
	rng := rand.New(rand.NewPCG(1, 2))
	random := func() []complex128 {
		m := make([]complex128, 9)
		for i := range m {
			m[i] = complex(rng.NormFloat64(), rng.NormFloat64())
		}
		g := LargestSingularValue(m, 3)
		for i := range m {
			m[i] /= complex(g*(1+1e-3*rng.Float64()), 0)
		}
		return m
	}
	for trial := 0; trial < 200; trial++ {
		tab := &Table{Ports: 3, References: []float64{50, 50, 50}, Freqs: []float64{1e9, 2e9}, S: [][]complex128{random(), random()}}
		lim := math.Max(LargestSingularValue(tab.S[0], 3), LargestSingularValue(tab.S[1], 3))
		out := make([]complex128, 9)
		for _, f := range []float64{1e9, 1.2e9, 1.5e9, 1.9e9, 2e9} {
			tab.At(f, out)
			if v := LargestSingularValue(out, 3); v > lim*(1+1e-14) {
				t.Fatalf("at %g Hz: σ_max %v above the data's %v", f, v, lim)
			}
		}
		tab.At(2e9, out)
		for i := range out {
			if out[i] != tab.S[1][i] {
				t.Fatalf("at the data's frequency S differs from the data")
			}
		}
	}
}
