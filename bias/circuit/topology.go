package circuit

import (
	"fmt"
	"strings"

	"go.yaml.in/yaml/v3"
)

// topology checks what the DC operating point needs from the circuit's
// connections: a reference node, a DC path from every node to it, and no
// loop made of voltage sources and inductors alone (a short at DC, which
// leaves the current around it undetermined).
func (l *loader) topology(partsKey *yaml.Node) {
	index := make(map[string]int, len(l.c.Nodes)+1)
	index[Ground] = 0
	for i, name := range l.c.Nodes {
		index[name] = i + 1
	}
	if !l.touchesGround {
		l.errorf(partsKey, "no part or port connects to `%s`, the reference node%s; accepted: at least one part with a terminal on gnd, or a port returned to gnd",
			Ground, groundHint(l.c.Nodes))
	} else {
		l.floatingNodes(index)
		l.floatingAboveDC(index)
	}
	l.sourceLoops(index)
}

// groundHint points at node names that look as if they were meant as the
// reference node.
func groundHint(nodes []string) string {
	for _, n := range nodes {
		if strings.EqualFold(n, Ground) || strings.EqualFold(n, "ground") || n == "0" {
			return fmt.Sprintf(" (node `%s` is an ordinary node, the reference is named `%s`)", n, Ground)
		}
	}
	return ""
}

// conductsDC tells whether a part of kind k carries a DC current that its
// terminal voltages determine, and so ties its nodes together at DC.
func conductsDC(k Kind) bool {
	return k == Resistor || k == Inductor || k == VoltageSource || k == Diode
}

// floatingNodes reports groups of nodes with no DC path to gnd, one error per
// group, at the first current source feeding the group or else at the first
// part touching it.
func (l *loader) floatingNodes(index map[string]int) {
	uf := newUnionFind(len(index))
	for _, p := range l.c.Parts {
		if conductsDC(p.Kind) {
			uf.union(index[p.Nodes[0]], index[p.Nodes[1]])
		}
	}
	// A dc-coupled port is its reference impedance at DC.
	for _, p := range l.c.Ports {
		if !p.ACCoupled {
			uf.union(index[p.Node], index[p.Return])
		}
	}
	for _, e := range l.dcPaths() {
		uf.union(index[e[0]], index[e[1]])
	}
	ground := uf.find(0)
	var roots []int
	groups := map[int][]string{}
	for _, name := range l.c.Nodes {
		r := uf.find(index[name])
		if r == ground {
			continue
		}
		if _, ok := groups[r]; !ok {
			roots = append(roots, r)
		}
		groups[r] = append(groups[r], name)
	}
	// One pass over the parts finds, for each group, the part to point at
	// and the current sources feeding it.
	first := map[int]*Part{}
	feeders := map[int][]string{}
	for i := range l.c.Parts {
		p := &l.c.Parts[i]
		for j, node := range p.Nodes {
			r := uf.find(index[node])
			if r == ground || (j == 1 && r == uf.find(index[p.Nodes[0]])) {
				continue
			}
			if p.Kind == CurrentSource {
				if len(feeders[r]) == 0 {
					first[r] = p
				}
				feeders[r] = append(feeders[r], p.Name)
			} else if first[r] == nil {
				first[r] = p
			}
		}
	}
	// A group reached only by distributed parts is pointed at through
	// the first of them, with what it does at DC.
	openAt := map[int]string{}
	for i := range l.c.Distributed {
		d := &l.c.Distributed[i]
		for _, node := range d.Nodes() {
			r := uf.find(index[node])
			if r == ground {
				continue
			}
			if first[r] == nil {
				first[r] = &Part{Name: d.Name, Pos: d.Pos}
			}
			if d.DCText == "open" || d.DCText == "through" {
				if _, ok := openAt[r]; !ok {
					openAt[r] = d.Name
				}
			}
		}
	}
	for _, r := range roots {
		nodes := groups[r]
		subject, verb := fmt.Sprintf("node %s has", nameList(nodes, 8)), "is"
		if len(nodes) > 1 {
			subject, verb = fmt.Sprintf("nodes %s have", nameList(nodes, 8)), "are"
		}
		hint := groundHint(nodes)
		if first[r] == nil {
			continue // cannot happen: every node comes from a part
		}
		at := first[r].Pos
		if len(feeders[r]) > 0 {
			l.errorAt(at.Line, at.Col,
				"%s no DC path to gnd and %s fed only by current sources (%s)%s; accepted: a resistive path to gnd, e.g. a resistor from `%s` to gnd",
				subject, verb, plainList(feeders[r], 8), hint, nodes[0])
			continue
		}
		also := ""
		if name, ok := openAt[r]; ok {
			also = fmt.Sprintf(", or block `%s`, open there at DC", name)
		}
		l.errorAt(at.Line, at.Col,
			"%s no DC path to gnd, only capacitors or ac-coupled ports reach it%s%s; accepted: a DC path to gnd through a resistor, inductor, diode, voltage source, line or dc-coupled port",
			subject, also, hint)
	}
}

