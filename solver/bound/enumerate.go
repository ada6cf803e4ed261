package bound

import "visitline/solver"

// Enumerate finds an optimal route by trying every order of the visits
// (depth first, cutting a partial route as soon as a window is missed or its
// cost reaches the best so far). It shares no code with the rest of the
// package, so that tests can use it as an independent oracle. Its time grows
// like (N-1)!: use it for N up to about 11. It honours the shape, the fixed
// prefix and the position pins as solver.CheckRoute defines them. feasible
// is false (and route nil) when no route meets every window, or the instance
// is not valid.
func Enumerate(in *solver.Instance, obj solver.Objective) (route []int, cost int64, feasible bool) {
	if in.Validate() != nil {
		return nil, 0, false
	}
	n := in.N
	pinnedAt := make([]int, n)
	for k := range pinnedAt {
		pinnedAt[k] = -1
	}
	pinOf := make([]int, n)
	for i := range pinOf {
		pinOf[i] = -1
	}
	setPin := func(v, k int) bool {
		if k >= n || pinnedAt[k] >= 0 && pinnedAt[k] != v || pinOf[v] >= 0 && pinOf[v] != k {
			return false
		}
		pinnedAt[k], pinOf[v] = v, k
		return true
	}
	if !setPin(in.Start, 0) {
		return nil, 0, false
	}
	if in.Shape == solver.OpenFixed && !setPin(in.End, n-1) {
		return nil, 0, false
	}
	for k, v := range in.Fixed {
		if !setPin(v, k) {
			return nil, 0, false
		}
	}
	for v, k := range in.Position {
		if k > 0 && !setPin(v, k) {
			return nil, 0, false
		}
	}
	cur := make([]int, n)
	used := make([]bool, n)
	cur[0], used[in.Start] = in.Start, true
	best := []int(nil)
	bestCost := int64(0)
	var dfs func(k int, t, c int64)
	dfs = func(k int, t, c int64) {
		// t is the start of service at cur[k-1]; c the cost so far.
		prev := cur[k-1]
		dep := t + in.Service[prev]
		if k == n {
			total := c
			switch {
			case in.Shape == solver.Closed && n > 1:
				arr := dep + in.T(prev, in.Start)
				if arr > in.Late[in.Start] {
					return
				}
				if obj == solver.CompletionTime {
					total = arr
				} else {
					total = c + in.T(prev, in.Start)
				}
			case obj == solver.CompletionTime:
				total = dep
			}
			if best == nil || total < bestCost {
				best, bestCost = append([]int(nil), cur...), total
			}
			return
		}
		for v := 0; v < n; v++ {
			if used[v] || pinnedAt[k] >= 0 && pinnedAt[k] != v || pinOf[v] >= 0 && pinOf[v] != k {
				continue
			}
			arr := dep + in.T(prev, v)
			st := max(arr, in.Early[v])
			if st > in.Late[v] {
				continue
			}
			nc := c + in.T(prev, v)
			if obj == solver.CompletionTime {
				nc = st
			}
			if best != nil && nc >= bestCost {
				continue
			}
			used[v], cur[k] = true, v
			dfs(k+1, st, nc)
			used[v] = false
		}
	}
	dfs(1, in.Early[in.Start], 0)
	if best == nil {
		return nil, 0, false
	}
	return best, bestCost, true
}
