package balance

import (
	"fmt"
	"math"
	"math/cmplx"

	"qpoint/ac"
	"qpoint/smallsignal"
)

// Generator is a sinusoidal generator at a harmonic of a one-tone drive's
// frequency: EMF Re{E e^(j h ω t)} in series with port Port's reference
// impedance, added to the drive's own generator. Tones at commensurate
// frequencies (a local oscillator at 18 f0 and a signal at 19 f0, say)
// are one periodic steady state of period 1/f0 and solve as one tone of
// frequency f0 with a generator at each harmonic.
type Generator struct {
	Port     int
	Harmonic int        // h ≥ 1
	EMF      complex128 // peak, cosine reference
}

// checkGenerators refuses generators Solve cannot honour.
func checkGenerators(nw *smallsignal.Network, d ac.Drive, s Settings) error {
	if len(s.Generators) == 0 {
		return nil
	}
	if d.SecondToneHz != 0 {
		return fmt.Errorf("generators at harmonics need a one-tone drive")
	}
	for _, g := range s.Generators {
		if g.Port < 0 || g.Port >= len(nw.Ports) {
			return fmt.Errorf("generator port %d: the circuit has %d ports", g.Port+1, len(nw.Ports))
		}
		if g.Harmonic < 1 || g.Harmonic > 4096 {
			return fmt.Errorf("generator harmonic %d; accepted: 1 to 4096", g.Harmonic)
		}
		if cmplx.IsNaN(g.EMF) || cmplx.IsInf(g.EMF) {
			return fmt.Errorf("generator EMF %v is not finite", g.EMF)
		}
		if s.FixedHarmonics && g.Harmonic > s.Harmonics {
			return fmt.Errorf("%d harmonics do not hold a generator at harmonic %d", s.Harmonics, g.Harmonic)
		}
	}
	return nil
}

// stampGenerators adds each generator's Norton current E/Z0 at its
// harmonic to the signal vector b (n unknowns per product).
func stampGenerators(b []complex128, nw *smallsignal.Network, spec *spectrum, gens []Generator) {
	n := nw.N
	for _, g := range gens {
		k, mirrored := spec.index(g.Harmonic, 0)
		if k < 0 {
			continue // checked: the spectrum holds every generator
		}
		port := nw.Ports[g.Port]
		j := g.EMF / complex(port.Impedance, 0)
		if mirrored {
			j = cmplx.Conj(j)
		}
		if port.Node >= 0 {
			b[k*n+port.Node] += j
		}
		if port.Return >= 0 {
			b[k*n+port.Return] -= j
		}
	}
}

// highestGenerator returns the highest harmonic of the generators, 0 for
// none.
func highestGenerator(gens []Generator) int {
	h := 0
	for _, g := range gens {
		h = max(h, g.Harmonic)
	}
	return h
}

// largestGenerator returns the largest generator EMF, 0 for none.
func largestGenerator(gens []Generator) float64 {
	e := 0.0
	for _, g := range gens {
		e = math.Max(e, cmplx.Abs(g.EMF))
	}
	return e
}

// sameGenerators reports whether two generator lists are equal.
func sameGenerators(a, b []Generator) bool {
	if len(a) != len(b) {
		return false
	}
	for i := range a {
		if a[i] != b[i] {
			return false
		}
	}
	return true
}

// Harmonic returns the phasors of every unknown of the network (in the
// layout of smallsignal.Network) at harmonic k of a one-tone solve: peak
// values of the cosine reference of the drive's generator, the node
// voltages' total values at k = 0 (the DC point plus the rectified
// shift). It returns nil for a two-tone solve or a harmonic the solve
// did not hold (k > Stats.Harmonics). The slice is the caller's.
func (r *Result) Harmonic(k int) []complex128 {
	if r.spec == nil || r.spec.twoTone || k < 0 || k >= len(r.spec.products) {
		return nil
	}
	i, mirrored := r.spec.index(k, 0)
	if i < 0 {
		return nil
	}
	out := make([]complex128, r.n)
	for u := range out {
		v := r.x[i*r.n+u]
		if mirrored {
			v = cmplx.Conj(v)
		}
		out[u] = v
	}
	return out
}
