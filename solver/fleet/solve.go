package fleet

import (
	"context"
	"math"
	"math/rand"
	"sort"
	"time"

	"visitline/solver/fmtlite"
)

type scratch struct {
	served []int
	start  []int64
}

// repair operators
const (
	repRandomOrder = iota
	repGreedy
	repRegret2
	repRegret3
	numReps
)

// adaptive keeps the operator weights of Ropke and Pisinger (2006):
// scores 33 for a new best, 9 for a better current plan, 13 for an
// accepted worse one; weights updated every 100 uses with reaction 0.1.
type adaptive struct {
	w, score []float64
	uses     []int
}

func newAdaptive(n int) *adaptive {
	a := &adaptive{w: make([]float64, n), score: make([]float64, n), uses: make([]int, n)}
	for i := range a.w {
		a.w[i] = 1
	}
	return a
}

func (a *adaptive) pick(rng *rand.Rand) int {
	var sum float64
	for _, w := range a.w {
		sum += w
	}
	x := rng.Float64() * sum
	for i, w := range a.w {
		x -= w
		if x < 0 {
			return i
		}
	}
	return len(a.w) - 1
}

func (a *adaptive) reward(i int, s float64, segment int) {
	a.score[i] += s
	a.uses[i]++
	if segment%100 == 0 {
		for k := range a.w {
			if a.uses[k] > 0 {
				a.w[k] = 0.9*a.w[k] + 0.1*a.score[k]/float64(a.uses[k])
			}
			a.w[k] = max(a.w[k], 0.05)
			a.score[k], a.uses[k] = 0, 0
		}
	}
}

