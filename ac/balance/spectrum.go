package balance

import (
	"fmt"
	"math"
	"sort"
)

// Truncation selects which mixing products m·f1 + n·f2 of two tones are
// unknowns.
type Truncation int

const (
	// Diamond keeps the products with |m| + |n| ≤ Order: every product up
	// to that order, the usual choice for intermodulation.
	Diamond Truncation = iota
	// Box keeps the products with |m| ≤ Order and |n| ≤ Order: every
	// combination of each tone's harmonics up to Order, as a strong tone
	// mixing with a weak one needs.
	Box
)

func (t Truncation) String() string {
	if t == Box {
		return "box"
	}
	return "diamond"
}

// product is one unknown frequency of the balance: the mixing product
// m·f1 + n·f2 (n = 0 for one tone), stored at index a of the artificial
// one-dimensional spectrum, with omega its signed physical angular
// frequency. Of each pair ±(m, n) only the one with a > 0 is kept (and
// DC, a = 0); where its physical frequency is negative its phasor is the
// conjugate of the physical one.
type product struct {
	m, n  int
	a     int
	omega float64
}

// spectrum is the set of products of one solve and the time grid the
// junction laws are evaluated on.
type spectrum struct {
	products []product // products[0] is DC
	samples  int       // S, a power of two
	twoTone  bool
	order    int // K: highest harmonic (one tone) or truncation order (two tones)
	trunc    Truncation
	w1, w2   float64
	// wGrid is the angular frequency of one step of the artificial index:
	// w1 for one tone, w1/λ1 for two, so that index a stands for a·wGrid,
	// near the product's physical frequency when λ2/λ1 is near f2/f1.
	wGrid float64
}

// oneTone returns harmonics 0..k of f1, sampled at the smallest power of
// two at least oversample·(2k+1).
func oneTone(k int, f1Hz float64, oversample int) *spectrum {
	s := &spectrum{order: k, w1: 2 * math.Pi * f1Hz}
	s.wGrid = s.w1
	for i := 0; i <= k; i++ {
		s.products = append(s.products, product{m: i, a: i, omega: float64(i) * s.w1})
	}
	s.samples = samplesFor(k, oversample)
	return s
}

// samplesFor returns the smallest power of two at least
// oversample·(2 amax + 1): the grid holds every product of two spectra
// reaching amax without wrapping, so that the conversion matrices taken
// from it are the exact Jacobian of the sampled residual.
func samplesFor(amax, oversample int) int {
	need := oversample * (2*amax + 1)
	s := 8
	for s < need {
		s *= 2
	}
	return s
}

// twoTones returns the products of f1 and f2 under a truncation of the
// given order, mapped onto one artificial spectrum (the artificial
// frequency mapping of Kundert, White and Sangiovanni-Vincentelli, "A
// mixed frequency-time approach for distortion analysis of switching
// filter circuits", 1988-89): product (m, n) sits at
//
//	a = m·λ1 + n·λ2,   λ1 = K, λ2 = K + 1 (diamond),  λ1 = 2K + 1, λ2 = 1 (box),
//
// (the λ from memory; TestMappingOneToOne checks that each is one-to-one
// on its truncated set), which fills 0..K(K+1) densely for the diamond. A
// memoryless law applied on the artificial grid gives the same mixing
// coefficients as on the physical quasi-periodic waveform, since both are
// the same algebra of the exponentials e^(j(m θ1 + n θ2)); products beyond
// the truncation fold onto kept ones, which is the truncation error the
// growing order keeps below the tolerance.
//
// It fails when two kept products fall on the same physical frequency (a
// tone spacing in a ratio of small whole numbers, such as f2 = 2 f1):
// those would be one unknown physically and two here.
func twoTones(order int, t Truncation, f1Hz, f2Hz float64, oversample int) (*spectrum, error) {
	s := &spectrum{twoTone: true, order: order, trunc: t, w1: 2 * math.Pi * f1Hz, w2: 2 * math.Pi * f2Hz}
	l1, l2 := mapping(order, t, f2Hz/f1Hz)
	s.wGrid = s.w1 / float64(l1)
	amax := 0
	for m := -order; m <= order; m++ {
		for n := -order; n <= order; n++ {
			if t == Diamond && abs(m)+abs(n) > order {
				continue
			}
			a := m*l1 + n*l2
			if a < 0 || (a == 0 && (m != 0 || n != 0)) {
				continue
			}
			s.products = append(s.products, product{m: m, n: n, a: a, omega: float64(m)*s.w1 + float64(n)*s.w2})
			amax = max(amax, a)
		}
	}
	sort.Slice(s.products, func(i, j int) bool { return s.products[i].a < s.products[j].a })
	for i := 1; i < len(s.products); i++ {
		if s.products[i].a == s.products[i-1].a {
			return nil, fmt.Errorf("balance: internal error: artificial frequency %d taken twice", s.products[i].a)
		}
	}
	if err := s.checkCollisions(); err != nil {
		return nil, err
	}
	s.samples = samplesFor(amax, oversample)
	return s, nil
}

// maxLambda bounds the tones' artificial frequencies, and so the time
// grid: about four times order·maxLambda samples.
const maxLambda = 64

