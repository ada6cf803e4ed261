// Package gen makes invented sequencing instances of any size for
// measuring the engine: sites scattered over a plane, asymmetric travel
// times, service times and time windows of a chosen tightness. Every
// instance is feasible by construction: the windows are laid around the
// schedule of a reference route, which Generate returns beside it.
//
// The instances are synthetic and seeded: the same Options give the same
// instance on every platform. They are never published data, and they
// must never be used as demo data either (they describe no real day).
package gen

import (
	"bufio"
	"fmt"
	"io"
	"math"
	"math/rand/v2"
	"strconv"
	"strings"

	"visitline/solver"
)

// Tightness says how wide the time windows are around the reference
// schedule.
type Tightness int

const (
	// None opens every window over the whole horizon.
	None Tightness = iota
	// Wide windows are 240 to 480 minutes.
	Wide
	// Medium windows are 90 to 180 minutes.
	Medium
	// Tight windows are 30 to 60 minutes.
	Tight
)

// Levels lists every tightness, loosest first.
var Levels = []Tightness{None, Wide, Medium, Tight}

func (t Tightness) String() string {
	switch t {
	case None:
		return "none"
	case Wide:
		return "wide"
	case Medium:
		return "medium"
	case Tight:
		return "tight"
	}
	return fmt.Sprintf("Tightness(%d)", int(t))
}

// ParseTightness reads none, wide, medium or tight.
func ParseTightness(s string) (Tightness, error) {
	for _, t := range Levels {
		if t.String() == strings.TrimSpace(s) {
			return t, nil
		}
	}
	return 0, fmt.Errorf("tightness %q: want none, wide, medium or tight", s)
}

// widths is the range of window widths in minutes.
func (t Tightness) widths() (lo, hi int64) {
	switch t {
	case Wide:
		return 240, 480
	case Medium:
		return 90, 180
	case Tight:
		return 30, 60
	}
	return 0, 0
}

// MaxSites bounds N so that the matrix (N² int64) stays under 1 GiB.
const MaxSites = 10000

// Options describe one instance. The zero Tightness is None.
type Options struct {
	// N is the number of nodes, the depot (node 0) included: at least 2.
	N         int
	Tightness Tightness
	Seed      int64
	// ServiceMax is the longest service time in minutes (service times are
	// drawn from 1..ServiceMax and folded into the travel times leaving a
	// site, as the benchmark matrix format expects). 0 means 10; a negative
	// value means no service.
	ServiceMax int64
}

// Generated is an instance with the route its windows were built around.
type Generated struct {
	Instance *solver.Instance
	// Reference is a feasible route (node 0 first; the return is implied).
	Reference []int
}

