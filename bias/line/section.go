package line

import (
	"math"
	"math/cmplx"
)

// Physical constants (CODATA 2018: c exact, μ0 measured since the 2019 SI
// revision).
const (
	SpeedOfLight = 299792458.0      // c, m/s
	Mu0          = 1.25663706212e-6 // μ0, H/m
	// Eta0 is the impedance of free space μ0 c, ohm.
	Eta0 = Mu0 * SpeedOfLight
)

// Section is a uniform line at one frequency in the telegrapher's form:
// its whole series impedance Z = (R + jωL)·ℓ and its whole shunt admittance
// Y = (G + jωC)·ℓ (Pozar, "Microwave Engineering", 4th ed., 2012, sec. 2.1).
type Section struct {
	Z, Y complex128
}

// ABCD returns the line's transmission matrix (Pozar sec. 4.4, Table 4.1),
//
//	A = D = cosh θ,   B = Z sinh θ / θ,   C = Y sinh θ / θ,   θ² = Z Y,
//
// which is cosh γℓ, Z_c sinh γℓ and sinh γℓ / Z_c with γℓ = θ and
// Z_c = sqrt(Z/Y), written through θ² alone: cosh θ and sinh θ / θ are
// even in θ, so no square-root branch is chosen, and at ω = 0 (Y = 0) it
// is the series resistance Z with A = D = 1, as the conductors are.
func (s Section) ABCD() (a, b, c, d complex128) {
	theta := cmplx.Sqrt(s.Z * s.Y)
	ch := cmplx.Cosh(theta)
	sc := sinhc(theta)
	return ch, s.Z * sc, s.Y * sc, ch
}

// sinhc returns sinh θ / θ, 1 at θ = 0.
func sinhc(t complex128) complex128 {
	if cmplx.Abs(t) < 1e-4 {
		t2 := t * t
		return 1 + t2/6 + t2*t2/120
	}
	return cmplx.Sinh(t) / t
}

// Scattering returns the S-matrix of the section between two ports of
// real reference impedance zr (Pozar Table 4.2):
//
//	S11 = (A + B/zr - C zr - D)/Δ,   S12 = 2(AD - BC)/Δ,
//	S21 = 2/Δ,                       S22 = (-A + B/zr - C zr + D)/Δ,
//
// Δ = A + B/zr + C zr + D, into s as row-major 2×2. AD - BC = 1 for the
// uniform line (reciprocal), so S12 = S21. For an electrically long lossy
// line cosh θ overflows where the attenuation passes about 700 nepers;
// the S-matrix is then that of two matched ends with no transmission,
// which is what it tends to.
func (s Section) Scattering(zr float64, out []complex128) {
	theta := cmplx.Sqrt(s.Z * s.Y)
	if real(theta) > 300 {
		// e^(-300) is below every rounding the analyses see: the ends
		// are decoupled and each is the line's own impedance.
		zc := cmplx.Sqrt(s.Z / s.Y)
		g := (zc - complex(zr, 0)) / (zc + complex(zr, 0))
		out[0], out[1], out[2], out[3] = g, 0, 0, g
		return
	}
	a, b, c, d := s.ABCD()
	r := complex(zr, 0)
	den := a + b/r + c*r + d
	out[0] = (a + b/r - c*r - d) / den
	out[1] = 2 * (a*d - b*c) / den
	out[2] = 2 / den
	out[3] = (-a + b/r - c*r + d) / den
}

// Conductor is the series impedance of a line's conductors per unit
// length: a DC resistance and the skin-effect resistance R_s(f) ∝ √f,
// joined as
//
//	R(f) = sqrt(R_dc² + R_s(f)²),   X_int(f) = R_s(f),
//
// the internal reactance equal to the skin resistance, as a conductor
// much thicker than its skin depth has (Wheeler, "Formulas for the skin
// effect", Proc. IRE 30, 1942): without it the √f loss would not be
// causal. The root-sum-square join is a smooth passage from the DC
// resistance to the skin-effect law (common practice); where R_s
// dominates it is R_s.
type Conductor struct {
	DCResistance float64 // ohm per metre (or per line, as the caller counts)
	SkinAt       float64 // R_s at SkinHz, same unit
	SkinHz       float64
}

// At returns the conductor's series impedance at freqHz (without the
// line's external inductance).
func (c Conductor) At(freqHz float64) complex128 {
	var rs float64
	if c.SkinAt > 0 && freqHz > 0 {
		rs = c.SkinAt * math.Sqrt(freqHz/c.SkinHz)
	}
	return complex(math.Hypot(c.DCResistance, rs), rs)
}

// Law is a uniform two-port line at any frequency: Ideal or Microstrip.
type Law interface {
	// At returns the line's telegrapher section at freqHz (0 for DC).
	At(freqHz float64) Section
	// Reference returns the real reference impedance of its S-matrix,
	// its nominal characteristic impedance.
	Reference() float64
}
