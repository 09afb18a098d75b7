package band

import (
	"math"
	"math/rand/v2"
	"testing"

	"gonum.org/v1/gonum/mat"
)

// TestSolveAgainstDense compares banded LU with gonum's dense LU
// (gonum.org/v1/gonum/mat, a general-purpose library) on random sparse
// systems, including zero diagonals that need row interchanges, as the
// branch rows of modified nodal analysis have.
func TestSolveAgainstDense(t *testing.T) {
	rng := rand.New(rand.NewPCG(1, 2))
	for trial := 0; trial < 200; trial++ {
		n := 1 + rng.IntN(40)
		var edges [][2]int
		dense := mat.NewDense(n, n, nil)
		for i := 0; i < n; i++ {
			if rng.Float64() < 0.8 {
				dense.Set(i, i, rng.NormFloat64()*3)
			}
		}
		for e := 0; e < 2*n; e++ {
			i, j := rng.IntN(n), rng.IntN(n)
			dense.Set(i, j, dense.At(i, j)+rng.NormFloat64())
			edges = append(edges, [2]int{i, j})
		}
		perm := Order(n, edges)
		kl, ku := Widths(perm, edges)
		m := New(perm, kl, ku)
		for i := 0; i < n; i++ {
			for j := 0; j < n; j++ {
				if v := dense.At(i, j); v != 0 {
					m.Add(i, j, v)
				}
			}
		}
		b := make([]float64, n)
		for i := range b {
			b[i] = rng.NormFloat64()
		}
		var want mat.VecDense
		denseErr := want.SolveVec(dense, mat.NewVecDense(n, append([]float64(nil), b...)))
		err := m.Factor()
		if denseErr != nil || err != nil {
			continue // singular draws say nothing about accuracy
		}
		var cond float64 = mat.Cond(dense, 1)
		if cond > 1e10 {
			continue
		}
		got := append([]float64(nil), b...)
		m.Solve(got)
		for i := range got {
			if d := math.Abs(got[i] - want.AtVec(i)); d > 1e-12*cond*(1+math.Abs(want.AtVec(i))) {
				t.Fatalf("trial %d n=%d: x[%d] = %g, dense LU gives %g", trial, n, i, got[i], want.AtVec(i))
			}
		}
	}
}

func TestOrderNarrowsLadder(t *testing.T) {
	// Two rails joined by rungs: nodes 2i and 2i+1 form rung i.
	n := 200
	var edges [][2]int
	for i := 0; i+1 < n/2; i++ {
		edges = append(edges, [2]int{2 * i, 2*i + 2}, [2]int{2*i + 1, 2*i + 3}, [2]int{2 * i, 2*i + 1})
	}
	perm := Order(n, edges)
	kl, _ := Widths(perm, edges)
	if kl > 4 {
		t.Errorf("reverse Cuthill-McKee bandwidth of a two-rail ladder = %d, want at most 4 (the level sets hold two nodes each)", kl)
	}
}
