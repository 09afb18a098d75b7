package line

import (
	"fmt"
	"math"
)

// Microstrip is a strip of width w and thickness t on a substrate of
// height h and relative permittivity εr over a ground plane, length ℓ.
type Microstrip struct {
	Width, Length, Height float64 // m
	Permittivity          float64 // εr
	Thickness             float64 // t, m (> 0)
	LossTangent           float64 // tan δ
	Conductivity          float64 // σ of the strip, S/m
	// Extension lengthens the strip electrically (an open end's fringing
	// field, OpenEndExtension), m; the DC resistance keeps Length.
	Extension float64
}

// Copper is the conductivity of annealed copper, 5.80e7 S/m (the
// International Annealed Copper Standard, common practice), the default
// of a microstrip's conductivity.
const Copper = 5.80e7

// airImpedance is the impedance of a zero-thickness strip of normalised
// width u in air (Hammerstad and Jensen, "Accurate models for microstrip
// computer-aided design", IEEE MTT-S Digest 1980, eq. 1; from memory):
//
//	Z01(u) = η0/(2π) ln(F/u + sqrt(1 + (2/u)²)),
//	F = 6 + (2π - 6) exp(-(30.666/u)^0.7528).
func airImpedance(u float64) float64 {
	f := 6 + (2*math.Pi-6)*math.Exp(-math.Pow(30.666/u, 0.7528))
	return Eta0 / (2 * math.Pi) * math.Log(f/u+math.Sqrt(1+4/(u*u)))
}

// staticPermittivity is the quasi-static effective permittivity of a
// zero-thickness strip (Hammerstad and Jensen 1980, eqs. 3-5; from
// memory):
//
//	ε_e = (εr + 1)/2 + (εr - 1)/2 (1 + 10/u)^(-a b),
//	a = 1 + ln((u⁴ + (u/52)²)/(u⁴ + 0.432))/49 + ln(1 + (u/18.1)³)/18.7,
//	b = 0.564 ((εr - 0.9)/(εr + 3))^0.053.
func staticPermittivity(u, er float64) float64 {
	u4 := u * u * u * u
	a := 1 + math.Log((u4+(u/52)*(u/52))/(u4+0.432))/49 + math.Log(1+math.Pow(u/18.1, 3))/18.7
	b := 0.564 * math.Pow((er-0.9)/(er+3), 0.053)
	return (er+1)/2 + (er-1)/2*math.Pow(1+10/u, -a*b)
}

// widthCorrections returns the strip's widening for its thickness in air
// and in the dielectric, Δu1 and Δur (Hammerstad and Jensen 1980, eqs.
// 6-7; from memory), with t̄ = t/h:
//
//	Δu1 = (t̄/π) ln(1 + 4e/(t̄ coth²(sqrt(6.517 u)))),
//	Δur = (1 + 1/cosh(sqrt(εr - 1)))/2 · Δu1.
func widthCorrections(u, tn, er float64) (du1, dur float64) {
	if tn <= 0 {
		return 0, 0
	}
	coth := 1 / math.Tanh(math.Sqrt(6.517*u))
	du1 = tn / math.Pi * math.Log(1+4*math.E/(tn*coth*coth))
	dur = (1 + 1/math.Cosh(math.Sqrt(math.Max(er-1, 0)))) / 2 * du1
	return du1, dur
}

// Static returns the quasi-static characteristic impedance and effective
// permittivity with the strip's thickness (Hammerstad and Jensen 1980,
// eqs. 8-9; from memory):
//
//	Z0 = Z01(u_r)/sqrt(ε_e(u_r)),   ε_eff = ε_e(u_r) (Z01(u_1)/Z01(u_r))²,
//
// u_1 = u + Δu1, u_r = u + Δur. Hammerstad and Jensen state Z01 within
// 0.01 % for u ≤ 1 and 0.03 % for u ≤ 1000, and ε_e within 0.2 % for
// εr ≤ 128 and 0.01 ≤ u ≤ 100.
func (m Microstrip) Static() (z0, eeff float64) {
	u, tn, er := m.Width/m.Height, m.Thickness/m.Height, m.Permittivity
	du1, dur := widthCorrections(u, tn, er)
	u1, ur := u+du1, u+dur
	ee := staticPermittivity(ur, er)
	zr := airImpedance(ur)
	z0 = zr / math.Sqrt(ee)
	r := airImpedance(u1) / zr
	return z0, ee * r * r
}