// Generate builds the instance described by o.
//
// Sites are uniform in a square whose side grows with √N, so that the
// travel time between neighbours stays about the same at every size (a
// side of 5√N minutes: 50 for 100 sites). Travel from i to j is the
// Euclidean distance, plus a climb term max(0, h_j − h_i) from a smooth
// height field (uphill is slower), plus, for one ordered pair in ten, a
// one-way detour of a third of the distance; rounded to whole minutes, and
// the service time at i added. The matrix is asymmetric both ways.
//
// The reference route is the nearest-neighbour tour from the depot; its
// schedule (no waiting) gives each site an arrival time a, and the site's
// window of width w (drawn from the tightness's range) is placed with a at
// a uniformly drawn point inside it. The depot's window closes at the
// reference's return plus the widest window. With no windows, every
// window (the depot's too) ends so late that any order is on time.
func Generate(o Options) (*Generated, error) {
	n := o.N
	if n < 2 {
		return nil, fmt.Errorf("n = %d: want at least 2 nodes (the depot and one site)", n)
	}
	if n > MaxSites {
		return nil, fmt.Errorf("n = %d: want at most %d nodes", n, MaxSites)
	}
	if o.Tightness < None || o.Tightness > Tight {
		return nil, fmt.Errorf("tightness %d: want none, wide, medium or tight", int(o.Tightness))
	}
	smax := o.ServiceMax
	if smax == 0 {
		smax = 10
	}
	rng := rand.New(rand.NewPCG(uint64(o.Seed), 0x7669736974))
	side := 5 * math.Sqrt(float64(n))
	xs, ys := make([]float64, n), make([]float64, n)
	xs[0], ys[0] = side/2, side/2
	for i := 1; i < n; i++ {
		xs[i], ys[i] = rng.Float64()*side, rng.Float64()*side
	}
	// Height field: a few smooth bumps; climbing 1 unit of height costs a
	// minute.
	type bump struct{ x, y, r, h float64 }
	bumps := make([]bump, 4)
	for k := range bumps {
		bumps[k] = bump{rng.Float64() * side, rng.Float64() * side, side * (0.15 + 0.2*rng.Float64()), 2 + 6*rng.Float64()}
	}
	height := make([]float64, n)
	for i := range height {
		for _, b := range bumps {
			d2 := ((xs[i]-b.x)*(xs[i]-b.x) + (ys[i]-b.y)*(ys[i]-b.y)) / (b.r * b.r)
			height[i] += b.h * math.Exp(-d2)
		}
	}
	service := make([]int64, n)
	if smax > 0 {
		for i := 1; i < n; i++ {
			service[i] = 1 + rng.Int64N(smax)
		}
	}
	travel := make([]int64, n*n)
	for i := 0; i < n; i++ {
		for j := 0; j < n; j++ {
			if i == j {
				continue
			}
			d := math.Hypot(xs[i]-xs[j], ys[i]-ys[j])
			t := d + math.Max(0, height[j]-height[i])
			if rng.IntN(10) == 0 {
				t += d / 3
			}
			travel[i*n+j] = int64(math.Round(t)) + service[i]
		}
	}
	ref := nearestNeighbour(n, travel)
	early, late := make([]int64, n), make([]int64, n)
	var t int64
	prev := 0
	lo, hi := o.Tightness.widths()
	for _, v := range ref[1:] {
		t += travel[prev*n+v]
		prev = v
		if o.Tightness == None {
			continue
		}
		w := lo + rng.Int64N(hi-lo+1)
		e := t - rng.Int64N(w+1)
		if e < 0 {
			e = 0
		}
		early[v], late[v] = e, e+w
	}
	ret := t + travel[prev*n]
	horizon := ret + hi
	if o.Tightness == None {
		// So late that every order is on time: the sum of the longest arc
		// out of each node bounds the return of any tour.
		horizon = 0
		for i := 0; i < n; i++ {
			var m int64
			for _, tij := range travel[i*n : i*n+n] {
				m = max(m, tij)
			}
			horizon += m
		}
		for v := 1; v < n; v++ {
			late[v] = horizon
		}
	}
	late[0] = horizon
	in := &solver.Instance{
		Name:    fmt.Sprintf("gen-n%d-%s-s%d", n, o.Tightness, o.Seed),
		N:       n,
		Shape:   solver.Closed,
		Travel:  travel,
		Service: make([]int64, n), // folded into Travel
		Early:   early,
		Late:    late,
		Scale:   1,
	}
	if err := in.Validate(); err != nil {
		return nil, fmt.Errorf("generated instance is invalid: %w", err)
	}
	return &Generated{Instance: in, Reference: ref}, nil
}

// nearestNeighbour is the greedy tour from the depot: O(n²).
func nearestNeighbour(n int, travel []int64) []int {
	route := make([]int, 0, n)
	seen := make([]bool, n)
	cur := 0
	seen[0] = true
	route = append(route, 0)
	for len(route) < n {
		best, bestT := -1, int64(math.MaxInt64)
		row := travel[cur*n : cur*n+n]
		for j, tj := range row {
			if !seen[j] && tj < bestT {
				best, bestT = j, tj
			}
		}
		seen[best] = true
		route = append(route, best)
		cur = best
	}
	return route
}

// WriteBenchmark writes in as the plain matrix format that
// format.ReadBenchmark reads: the node count, n rows of n travel times
// (service folded in), n rows "earliest latest". Only instances with
// Scale 1, a closed tour from node 0 and no separate service times can be
// written so.
func WriteBenchmark(w io.Writer, in *solver.Instance, comment string) error {
	if in.Scale != 1 || in.Shape != solver.Closed || in.Start != 0 {
		return fmt.Errorf("only whole-unit closed tours from node 0 fit the matrix format")
	}
	for _, s := range in.Service {
		if s != 0 {
			return fmt.Errorf("service times must be folded into the travel times for the matrix format")
		}
	}
	bw := bufio.NewWriterSize(w, 1<<16)
	for _, line := range strings.Split(strings.TrimSpace(comment), "\n") {
		if line != "" {
			fmt.Fprintf(bw, "# %s\n", line)
		}
	}
	n := in.N
	fmt.Fprintf(bw, "%d\n", n)
	buf := make([]byte, 0, 16)
	for i := 0; i < n; i++ {
		for j := 0; j < n; j++ {
			if j > 0 {
				bw.WriteByte(' ')
			}
			buf = strconv.AppendInt(buf[:0], in.Travel[i*n+j], 10)
			bw.Write(buf)
		}
		bw.WriteByte('\n')
	}
	for i := 0; i < n; i++ {
		fmt.Fprintf(bw, "%d %d\n", in.Early[i], in.Late[i])
	}
	return bw.Flush()
}
