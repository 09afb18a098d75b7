package transient

import (
	"math"
	"sort"
	"strconv"
	"testing"

	"qpoint/ac/nonlinear"
	"qpoint/smallsignal"
)

// branin is a lossless line between unknowns a and b (each end against
// the reference node) by the method of characteristics (Branin,
// "Transient analysis of lossless transmission lines", Proc. IEEE 55(11),
// 1967): with i_k the current into end k,
//
//	i_1(t) = v_1(t)/Z0 - (v_2(t-T)/Z0 + i_2(t-T)),
//	i_2(t) = v_2(t)/Z0 - (v_1(t-T)/Z0 + i_1(t-T)),
//
// a conductance 1/Z0 at each end and a current that only the past sets.
// It is the shape a line part would take (the circuit file has none yet):
// here it shows that Delayed carries one.
type branin struct {
	a, b      int
	z0, delay float64
	t         []float64
	v1, v2    []float64
	i1, i2    []float64
	breaks    []float64 // breakpoints landed on: kinks the line carries on
}

func (l *branin) Stamp(sys *nonlinear.System) {
	sys.AddConductance(l.a, smallsignal.Ground, 1/l.z0)
	sys.AddConductance(l.b, smallsignal.Ground, 1/l.z0)
}

// past returns v and i of end k at time t (at rest before the run).
func (l *branin) past(t float64, v, i []float64) (float64, float64) {
	n := len(l.t)
	if n == 0 || t <= l.t[0] {
		return 0, 0
	}
	j := sort.SearchFloat64s(l.t, t)
	if j >= n {
		return v[n-1], i[n-1]
	}
	f := (t - l.t[j-1]) / (l.t[j] - l.t[j-1])
	return v[j-1] + f*(v[j]-v[j-1]), i[j-1] + f*(i[j]-i[j-1])
}

// sources returns the history currents J_1, J_2 at t.
func (l *branin) sources(t float64) (float64, float64) {
	v2, i2 := l.past(t-l.delay, l.v2, l.i2)
	v1, i1 := l.past(t-l.delay, l.v1, l.i1)
	return v2/l.z0 + i2, v1/l.z0 + i1
}

func (l *branin) Inject(t float64, r []float64) {
	j1, j2 := l.sources(t)
	r[l.a] -= j1
	r[l.b] -= j2
}

func (l *branin) Accept(t float64, x []float64, breakpoint bool) {
	if breakpoint {
		l.breaks = append(l.breaks, t)
	}
	j1, j2 := l.sources(t)
	v1, v2 := x[l.a], x[l.b]
	l.t = append(l.t, t)
	l.v1, l.v2 = append(l.v1, v1), append(l.v2, v2)
	l.i1, l.i2 = append(l.i1, v1/l.z0-j1), append(l.i2, v2/l.z0-j2)
}

// NextBreak returns the first arrival after t of a kink that left an end
// one delay earlier.
func (l *branin) NextBreak(t float64) float64 {
	for _, b := range l.breaks {
		if b+l.delay > t*(1+1e-12) {
			return b + l.delay
		}
	}
	return math.Inf(1)
}

func (l *branin) Delay() float64 { return l.delay }

func (l *branin) Power(t float64, x []float64) float64 {
	j1, j2 := l.sources(t)
	v1, v2 := x[l.a], x[l.b]
	return v1*(v1/l.z0-j1) + v2*(v2/l.z0-j2)
}

// TestLinePlugsIn drives a 50 Ω line of delay T, loaded by R_L, from a
// 50 Ω generator with a step of E: the lattice-diagram closed form
// (Bewley; Pozar, "Microwave Engineering", 4th ed., 2012, sec. 2.3) gives
// v_b = (1 + Γ) E/2 from T on, and v_a = E/2 until 2T and (1 + Γ) E/2
// after, with Γ = (R_L - Z0)/(R_L + Z0). Matched and mismatched loads,
// within 1e-3 of E away from the edges; and the energy account, the line
// holding what is in flight, closes to 1e-6.
func TestLinePlugsIn(t *testing.T) {
	const z0, delay, emf, edge = 50.0, 1e-9, 2.0, 10e-12
	for _, load := range []float64{50, 150} {
		nw := network(t, `
name: line test
parts:
  - {type: resistor, name: RL, between: [b, gnd], value: `+formatG(load)+`}
  - {type: resistor, name: Rleak, between: [a, gnd], value: 1T}   # the file needs a part at the port's node
ports:
  - {name: in, node: a, impedance: 50}
`)
		a, b := nw.Nodes["a"], nw.Nodes["b"]
		line := &branin{a: a, b: b, z0: z0, delay: delay}
		src := PiecewiseLinear{Times: []float64{0, edge}, Values: []float64{0, emf}}
		r, err := Run(nw, Settings{Input: 0, Source: src, Watch: []int{a, b}, Delayed: []Delayed{line},
			RelativeTolerance: 1e-7, VoltageTolerance: 1e-9}, 5*delay)
		if err != nil {
			t.Fatal(err)
		}
		gamma := (load - z0) / (load + z0)

		worst := 0.0
		for i, tt := range r.Times {
			// Away from each edge: the step's own ramp, its arrivals at T
			// and its return at 2T.
			near := false
			for _, e := range []float64{0, delay, 2 * delay} {
				near = near || (tt > e-edge && tt < e+3*edge)
			}
			if near {
				continue
			}
			wantB := 0.0
			if tt > delay {
				wantB = (1 + gamma) * emf / 2
			}
			wantA := emf / 2
			if tt > 2*delay {
				wantA = (1 + gamma) * emf / 2
			}
			worst = math.Max(worst, math.Max(math.Abs(r.Watched[0][i]-wantA), math.Abs(r.Watched[1][i]-wantB)))
		}
		t.Logf("load %g Ω: %d steps, largest deviation %.3g V, energy imbalance %.2g", load, r.Stats.Accepted, worst, r.Energy.Imbalance)
		if worst > 1e-3*emf {
			t.Errorf("load %g Ω: the line's voltages depart %.3g V from the lattice diagram; want within %.3g V", load, worst, 1e-3*emf)
		}
		if r.Energy.Imbalance > 1e-6 {
			t.Errorf("load %g Ω: energy imbalance %.3g with the line; want within 1e-6", load, r.Energy.Imbalance)
		}
	}
}

func formatG(v float64) string { return strconv.FormatFloat(v, 'g', -1, 64) }