// mapping returns the artificial frequencies (λ1, λ2) of the two tones:
// of the pairs that keep the truncated set one-to-one (coprime with
// λ1 + λ2 > 2K for the diamond, since two diamond points differ by at
// most 2K in |m| + |n|; coprime with max(λ1, λ2) > 2K for the box) and
// stay within maxLambda (or the smallest such pair, (K, K + 1) and
// (2K + 1, 1), when the order needs more), the one whose ratio λ2/λ1 is
// nearest f2/f1. Then index a stands for a physical frequency near
// a·f1/λ1, so that the time-domain preconditioner's grid is nearly the
// waveform's own time.
func mapping(order int, t Truncation, ratio float64) (int, int) {
	ok := func(l1, l2 int) bool {
		if l1 < 1 || l2 < 1 || gcd(l1, l2) != 1 {
			return false
		}
		if t == Box {
			return max(l1, l2) > 2*order
		}
		return l1+l2 > 2*order
	}
	best1, best2 := order, order+1
	if t == Box {
		best1, best2 = 2*order+1, 1
	}
	bestErr := math.Abs(float64(best2)/float64(best1) - ratio)
	for l1 := 1; l1 <= maxLambda; l1++ {
		x := float64(l1) * ratio
		for _, l2 := range []int{int(math.Floor(x)), int(math.Ceil(x))} {
			if max(l1, l2) > max(maxLambda, best1, best2) || !ok(l1, l2) {
				continue
			}
			if e := math.Abs(float64(l2)/float64(l1) - ratio); e < bestErr {
				best1, best2, bestErr = l1, l2, e
			}
		}
	}
	return best1, best2
}

func gcd(a, b int) int {
	for b != 0 {
		a, b = b, a%b
	}
	return a
}

// collisionRel is how close, relative to the higher tone, two products'
// frequencies may come before they count as one frequency.
const collisionRel = 1e-9

// checkCollisions reports two kept products on the same physical
// frequency, or a product other than DC at zero frequency.
func (s *spectrum) checkCollisions() error {
	type fp struct {
		f    float64
		m, n int
	}
	list := make([]fp, len(s.products))
	for i, p := range s.products {
		m, n := p.m, p.n
		if p.omega < 0 {
			m, n = -m, -n
		}
		list[i] = fp{math.Abs(p.omega), m, n}
	}
	sort.Slice(list, func(i, j int) bool { return list[i].f < list[j].f })
	tol := collisionRel * math.Max(s.w1, s.w2)
	for i := 1; i < len(list); i++ {
		if list[i].f-list[i-1].f <= tol {
			a, b := list[i-1], list[i]
			return &CollisionError{Orders: [2][2]int{{a.m, a.n}, {b.m, b.n}}, FrequencyHz: b.f / (2 * math.Pi),
				Tone1Hz: s.w1 / (2 * math.Pi), Tone2Hz: s.w2 / (2 * math.Pi)}
		}
	}
	return nil
}

// CollisionError reports two mixing products of two tones that fall on
// one frequency: the tones stand in a ratio of small whole numbers, so
// the steady state is periodic at a common sub-multiple rather than
// two-tone, and the products cannot be told apart.
type CollisionError struct {
	Orders           [2][2]int // (m, n) of each product m·f1 + n·f2
	FrequencyHz      float64
	Tone1Hz, Tone2Hz float64
}

func (e *CollisionError) Error() string {
	name := func(o [2]int) string { return productName(o[0], o[1]) }
	return fmt.Sprintf("tones at %.9g Hz and %.9g Hz put the products %s and %s on the same frequency (%.6g Hz); "+
		"two-tone harmonic balance needs products that fall apart: move one tone so that the two are not in a ratio of small whole numbers",
		e.Tone1Hz, e.Tone2Hz, name(e.Orders[0]), name(e.Orders[1]), e.FrequencyHz)
}

// productName writes m·f1 + n·f2 as a reader would, the positive term
// first: "2f1 - f2", "f2 - f1", "3f1", "DC".
func productName(m, n int) string {
	if m == 0 && n == 0 {
		return "DC"
	}
	term := func(c int, f string) string {
		if c == 1 {
			return f
		}
		return fmt.Sprintf("%d%s", c, f)
	}
	switch {
	case m == 0:
		if n < 0 {
			return "-" + term(-n, "f2")
		}
		return term(n, "f2")
	case n == 0:
		if m < 0 {
			return "-" + term(-m, "f1")
		}
		return term(m, "f1")
	case m > 0 && n > 0:
		return term(m, "f1") + " + " + term(n, "f2")
	case m > 0:
		return term(m, "f1") + " - " + term(-n, "f2")
	case n > 0:
		return term(n, "f2") + " - " + term(-m, "f1")
	}
	return "-(" + term(-m, "f1") + " + " + term(-n, "f2") + ")"
}

// ProductName writes the mixing product m·f1 + n·f2 as "2f1 - f2", "f2",
// "3f1" or "DC".
func ProductName(m, n int) string { return productName(m, n) }

func abs(x int) int {
	if x < 0 {
		return -x
	}
	return x
}

// index returns the position of product (m, n) or of (-m, -n), and
// whether it is the conjugate one; -1 when neither is kept.
func (s *spectrum) index(m, n int) (int, bool) {
	for i, p := range s.products {
		if p.m == m && p.n == n {
			return i, false
		}
		if p.m == -m && p.n == -n {
			return i, true
		}
	}
	return -1, false
}

// top reports whether product i lies at the truncation's edge: the top
// quarter of harmonics for one tone, the last order for two tones.
func (s *spectrum) top(i int) bool {
	p := s.products[i]
	if !s.twoTone {
		return p.m > s.order*3/4
	}
	if s.trunc == Box {
		return max(abs(p.m), abs(p.n)) == s.order
	}
	return abs(p.m)+abs(p.n) == s.order
}
