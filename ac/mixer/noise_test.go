package mixer

import (
	"fmt"
	"math"
	"math/cmplx"
	"testing"

	"qpoint/ac"
	"qpoint/bias/diode"
)

// pumpedAtT0 is a single-diode mixer of lossless filters around an ideal
// exponential junction (no series resistance, no charge), at a circuit
// temperature T = 2 T0/n, so that the junction's shot noise is that of
// its conductance at T0 (below), with every port at T0 = 290 K.
const pumpedAtT0 = `
temperature: %gK
diode_models:
  d: {saturation_current: 1pA, ideality: %g, measured_at: %gK}
parts:
  - {type: capacitor, name: Clo, between: [lo, a], value: 3pF}
  - {type: capacitor, name: Crf, between: [rf, a], value: 2pF}
  - {type: inductor,  name: Lif, between: [a, ifout], value: 30nH}
  - {type: capacitor, name: Cif, between: [ifout, gnd], value: 10pF}
  - {type: diode, name: D, anode: a, cathode: gnd, model: d}
ports:
  - {name: lo, node: lo, impedance: 50}
  - {name: rf, node: rf, impedance: 50}
  - {name: if, node: ifout, impedance: 50}
`

// TestPumpedJunctionThermal: the shot noise of a pumped exponential
// junction, 2q(i_f + 2 I_S) = 2kT n g(t) + 2q I_S with g = di/dv, is the
// thermal noise of its time-varying conductance at the temperature nT/2
// (C. Dragone, "Analysis of thermal and shot noise in pumped resistive
// diodes", Bell Syst. Tech. J. 47, 1968; from memory): its sideband
// correlation 2q I_(k-l) is 4k(nT/2) times the conversion matrix G_(k-l),
// which is Hermitian. A network of that junction, lossless filters and
// port terminations all at one temperature T' = nT/2 is then in the
// thermal equilibrium of the generalised Nyquist theorem, and the noise
// at any of its ports is that of the impedance seen there (R. Q. Twiss,
// "Nyquist's and Thevenin's theorems generalized for nonreciprocal linear
// networks", J. Appl. Phys. 26, 1955): the IF port's voltage, with every
// source but the IF load's own, has the density 4kT' Re Z_out R²/|R +
// Z_out|², Z_out the IF output impedance under pump. The two sides come
// from different parts of the analysis (the noise from the junction's
// current waveform and the transposed solve, the impedance from the
// conductance waveform and an excitation at the IF) and agree to 1e-6;
// the 2q I_S left over is 1e-9 of the pumped junction's noise here.
func TestPumpedJunctionThermal(t *testing.T) {
	t0 := float64(ac.StandardNoiseTemperatureK)
	// nV_T = 2kT0/q whatever n: one value of n stands for all.
	for _, n := range []float64{1} {
		temp := 2 * t0 / n
		nw := network(t, fmt.Sprintf(pumpedAtT0, temp, n, temp))
		for _, c := range []struct{ rfHz, dbm float64 }{{1.2e9, 10}, {0.85e9, 13}, {1.15e9, 16}} {
			s := Settings{LO: 0, RF: 1, IF: 2, LOFrequencyHz: 1e9, RFFrequencyHz: c.rfHz, LOEMF: ac.DBmToEMF(c.dbm, 50)}
			res, err := Analyze(nw, s)
			if err != nil {
				t.Fatal(err)
			}
			z := res.IFOutputImpedance
			const r = 50
			want := 4 * diode.Boltzmann * t0 * real(z) * r * r / sq(complex(r, 0)+z)
			got := res.Noise.OutputDensity
			rel := math.Abs(got/want - 1)
			t.Logf("n = %g, RF %g Hz, LO %g dBm: IF noise %.9g V²/Hz, 4kT' Re Z_out R²/|R + Z_out|² %.9g (Z_out %.4g Ω), relative difference %.2g; loss %.3f dB, NF %.3f dB SSB",
				n, c.rfHz, c.dbm, got, want, z, rel, res.ConversionLossDB, res.Noise.FigureSSBDB)
			if rel > 1e-6 || cmplx.IsNaN(z) {
				t.Errorf("n = %g, RF %g Hz, LO %g dBm: IF noise %.9g V²/Hz, the generalised Nyquist theorem gives %.9g (relative difference %.2g)", n, c.rfHz, c.dbm, got, want, rel)
			}
		}
	}
}