// EffectivePermittivity returns the effective permittivity at freqHz by the
// dispersion law of Kirschning and Jansen ("Accurate model for effective
// dielectric constant of microstrip with validity up to millimetre-wave
// frequencies", Electron. Lett. 18(6), 1982; from memory), with
// f_n = f h in GHz·mm and u = w/h:
//
//	ε_eff(f) = εr - (εr - ε_eff(0))/(1 + P(f)),
//	P = P1 P2 ((0.1844 + P3 P4) f_n)^1.5763,
//	P1 = 0.27488 + (0.6315 + 0.525/(1 + 0.0157 f_n)^20) u - 0.065683 e^(-8.7513 u),
//	P2 = 0.33622 (1 - e^(-0.03442 εr)),
//	P3 = 0.0363 e^(-4.6 u) (1 - e^(-(f_n/38.7)^4.97)),
//	P4 = 1 + 2.751 (1 - e^(-(εr/15.916)^8)).
//
// They state an accuracy of 0.6 % for 0.1 ≤ u ≤ 100, 1 ≤ εr ≤ 20 and
// h/λ0 ≤ 0.13.
func (m Microstrip) EffectivePermittivity(freqHz float64) float64 {
	_, e0 := m.Static()
	return m.dispersed(e0, freqHz)
}

func (m Microstrip) dispersed(e0, freqHz float64) float64 {
	if freqHz <= 0 {
		return e0
	}
	u, er := m.Width/m.Height, m.Permittivity
	fn := freqHz * m.Height / 1e6 // GHz·mm
	p1 := 0.27488 + (0.6315+0.525/math.Pow(1+0.0157*fn, 20))*u - 0.065683*math.Exp(-8.7513*u)
	p2 := 0.33622 * (1 - math.Exp(-0.03442*er))
	p3 := 0.0363 * math.Exp(-4.6*u) * (1 - math.Exp(-math.Pow(fn/38.7, 4.97)))
	p4 := 1 + 2.751*(1-math.Exp(-math.Pow(er/15.916, 8)))
	p := p1 * p2 * math.Pow((0.1844+p3*p4)*fn, 1.5763)
	return er - (er-e0)/(1+p)
}

// ImpedanceAt returns the characteristic impedance and effective permittivity at
// freqHz: ε_eff by Kirschning and Jansen (EffectivePermittivity) and Z0 by
// Hammerstad and Jensen's dispersion of the impedance (1980; from memory),
//
//	Z0(f) = Z0(0) sqrt(ε_eff(0)/ε_eff(f)) (ε_eff(f) - 1)/(ε_eff(0) - 1).
func (m Microstrip) ImpedanceAt(freqHz float64) (z0, eeff float64) {
	z, e0 := m.Static()
	e := m.dispersed(e0, freqHz)
	if freqHz <= 0 || e0-1 < 1e-12 {
		return z, e
	}
	return z * math.Sqrt(e0/e) * (e - 1) / (e0 - 1), e
}

// airImpedanceOf is the air impedance with the thickness correction at
// width w, thickness t and height h, Z01(u + Δu1).
func airImpedanceOf(w, t, h float64) float64 {
	du1, _ := widthCorrections(w/h, t/h, 1)
	return airImpedance(w/h + du1)
}

// SurfaceResistance returns sqrt(π f μ0/σ), the resistance of a square
// of conductor much thicker than its skin depth.
func (m Microstrip) SurfaceResistance(freqHz float64) float64 {
	return math.Sqrt(math.Pi * freqHz * Mu0 / m.Conductivity)
}

// skinPerMetre returns R'_s(f)/R_s(f), the skin resistance per metre per
// ohm of surface resistance, by Wheeler's incremental inductance rule
// ("Formulas for the skin effect", Proc. IRE 30, 1942), which
// Hammerstad and Jensen (1980) apply to their own impedance:
//
//	R' = (R_s/η0) ∂Z0air/∂n,
//	∂/∂n = -2 ∂/∂w - 2 ∂/∂t + 2 ∂/∂h,
//
// the change of the air impedance when every metal wall recedes by dn
// into its conductor (the strip narrows and thins by 2 dn, the gap to the
// ground plane grows by 2 dn). For a wide strip it gives R_s/w, and the
// attenuation R'/(2 Z0) tends to Pozar's α_c = R_s/(Z0 w) ("Microwave
// Engineering", 4th ed., eq. 3.199). The derivatives are central
// differences.
func (m Microstrip) skinPerMetre() float64 {
	w, t, h := m.Width, m.Thickness, m.Height
	d := 1e-5 * math.Min(w, math.Min(t, h))
	dw := (airImpedanceOf(w+d, t, h) - airImpedanceOf(w-d, t, h)) / (2 * d)
	dt := (airImpedanceOf(w, t+d, h) - airImpedanceOf(w, t-d, h)) / (2 * d)
	dh := (airImpedanceOf(w, t, h+d) - airImpedanceOf(w, t, h-d)) / (2 * d)
	return (-2*dw - 2*dt + 2*dh) / Eta0
}