// Solve plans the fleet's day by large neighbourhood search across the
// routes: removals (random, related, worst, whole routes, stretches of
// routes) and regret insertion anywhere (Ropke and Pisinger 2006; Pisinger
// and Ropke 2007), polished by relocate, exchange and 2-opt* moves judged in
// constant time with segment summaries (Vidal et al. 2013), accepted by
// simulated annealing. With MinimizeVehicles, a route-minimisation phase
// first removes a short route and searches with one vehicle fewer until
// its visits fit (Pisinger and Ropke 2007). Every plan is feasible: visits
// that fit nowhere are unserved. The result is checked from scratch by
// Evaluate.
func Solve(ctx context.Context, p *Problem, set Settings) (Result, error) {
	if err := p.Validate(); err != nil {
		return Result{}, err
	}
	now := set.Now
	if now == nil {
		now = time.Now
	}
	t0 := now()
	budget := set.Budget
	if budget <= 0 && set.Iterations <= 0 {
		budget = time.Second
	}
	share := set.RouteMinShare
	if share <= 0 || share >= 1 {
		share = 0.6
	}
	m := newModel(p, set.Objective, set.MinimizeVehicles)
	rng := rand.New(rand.NewSource(set.Seed))
	sc := &scratch{start: make([]int64, m.n)}
	var res Result
	elapsed := func() time.Duration { return now().Sub(t0) }
	frac := func(it int) float64 {
		f := 0.0
		if set.Iterations > 0 {
			f = float64(it) / float64(set.Iterations)
		}
		if budget > 0 {
			f = max(f, float64(elapsed())/float64(budget))
		}
		return min(f, 1)
	}

	cur := newState(m)
	cur.repair(rng, 3, 0)
	cur.polish(true)
	best := cur.clone()
	bestV := best.value()
	record := func(it int, phase string) {
		pr := Progress{Value: bestV, Iteration: it, Elapsed: elapsed(), Phase: phase}
		res.Trace = append(res.Trace, pr)
		res.ToBest = pr.Elapsed
		if set.OnImprove != nil {
			pr.Plan = func() Plan { return best.plan() }
			set.OnImprove(pr)
		}
	}
	record(0, "construction")

	lbVeh := vehicleBound(m)
	dest, reps := newAdaptive(numOps), newAdaptive(numReps)
	cand := cur.clone()
	curV := cur.value()
	phase := "cost"
	if set.MinimizeVehicles {
		phase = "vehicles"
	}
	var t0Temp float64
	setTemp := func() {
		t0Temp = tempFactor * max(float64(curV.Cost), 1) / math.Ln2
	}
	setTemp()
	phaseStart, phaseEnd := 0.0, share
	if phase == "cost" {
		phaseEnd = 1
	}
	startCost := func(f float64) {
		phase = "cost"
		cur.copyFrom(best)
		curV = cur.value()
		setTemp()
		cur.maxVeh = len(m.veh)
		if set.MinimizeVehicles {
			if bestV.Unserved == 0 {
				// Everything is served: the vehicles of the best plan are
				// the cap, and fewer are welcome.
				cur.maxVeh = best.used
				m.vehPenalty = 0
			} else {
				// Serving comes before vehicles, so there is no cap, and
				// no price on a vehicle in the search either: it may pass
				// through plans with more vehicles (the best plan is still
				// chosen with vehicles before cost).
				m.vehPenalty = 0
			}
			curV = cur.value()
		}
		phaseStart, phaseEnd = f, 1
	}
	sinceBest := 0
	it := 0
	for ; ; it++ {
		if set.Iterations > 0 && it >= set.Iterations {
			break
		}
		if ctx.Err() != nil {
			break
		}
		f := frac(it)
		if budget > 0 && elapsed() >= budget {
			break
		}
		if phase == "vehicles" {
			if f >= phaseEnd || bestV.Unserved == 0 && best.used <= lbVeh {
				// The cost phase starts from the best plan with its
				// vehicles as the cap.
				startCost(f)
			} else if curV.Unserved <= bestV.Unserved && cur.used > 1 && cur.used >= best.used {
				// Start an attempt with one vehicle fewer: free a short
				// route.
				cur.maxVeh = best.used - 1
				cur.remove(cur.routeRemovalShortest(rng))
				cur.repair(rng, 3, 0)
				curV = cur.value()
			}
		}
		pf := 0.0
		if phaseEnd > phaseStart {
			pf = (f - phaseStart) / (phaseEnd - phaseStart)
		}
		temp := t0Temp * math.Pow(0.002, min(max(pf, 0), 1))

		cand.copyFrom(cur)
		op := dest.pick(rng)
		rp := reps.pick(rng)
		n := len(m.visits)
		qmax := min(n, max(10, min(40, int(0.35*float64(n)))))
		qmin := min(qmax, max(1, min(4, n/4)))
		q := qmin + rng.Intn(qmax-qmin+1)
		cand.destroy(rng, op, q, sc)
		noise := 0.0
		switch x := rng.Intn(10); {
		case x >= 8:
			noise = 0.15
		case x >= 5:
			noise = 0.025
		}
		cand.repair(rng, rp, noise)
		candV := cand.value()
		if candV.Unserved <= bestV.Unserved && cand.score(candV) < cand.score(bestV)+float64(bestV.Cost)*0.02 {
			cand.polish(false)
			candV = cand.value()
			if candV.Better(bestV, set.MinimizeVehicles) {
				// A new best plan: the deep polish, with
				// cross-exchange, on what the shallow one left.
				cand.markAllDirty()
				cand.polish(true)
				candV = cand.value()
			}
		}
		var reward float64
		cs, ns := cur.score(curV), cand.score(candV)
		accept := ns < cs || temp > 0 && rng.Float64() < math.Exp(-(ns-cs)/temp)
		if candV.Better(bestV, set.MinimizeVehicles) {
			best.copyFrom(cand)
			bestV = candV
			record(it+1, phase)
			reward = 33
			sinceBest = 0
		} else if accept && ns < cs {
			reward = 9
		} else if accept {
			reward = 13
		}
		sinceBest++
		if accept {
			cur, cand = cand, cur
			curV = candV
		}
		if phase == "cost" && sinceBest > 5000 && sinceBest%5000 == 1 {
			cur.copyFrom(best)
			curV = bestV
		}
		dest.reward(op, reward, it+1)
		reps.reward(rp, reward, it+1)
	}
	res.Best = best.plan()
	res.Iterations = it
	res.Elapsed = elapsed()
	rep, err := Evaluate(p, res.Best)
	if err != nil {
		return res, fmtlite.Errorf("internal error: the engine's plan is not a plan of the problem: %w", err)
	}
	if !rep.Feasible {
		return res, fmtlite.Errorf("internal error: the engine's plan breaks %v", rep.Problems)
	}
	res.Report = rep
	res.Value = rep.Value(set.Objective)
	if res.Value != bestV {
		return res, fmtlite.Errorf("internal error: the engine counted %s, the evaluator %s", bestV.text(), res.Value.text())
	}
	res.Reasons = Reasons(p, rep.Unserved)
	return res, nil
}

// routeRemovalShortest frees the route with the fewest visits (ties at
// random), for the route-minimisation attempts.
func (s *state) routeRemovalShortest(rng *rand.Rand) []int {
	var rs []int
	for r, rt := range s.routes {
		if len(rt) > 0 {
			rs = append(rs, r)
		}
	}
	sort.Slice(rs, func(a, b int) bool {
		la, lb := len(s.routes[rs[a]]), len(s.routes[rs[b]])
		if la != lb {
			return la < lb
		}
		return rs[a] < rs[b]
	})
	x := 0
	if len(rs) > 1 && rng.Intn(3) == 0 {
		x = 1
	}
	return append([]int(nil), s.routes[rs[x]]...)
}

// vehicleBound is a lower bound on the vehicles a plan serving every visit
// needs: the fewest of the largest capacities that hold the total demand.
func vehicleBound(m *model) int {
	var total int64
	for _, v := range m.visits {
		total += m.dem[v]
	}
	caps := make([]int64, len(m.veh))
	for r, v := range m.veh {
		caps[r] = v.cap
	}
	sort.Slice(caps, func(a, b int) bool { return caps[a] > caps[b] })
	k := 0
	for total > 0 && k < len(caps) {
		total -= caps[k]
		k++
	}
	return max(k, min(1, len(m.visits)))
}

// tempFactor sets the starting temperature: a plan this share worse than
// the first is accepted with probability one half.
var tempFactor = 0.05
