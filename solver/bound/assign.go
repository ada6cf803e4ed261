package bound

import (
	"context"

	"visitline/solver"
)

// assignmentBound is the assignment relaxation: every node gets one
// successor and one predecessor over the arcs left after elimination, at the
// least total cost (Hungarian method with potentials, O(n³)). Subtours are
// allowed, so its value is at most the cost of any route. For the
// completion objective an arc i→j weighs s_i + t_ij and the bound adds the
// departure time of the start. pot are the dual potentials per node. ok is false when no assignment exists (then no
// route exists either) or ctx ended.
// assignFull is the largest number of nodes for which the assignment
// bound keeps its whole cost matrix (32 MB at 2,048 nodes).
var assignFull = 2048

func assignmentBound(ctx context.Context, p *prob, obj solver.Objective, y *yielder) (value int64, pot []int64, ok, infeasible bool) {
	n := p.n
	if n == 1 {
		return 0, nil, true, false
	}
	m := n
	dummy := -1
	if p.shape == solver.OpenFree {
		dummy = n
		m = n + 1
	}
	cost := func(i, j int) (int64, bool) {
		// i, j in 0..m-1; returns false for a forbidden arc.
		serv := func(a int) int64 {
			if obj == solver.CompletionTime && a < n {
				return p.s[a]
			}
			return 0
		}
		switch {
		case dummy >= 0 && i == dummy:
			return 0, j == p.start
		case dummy >= 0 && j == dummy:
			return serv(i), i != p.start || n == 1
		case dummy >= 0 && j == p.start:
			return 0, false
		case p.end >= 0 && i == p.end:
			return serv(i), j == p.start
		case p.end >= 0 && j == p.start:
			return 0, false
		}
		if !p.arc[i*n+j] {
			return 0, false
		}
		return serv(i) + p.t(i, j), true
	}
	// The cost matrix with inf for a forbidden arc, so the inner loop is a
	// plain scan. On a large day (more than assignFull nodes) a row is
	// worked out when the method needs it instead: the matrix would be a
	// second copy of the travel, 200 MB at 5,000 sites.
	fill := func(i int, row []int64) {
		for j := range row {
			if c, ok := cost(i, j); ok {
				row[j] = c
			} else {
				row[j] = inf
			}
		}
	}
	var cm, rowBuf []int64
	if m <= assignFull {
		cm = make([]int64, m*m)
		for i := 0; i < m; i++ {
			fill(i, cm[i*m:(i+1)*m])
		}
	} else {
		rowBuf = make([]int64, m)
	}
	rowOf := func(i int) []int64 {
		if cm != nil {
			return cm[i*m : (i+1)*m]
		}
		fill(i, rowBuf)
		return rowBuf
	}
	// Hungarian method, rows are tails and columns heads (1-based inside).
	u := make([]int64, m+1)
	v := make([]int64, m+1)
	match := make([]int, m+1) // match[col] = row
	way := make([]int, m+1)
	minv := make([]int64, m+1)
	used := make([]bool, m+1)
	for i := 1; i <= m; i++ {
		if ctx.Err() != nil {
			return 0, nil, false, false
		}
		match[0] = i
		j0 := 0
		for j := range minv {
			minv[j] = inf
			used[j] = false
		}
		for {
			if y.tick() && ctx.Err() != nil {
				return 0, nil, false, false
			}
			used[j0] = true
			i0 := match[j0]
			delta, j1 := inf, -1
			row := rowOf(i0 - 1)
			ui := u[i0]
			for j := 1; j <= m; j++ {
				if used[j] {
					continue
				}
				if c := row[j-1]; c < inf {
					if cur := c - ui - v[j]; cur < minv[j] {
						minv[j], way[j] = cur, j0
					}
				}
				if minv[j] < delta {
					delta, j1 = minv[j], j
				}
			}
			if j1 < 0 {
				return 0, nil, false, true
			}
			for j := 0; j <= m; j++ {
				if used[j] {
					u[match[j]] += delta
					v[j] -= delta
				} else if minv[j] < inf {
					minv[j] -= delta
				}
			}
			j0 = j1
			if match[j0] == 0 {
				break
			}
		}
		for j0 != 0 {
			j1 := way[j0]
			match[j0] = match[j1]
			j0 = j1
		}
	}
	var total int64
	for j := 1; j <= m; j++ {
		c, _ := cost(match[j]-1, j-1)
		total += c
	}
	if obj == solver.CompletionTime {
		total += p.e[p.start]
	}
	// The dual potentials: u_k + v_k, the node penalties under which the
	// state-space relaxation starts at least as high as this bound (each
	// node is once a tail and once a head, so Σ(c − u − v) over a route is
	// its reduced cost, which is never negative).
	pot = make([]int64, n)
	for k := 0; k < n; k++ {
		pot[k] = u[k+1] + v[k+1]
	}
	return total, pot, true, false
}
