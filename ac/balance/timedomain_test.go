package balance

import (
	"math"
	"testing"

	"qpoint/bias/circuit"
)

// timeSystem returns the demo's balance at its own distortion drive,
// evaluated at the bias point (lambda 0) or at the steady state harmonic
// balance finds (lambda 1, where the junctions switch over the period),
// with the time-domain preconditioner set up.
func timeSystem(t *testing.T, name string, lambda float64) *system {
	t.Helper()
	c, err := circuit.Parse(name, []byte(demo(t, name)))
	if err != nil {
		t.Fatal(err)
	}
	nw := linearise(t, c)
	d := fileDrive(t, c)
	spec := oneTone(16, d.FrequencyHz, 2)
	n := nw.N
	x := make([]complex128, n*len(spec.products))
	for i, v := range nw.Bias {
		x[i] = complex(v, 0)
	}
	if lambda != 0 {
		r, err := Solve(nw, d, Settings{})
		if err != nil {
			t.Fatal(err)
		}
		spec = r.spec
		x = r.x
	}
	sys := newSystem(nw, newLinear(nw), spec, junctionsOf(nw), d.Input, d.EMF, nil)
	sys.lambda = lambda
	f := make([]complex128, len(x))
	sys.residual(x, f)
	if err := sys.factorTime(); err != nil {
		t.Fatalf("%s: %v", name, err)
	}
	return sys
}

// TestTimeSolveExact: the time-domain preconditioner solves its own
// backward-difference system exactly: from the residual of a known
// periodic waveform it returns that waveform, to rounding, with the
// junctions switching over the period (which cuts the period into
// segments where the propagator grows).
func TestTimeSolveExact(t *testing.T) {
	for _, name := range []string{"detector", "limiter", "mixer", "attenuator"} {
		for _, lambda := range []float64{0, 1} {
			sys := timeSystem(t, name, lambda)
			tp := sys.tpre
			n, S := sys.n, tp.S
			h := 2 * math.Pi / (sys.spec.w1 * float64(S))
			want := make([][]float64, n)
			for i := range want {
				want[i] = make([]float64, S)
				for s := range want[i] {
					want[i][s] = math.Cos(2*math.Pi*float64(s)/float64(S)+float64(i)) + 0.3*math.Sin(6*math.Pi*float64(s)/float64(S))
				}
			}
			// r_s = (G + g_s) x_s + (C x_s + c_s v_s - C x_(s-1) - c_(s-1) v_(s-1)) / h
			for s := 0; s < S; s++ {
				sp := (s + S - 1) % S
				for i := 0; i < n; i++ {
					var v float64
					lin := sys.lin
					for e := lin.rowPtr[i]; e < lin.rowPtr[i+1]; e++ {
						j := lin.cols[e]
						v += lin.g[e]*want[j][s] + lin.c[e]*(want[j][s]-want[j][sp])/h
					}
					tp.rt[i][s] = v
				}
				for _, j := range sys.js {
					vd := func(s int) float64 {
						var v float64
						if j.a >= 0 {
							v += want[j.a][s]
						}
						if j.b >= 0 {
							v -= want[j.b][s]
						}
						return v
					}
					c := j.g[s]*vd(s) + (j.c[s]*vd(s)-j.c[sp]*vd(sp))/h
					if j.a >= 0 {
						tp.rt[j.a][s] += c
					}
					if j.b >= 0 {
						tp.rt[j.b][s] -= c
					}
				}
			}
			M := len(tp.segments)
			y := make([]float64, M*n)
			x := make([]float64, n)
			for m, seg := range tp.segments {
				clear(x)
				tp.propagate(seg[0], seg[1], x)
				copy(y[((m+1)%M)*n:], x)
			}
			tp.cycle.solve(y)
			for m, seg := range tp.segments {
				copy(x, y[m*n:(m+1)*n])
				tp.propagate(seg[0], seg[1], x)
			}
			worst := 0.0
			for i := range want {
				for s := range want[i] {
					worst = math.Max(worst, math.Abs(tp.xt[i][s]-want[i][s]))
				}
			}
			t.Logf("%s at λ = %g: %d segments, worst error %.2g", name, lambda, M, worst)
			// Rounding, amplified by the conditioning of the steps:
			// 1e-10 for most demos; the mixer's, a balun and traps from
			// 2.2 nH to 220 pF with its junctions switched by the LO,
			// rounds to 2e-9 at full drive.
			if worst > 1e-8 {
				t.Errorf("%s at λ = %g: the cyclic solve misses the waveform by %.3g", name, lambda, worst)
			}
		}
	}
}

// TestTimePreconditioner: with the time-domain preconditioner, GMRES
// solves each Newton step of the demos at their own drives in few
// iterations, the limiter's hard clipping included.
func TestTimePreconditioner(t *testing.T) {
	for _, name := range []string{"detector", "limiter", "mixer", "attenuator"} {
		c, err := circuit.Parse(name, []byte(demo(t, name)))
		if err != nil {
			t.Fatal(err)
		}
		nw := linearise(t, c)
		r, err := Solve(nw, fileDrive(t, c), Settings{Linear: Krylov, Harmonics: 64})
		if err != nil {
			t.Fatal(err)
		}
		per := float64(r.Stats.LinearIterations) / float64(r.Stats.Iterations)
		t.Logf("%s: %d Newton iterations, %.1f GMRES iterations each, %v", name, r.Stats.Iterations, per, r.Stats.Fallbacks)
		if per > 50 {
			t.Errorf("%s: %.1f GMRES iterations per Newton step, want at most 50", name, per)
		}
		for _, f := range r.Stats.Fallbacks {
			if f == "frequency-domain preconditioner" || f == "direct solve" {
				t.Errorf("%s: the time-domain preconditioner was given up (%v)", name, r.Stats.Fallbacks)
			}
		}
	}
}
