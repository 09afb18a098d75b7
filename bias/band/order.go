package band

import "sort"

// Order returns a reverse Cuthill-McKee permutation of the n unknowns
// coupled by edges (pairs of unknown indices that share a matrix entry):
// perm[k] is the unknown placed at position k. Each connected group starts
// from an unknown of least degree.
func Order(n int, edges [][2]int) []int {
	adj := make([][]int, n)
	for _, e := range edges {
		a, b := e[0], e[1]
		if a == b || a < 0 || b < 0 {
			continue
		}
		adj[a] = append(adj[a], b)
		adj[b] = append(adj[b], a)
	}
	for i := range adj {
		sort.Ints(adj[i])
		adj[i] = dedup(adj[i])
	}
	byDegree := make([]int, n)
	for i := range byDegree {
		byDegree[i] = i
	}
	sort.SliceStable(byDegree, func(i, j int) bool { return len(adj[byDegree[i]]) < len(adj[byDegree[j]]) })

	visited := make([]bool, n)
	order := make([]int, 0, n)
	for _, start := range byDegree {
		if visited[start] {
			continue
		}
		visited[start] = true
		queue := []int{start}
		for len(queue) > 0 {
			u := queue[0]
			queue = queue[1:]
			order = append(order, u)
			next := make([]int, 0, len(adj[u]))
			for _, v := range adj[u] {
				if !visited[v] {
					visited[v] = true
					next = append(next, v)
				}
			}
			sort.SliceStable(next, func(i, j int) bool { return len(adj[next[i]]) < len(adj[next[j]]) })
			queue = append(queue, next...)
		}
	}
	for i, j := 0, len(order)-1; i < j; i, j = i+1, j-1 {
		order[i], order[j] = order[j], order[i]
	}
	return order
}

func dedup(s []int) []int {
	if len(s) < 2 {
		return s
	}
	out := s[:1]
	for _, v := range s[1:] {
		if v != out[len(out)-1] {
			out = append(out, v)
		}
	}
	return out
}

// Widths returns the lower and upper bandwidths of the matrix whose
// structure is edges (plus the diagonal) after the permutation perm.
func Widths(perm []int, edges [][2]int) (kl, ku int) {
	pos := make([]int, len(perm))
	for k, u := range perm {
		pos[u] = k
	}
	for _, e := range edges {
		if e[0] < 0 || e[1] < 0 {
			continue
		}
		d := pos[e[0]] - pos[e[1]]
		if d < 0 {
			d = -d
		}
		if d > kl {
			kl = d
		}
	}
	// Edges are symmetric in structure: the same width above and below.
	return kl, kl
}