// Attenuation returns the conductor and dielectric attenuation at freqHz
// in nepers per metre. The conductor's is R'_s/(2 Z0) with R'_s from the
// incremental inductance rule (skinPerMetre) for a smooth strip much
// thicker than its skin depth; the dielectric's
//
//	α_d = k0 εr (ε_eff - 1) tan δ / (2 sqrt(ε_eff) (εr - 1))
//
// (Pozar, "Microwave Engineering", 4th ed., eq. 3.198; Welch and Pratt
// 1966), the filling factor (ε_eff - 1)/(εr - 1) taken as 1 for εr = 1.
func (m Microstrip) Attenuation(freqHz float64) (conductor, dielectric float64) {
	z0, e := m.ImpedanceAt(freqHz)
	conductor = m.SurfaceResistance(freqHz) * m.skinPerMetre() / (2 * z0)
	return conductor, m.dielectricAttenuation(freqHz, e)
}

// dielectricAttenuation is α_d at freqHz for the effective permittivity e
// there (Attenuation).
func (m Microstrip) dielectricAttenuation(freqHz, e float64) float64 {
	q := 1.0
	if m.Permittivity-1 > 1e-12 {
		q = (e - 1) / (m.Permittivity - 1)
	}
	k0 := 2 * math.Pi * freqHz / SpeedOfLight
	return k0 * m.Permittivity * q * m.LossTangent / (2 * math.Sqrt(e))
}

// DCResistance returns the strip's resistance at DC, ℓ/(σ w t); the
// ground plane is taken as a perfect conductor.
func (m Microstrip) DCResistance() float64 {
	return m.Length / (m.Conductivity * m.Width * m.Thickness)
}

// At returns the strip's telegrapher section at freqHz: per metre
// L' = Z0 sqrt(ε_eff)/c and C' = sqrt(ε_eff)/(Z0 c) from the dispersive
// Z0 and ε_eff, the conductor's series impedance (Conductor: the DC
// resistance joined to the skin-effect resistance of the incremental
// inductance rule) and G' = 2 α_d / Z0, over the electrical length
// ℓ + Extension.
func (m Microstrip) At(freqHz float64) Section {
	z0, e := m.ImpedanceAt(freqHz)
	l := m.Length + m.Extension
	w := 2 * math.Pi * freqHz
	ls := z0 * math.Sqrt(e) / SpeedOfLight
	cs := math.Sqrt(e) / (z0 * SpeedOfLight)
	ad := m.dielectricAttenuation(freqHz, e)
	const refHz = 1e9
	cond := Conductor{
		DCResistance: m.DCResistance() * l / m.Length,
		SkinAt:       m.SurfaceResistance(refHz) * m.skinPerMetre() * l,
		SkinHz:       refHz,
	}
	return Section{
		Z: cond.At(freqHz) + complex(0, w*ls*l),
		Y: complex(2*ad/z0*l, w*cs*l),
	}
}

// Reference returns the static Z0, the reference impedance of the
// strip's S-matrix.
func (m Microstrip) Reference() float64 {
	z, _ := m.Static()
	return z
}

// OpenEndExtension returns the length by which an open end's fringing
// field lengthens the strip (Hammerstad, "Equivalent circuit of
// microstrip discontinuities", 1975; from memory),
//
//	Δl = 0.412 h (ε_eff + 0.3)(u + 0.264) / ((ε_eff - 0.258)(u + 0.8)),
//
// with the quasi-static ε_eff; it is the common estimate, good to a few
// per cent of Δl for 0.2 ≤ u ≤ 6 (common practice).
func (m Microstrip) OpenEndExtension() float64 {
	_, e := m.Static()
	u := m.Width / m.Height
	return 0.412 * m.Height * (e + 0.3) * (u + 0.264) / ((e - 0.258) * (u + 0.8))
}

// MaxHz is the highest frequency at which the dispersion law holds its
// stated accuracy, h/λ0 = 0.13 (Kirschning and Jansen 1982).
func (m Microstrip) MaxHz() float64 { return 0.13 * SpeedOfLight / m.Height }

// Outside lists where the strip lies outside the range in which the
// models state their accuracy: w/h from 0.1 to 100 and εr from 1 to 20
// (Kirschning and Jansen 1982; Hammerstad and Jensen hold from w/h = 0.01
// and to εr = 128), and a thickness above h (the thickness correction
// assumes a thin strip, t < h).
func (m Microstrip) Outside() []string {
	var out []string
	u := m.Width / m.Height
	if u < 0.1 || u > 100 {
		out = append(out, fmt.Sprintf("width/height %.3g lies outside 0.1 to 100, where the dispersion law of Kirschning and Jansen holds its 0.6 %% accuracy", u))
	}
	if m.Permittivity > 20 {
		out = append(out, fmt.Sprintf("relative permittivity %.3g lies above 20, where the dispersion law of Kirschning and Jansen holds its 0.6 %% accuracy", m.Permittivity))
	}
	if m.Thickness > m.Height {
		out = append(out, fmt.Sprintf("the strip is thicker (%.3g m) than the substrate (%.3g m); the thickness correction of Hammerstad and Jensen is for thin strips", m.Thickness, m.Height))
	}
	return out
}