// sourceLoops reports each loop made only of voltage sources, inductors
// and parts that are shorts at DC (lossless lines, blocks joining
// terminals), at the part that closes it, naming every part in the loop.
func (l *loader) sourceLoops(index map[string]int) {
	type short struct {
		a, b int
		name string
		what int // 0 voltage source, 1 inductor, 2 line or block
		pos  Pos
	}
	var shorts []short
	for _, p := range l.c.Parts {
		switch p.Kind {
		case VoltageSource:
			shorts = append(shorts, short{index[p.Nodes[0]], index[p.Nodes[1]], p.Name, 0, p.Pos})
		case Inductor:
			shorts = append(shorts, short{index[p.Nodes[0]], index[p.Nodes[1]], p.Name, 1, p.Pos})
		}
	}
	for _, e := range l.dcShorts() {
		shorts = append(shorts, short{index[e.a], index[e.b], e.name, 2, e.pos})
	}
	type edge struct{ to, part int }
	uf := newUnionFind(len(index))
	adj := make([][]edge, len(index))
	via := make([]edge, len(index)) // via[node] is the tree edge the walk reached it by
	seen := make([]bool, len(index))
	var touched []int
	for i, p := range shorts {
		a, b := p.a, p.b
		if a == b {
			continue // already reported as a part shorted on itself
		}
		if uf.find(a) != uf.find(b) {
			uf.union(a, b)
			adj[a] = append(adj[a], edge{b, i})
			adj[b] = append(adj[b], edge{a, i})
			continue
		}
		// a and b are already joined by a tree of sources and inductors:
		// walk it to name the parts of the loop. The buffers are shared
		// between loops and reset where they were touched.
		for _, x := range touched {
			seen[x] = false
		}
		touched = append(touched[:0], a)
		seen[a] = true
		queue := []int{a}
		for len(queue) > 0 && !seen[b] {
			x := queue[0]
			queue = queue[1:]
			for _, e := range adj[x] {
				if !seen[e.to] {
					seen[e.to] = true
					touched = append(touched, e.to)
					via[e.to] = edge{x, e.part}
					queue = append(queue, e.to)
				}
			}
		}
		names := []string{p.name}
		var count [3]int
		count[p.what]++
		for x := b; x != a; x = via[x].to {
			q := shorts[via[x].part]
			names = append(names, q.name)
			count[q.what]++
		}
		var kinds []string
		for k, word := range []string{"voltage sources", "inductors", "lines and blocks shorted at DC"} {
			if count[k] > 0 {
				kinds = append(kinds, word)
			}
		}
		what := strings.Join(kinds, " and ")
		l.errorAt(p.pos.Line, p.pos.Col,
			"%s %s form a loop with nothing else in it, a short circuit at DC where the current around the loop is undetermined; accepted: a resistor or other part in every such loop, e.g. a source's internal resistance",
			what, nameList(names, 12))
	}
}

// unionFind joins nodes into connected groups (R. E. Tarjan, "Efficiency of
// a good but not linear set union algorithm", J. ACM 22 (1975) 215).
type unionFind struct {
	parent, size []int
}

func newUnionFind(n int) *unionFind {
	u := &unionFind{parent: make([]int, n), size: make([]int, n)}
	for i := range u.parent {
		u.parent[i], u.size[i] = i, 1
	}
	return u
}

func (u *unionFind) find(x int) int {
	for u.parent[x] != x {
		u.parent[x] = u.parent[u.parent[x]] // path halving
		x = u.parent[x]
	}
	return x
}

func (u *unionFind) union(a, b int) {
	a, b = u.find(a), u.find(b)
	if a == b {
		return
	}
	if u.size[a] < u.size[b] {
		a, b = b, a
	}
	u.parent[b] = a
	u.size[a] += u.size[b]
}
