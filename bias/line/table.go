package line

import (
	"fmt"
	"sort"
)

// Table is a measured block: its S-matrix at a list of rising
// frequencies, each relative to the ports' real reference impedances, and
// its S-matrix at DC from the behaviour the circuit file declares.
//
// Between two of its frequencies S is interpolated linearly in its real
// and imaginary parts:
//
//	S(f) = (1 - t) S_k + t S_(k+1),   t = (f - f_k)/(f_(k+1) - f_k).
//
// A convex combination of two matrices has a largest singular value no
// greater than the larger of theirs (the spectral norm is a norm: triangle
// inequality), so interpolation never makes a passive block active
// (‖S‖₂ ≤ 1 at the data gives ‖S‖₂ ≤ 1 between them), and a reciprocal
// block stays reciprocal. Interpolation of magnitude and phase, or a
// spline, follows a rotating phase more smoothly but can leave the passive
// set between points; the price of the linear rule is that the data must
// sample each phase finely (Sparse says where they do not).
//
// Below the first frequency S runs linearly from the DC matrix to the
// first point; above the last it is held at the last point. Neither is
// data: Inside tells an analysis when it asked for such a frequency.
type Table struct {
	Ports      int
	References []float64      // ohm, one per port
	Freqs      []float64      // Hz, rising
	S          [][]complex128 // per frequency, row-major Ports×Ports
	// DC is the S-matrix at f = 0, from the declared DC behaviour; nil
	// when the data start at 0 Hz.
	DC []complex128
}

// At writes S at freqHz into out (row-major) and reports whether freqHz
// lies within the data's range.
func (t *Table) At(freqHz float64, out []complex128) (inside bool) {
	n := len(t.Freqs)
	first, last := t.Freqs[0], t.Freqs[n-1]
	switch {
	case freqHz >= last:
		copy(out, t.S[n-1])
		return freqHz == last
	case freqHz <= first:
		if t.DC == nil || first == 0 {
			copy(out, t.S[0])
			return freqHz == first
		}
		blend(out, t.DC, t.S[0], freqHz/first)
		return freqHz == first
	}
	k := sort.SearchFloat64s(t.Freqs, freqHz) // Freqs[k-1] < f <= Freqs[k]
	blend(out, t.S[k-1], t.S[k], (freqHz-t.Freqs[k-1])/(t.Freqs[k]-t.Freqs[k-1]))
	return true
}

func blend(out, a, b []complex128, t float64) {
	ct := complex(t, 0)
	for i := range out {
		out[i] = a[i] + ct*(b[i]-a[i])
	}
}

// Range returns the data's first and last frequency.
func (t *Table) Range() (lo, hi float64) { return t.Freqs[0], t.Freqs[len(t.Freqs)-1] }

// Passivity returns the largest singular value of S over the data's
// frequencies and the frequency where it occurs (LargestSingularValue).
// Above 1 the data describe an active block, or a measurement that is not
// accurate to its last digits.
func (t *Table) Passivity() (largest, atHz float64) {
	for k, s := range t.S {
		if v := LargestSingularValue(s, t.Ports); v > largest || k == 0 {
			largest, atHz = v, t.Freqs[k]
		}
	}
	return largest, atHz
}

// sparseTurn is the most an entry's phase may turn between neighbouring
// frequencies before linear interpolation between them loses more than
// about 1 % of its magnitude midway (1 - cos(φ/2) = 1.1 % at 17°; common
// practice asks for data that sample every phase this finely).
const sparseTurn = 17.0

// Sparse returns the first pair of neighbouring frequencies between which
// some entry larger than 0.1 turns its phase by more than 17 degrees, and
// false when the data sample every phase more finely: between such points
// linear interpolation cuts the corner of the phase's circle.
func (t *Table) Sparse() (fromHz, toHz float64, turn float64, found bool) {
	for k := 1; k < len(t.Freqs); k++ {
		a, b := t.S[k-1], t.S[k]
		for i := range a {
			if abs(a[i]) < 0.1 || abs(b[i]) < 0.1 {
				continue
			}
			d := angleDeg(b[i] / a[i])
			if d > sparseTurn {
				return t.Freqs[k-1], t.Freqs[k], d, true
			}
		}
	}
	return 0, 0, 0, false
}

// Check reports data the table cannot hold: no points, frequencies that
// do not rise, a matrix of the wrong size.
func (t *Table) Check() error {
	if len(t.Freqs) == 0 {
		return fmt.Errorf("no frequencies")
	}
	if len(t.S) != len(t.Freqs) || len(t.References) != t.Ports {
		return fmt.Errorf("%d matrices and %d reference impedances for %d frequencies and %d ports", len(t.S), len(t.References), len(t.Freqs), t.Ports)
	}
	for k, s := range t.S {
		if len(s) != t.Ports*t.Ports {
			return fmt.Errorf("the matrix at %g Hz has %d entries for %d ports", t.Freqs[k], len(s), t.Ports)
		}
		if k > 0 && !(t.Freqs[k] > t.Freqs[k-1]) {
			return fmt.Errorf("frequency %g Hz does not rise above %g Hz", t.Freqs[k], t.Freqs[k-1])
		}
	}
	return nil
}
