package balance

import (
	"math"
	"sort"

	"qpoint/smallsignal"
)

// linear is the circuit's linear part in the frequency domain: the
// admittance matrix Y(jw) of everything but the junctions, in modified
// nodal form, held as one sparse pattern with its values at each product's
// frequency. Lumped parts give Y(jw) = G + jwC; at DC the terminations of
// AC-coupled ports are absent (their DC blocks are open). A part known
// only through its admittance at each frequency (a line, a measured
// block) adds its entries to the same per-product values, so the balance
// itself does not care how Y(jw) was obtained.
type linear struct {
	n      int
	rowPtr []int // compressed rows: entries rowPtr[i]..rowPtr[i+1]-1 of row i
	cols   []int
	g, c   []float64 // lumped G and C at each entry
	dc     []float64 // the AC-coupled ports' terminations, removed at DC
	y      [][]complex128
	edges  [][2]int
	nw     *smallsignal.Network
	index  map[[2]int]int // entry of (row, column), with lines or blocks
}

// newLinear gathers the linear network's pattern and values from the
// linearised network's GLinear and CLinear.
func newLinear(nw *smallsignal.Network) *linear {
	n := nw.N
	g, c := nw.GLinear.RawMatrix(), nw.CLinear.RawMatrix()
	dcOff := make(map[[2]int]float64)
	for _, p := range nw.Ports {
		if !p.ACCoupled {
			continue
		}
		v := 1 / p.Impedance
		add := func(i, j int, v float64) {
			if i >= 0 && j >= 0 {
				dcOff[[2]int{i, j}] += v
			}
		}
		add(p.Node, p.Node, v)
		add(p.Return, p.Return, v)
		add(p.Node, p.Return, -v)
		add(p.Return, p.Node, -v)
	}
	// The lines' and blocks' rows are entries of their own, valued at
	// each product (setFrequencies).
	elem := map[[2]int]bool{}
	for i := range nw.Elements {
		nw.Elements[i].Pattern(func(r, c int) { elem[[2]int{r, c}] = true })
	}
	l := &linear{n: n, rowPtr: make([]int, n+1), nw: nw}
	if len(elem) > 0 {
		l.index = map[[2]int]int{}
	}
	for i := 0; i < n; i++ {
		for j := 0; j < n; j++ {
			gv, cv := g.Data[i*g.Stride+j], c.Data[i*c.Stride+j]
			dv, ok := dcOff[[2]int{i, j}]
			if gv == 0 && cv == 0 && !ok && !elem[[2]int{i, j}] {
				continue
			}
			if l.index != nil {
				l.index[[2]int{i, j}] = len(l.cols)
			}
			l.cols = append(l.cols, j)
			l.g = append(l.g, gv)
			l.c = append(l.c, cv)
			l.dc = append(l.dc, dv)
			if i != j {
				l.edges = append(l.edges, [2]int{i, j})
			}
		}
		l.rowPtr[i+1] = len(l.cols)
	}
	return l
}

// setFrequencies fills Y(jw) at each product's frequency.
func (l *linear) setFrequencies(s *spectrum) {
	l.y = make([][]complex128, len(s.products))
	for k, p := range s.products {
		v := make([]complex128, len(l.cols))
		for e := range v {
			if p.a == 0 {
				v[e] = complex(l.g[e]-l.dc[e], 0)
			} else {
				v[e] = complex(l.g[e], p.omega*l.c[e])
			}
		}
		if l.index != nil {
			// Lines and blocks at the product's signed frequency (the
			// DC relation at DC).
			var s []complex128
			for i := range l.nw.Elements {
				el := &l.nw.Elements[i]
				if need := el.Ports() * el.Ports(); len(s) < need {
					s = make([]complex128, need)
				}
				el.Entries(p.omega, s, func(r, c int, val complex128) { v[l.index[[2]int{r, c}]] += val })
			}
		}
		l.y[k] = v
	}
}

// apply adds Y_k x to dst and, when scale is not nil, |Y_k||x| to scale.
func (l *linear) apply(k int, x, dst []complex128, scale []float64) {
	y := l.y[k]
	for i := 0; i < l.n; i++ {
		var s complex128
		var m float64
		for e := l.rowPtr[i]; e < l.rowPtr[i+1]; e++ {
			t := y[e] * x[l.cols[e]]
			s += t
			if scale != nil {
				m += math.Hypot(real(t), imag(t))
			}
		}
		dst[i] += s
		if scale != nil {
			scale[i] += m
		}
	}
}

// pattern returns the pairs of unknowns the network couples, with the
// junctions' pairs added, sorted and without repeats.
func (l *linear) pattern(extra [][2]int) [][2]int {
	all := append(append([][2]int(nil), l.edges...), extra...)
	sort.Slice(all, func(i, j int) bool {
		if all[i][0] != all[j][0] {
			return all[i][0] < all[j][0]
		}
		return all[i][1] < all[j][1]
	})
	out := all[:0]
	for i, e := range all {
		if i == 0 || e != all[i-1] {
			out = append(out, e)
		}
	}
	return out
}
