package smallsignal

import (
	"fmt"

	"qpoint/bias/circuit"
)

// stampCouplings adds the mutual inductances of the circuit's
// transformers to C. Each winding is an inductor whose branch row reads
// v_a - v_b - s Σ_j L_ij i_j = 0 with the inductance matrix L of the
// coupled windings: its diagonal holds each winding's own inductance
// (stamped with the inductors), its off-diagonal entries the mutual
// inductances M = k sqrt(L_a L_b), dots at the first terminals (coupled
// inductors: C. A. Desoer and E. S. Kuh, "Basic Circuit Theory", 1969,
// from memory). The
// stamp is in C, so that every analysis on the network — the AC sweep,
// noise, distortion, and in the time domain through CLinear the steady
// states and the transient — sees the coupling.
func stampCouplings(nw *Network, c *circuit.Circuit) error {
	if len(c.Couplings) == 0 {
		return nil
	}
	branch := map[string]int{}
	// The branch currents' names; the unknowns of lines and blocks,
	// after them, are named later (finishElements).
	for k := nw.NodeUnknowns; k < min(nw.N, len(nw.Names)); k++ {
		branch[nw.Names[k]] = k
	}
	value := map[string]float64{}
	for _, p := range c.Parts {
		if p.Kind == circuit.Inductor {
			value[p.Name] = p.Value
		}
	}
	for _, cp := range c.Couplings {
		a, okA := branch[cp.A+"#current"]
		b, okB := branch[cp.B+"#current"]
		if !okA || !okB {
			return fmt.Errorf("smallsignal: transformer %s: winding %s or %s is not an inductor of the circuit", cp.Transformer, cp.A, cp.B)
		}
		m := cp.MutualInductance(value[cp.A], value[cp.B])
		nw.C.Set(a, b, nw.C.At(a, b)-m)
		nw.C.Set(b, a, nw.C.At(b, a)-m)
	}
	return nil
}
