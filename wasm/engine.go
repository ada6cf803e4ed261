package main

import (
	"bytes"
	"context"
	"strconv"
	"strings"
	"sync"
	"time"

	"visitline/solver"
	"visitline/solver/app"
	"visitline/solver/bound"
	"visitline/solver/fmtlite"
	"visitline/solver/format"
	"visitline/solver/jsonlite"
	"visitline/solver/turn"
)

// planEvery is the least time between two plans posted to the page, for a
// day of n nodes: 50 ms, longer for large days, whose plans are large
// messages for the page to take in.
func planEvery(n int) time.Duration {
	return max(50*time.Millisecond, time.Duration(n)*time.Millisecond/2)
}

// maxBudget is the longest budget the page may ask for, in seconds.
const maxBudget = 3600

// Engine is the worker's state: the loaded instance and the running search.
// Handle must be called from one goroutine at a time; post may be called
// from the search's goroutine too.
type Engine struct {
	post func([]byte)

	mu  sync.Mutex
	d   *format.Dataset
	fd  *format.FleetDataset // a fleet day (then d is its sites, or nil)
	cur *run
	ids int

	// The load under way (its number and how to cancel it) and the
	// highest load number the page has cancelled.
	loading    int
	loadCancel context.CancelFunc
	cancelled  int
}

// readingEvery is the least time between two "reading" messages (a
// variable for the tests, which set it to 0: a report at every step).
var readingEvery = 100 * time.Millisecond

type run struct {
	id     int
	cancel context.CancelFunc
	mix    chan solver.Mix
	adopt  chan []int
	done   chan struct{}
	start  time.Time
}

// NewEngine makes an engine that sends its messages (JSON text) with post.
// While a search runs, the host gets its turns through package turn.
func NewEngine(post func([]byte)) *Engine {
	return &Engine{post: post}
}

// sendCheck, when set (by the tests), sees each message with what it was
// written as.
var sendCheck func(m outMessage, b []byte, err error)

func (e *Engine) send(msg outMessage) {
	b, err := encodeMessage(msg)
	if sendCheck != nil {
		sendCheck(msg, b, err)
	}
	if err != nil {
		// Only NaN or Inf could get here; say so rather than go quiet.
		b = append([]byte(`{"type":"failed","message":`), jsonlite.AppendString(nil, "cannot encode a message: "+err.Error(), false)...)
		b = append(b, '}')
	}
	e.post(b)
}

func (e *Engine) fail(format string, a ...any) {
	e.send(failedMsg{Type: "failed", Message: fmtlite.Sprintf(format, a...)})
}

// Ready announces the engine to the page.
func (e *Engine) Ready() {
	e.send(readyMsg{Type: "ready", Operators: solver.Operators})
}

// Handle acts on one message from the page (JSON text).
func (e *Engine) Handle(raw string) {
	e.handle(raw, nil)
}

// HandleLoad acts on a load message whose text and matrix come apart from
// the rest (raw, JSON text), so that a large paste is not decoded from
// JSON.
func (e *Engine) HandleLoad(raw, text, matrix string) {
	e.handle(raw, &[2]string{text, matrix})
}

// CancelLoad gives up the load numbered id, and every earlier one: the
// one reading stops at its next look at the clock, one still waiting is
// skipped. id 0 cancels whatever load is under way. It may be called from
// any goroutine, also while Handle is reading (the worker calls it from
// the event loop's callback, which runs while the load gives its turns).
func (e *Engine) CancelLoad(id int) {
	e.mu.Lock()
	defer e.mu.Unlock()
	if id == 0 {
		id = e.loading
	}
	if id > e.cancelled {
		e.cancelled = id
	}
	if e.loadCancel != nil && e.loading <= e.cancelled {
		e.loadCancel()
	}
}

func (e *Engine) handle(raw string, big *[2]string) {
	m, err := decodeInbound([]byte(raw))
	if err != nil {
		e.fail("message is not valid JSON: %s", format.JSONError(err))
		return
	}
	if big != nil {
		m.Text, m.Matrix = big[0], big[1]
	}
	switch m.Type {
	case "cancel_load":
		e.CancelLoad(m.LoadID)
	case "load":
		e.stopRun()
		e.load(m)
	case "start":
		e.stopRun()
		e.start(m)
	case "mix":
		e.changeMix(m)
	case "adopt":
		e.adoptPlan(m)
	case "stop":
		e.stopRun()
	case "export":
		e.export(m)
	default:
		e.fail("unknown message type %q; want load, cancel_load, start, mix, adopt, stop or export", m.Type)
	}
}

// beginLoad marks load id as under way and gives its context, or nil when
// the page has cancelled it already.
func (e *Engine) beginLoad(id int) context.Context {
	e.mu.Lock()
	defer e.mu.Unlock()
	if id != 0 && id <= e.cancelled {
		return nil
	}
	ctx, cancel := context.WithCancel(context.Background())
	e.loading, e.loadCancel = id, cancel
	return ctx
}

func (e *Engine) endLoad() {
	e.mu.Lock()
	defer e.mu.Unlock()
	if e.loadCancel != nil {
		e.loadCancel()
	}
	e.loading, e.loadCancel = 0, nil
}

// progress is the readers' progress callback of one load: it gives the
// host a turn when one is due (so that a cancel gets in), reports
// "reading" about every readingEvery, and ends the load when ctx is done.
func (e *Engine) progress(ctx context.Context, id int) func(done, total int64) error {
	last := time.Now() // a load over within readingEvery says nothing of it
	return func(done, total int64) error {
		turn.Due()
		if now := time.Now(); now.Sub(last) >= readingEvery {
			last = now
			e.send(readingMsg{Type: "reading", LoadID: id, Done: done, Total: total})
		}
		return ctx.Err()
	}
}

func (e *Engine) load(m inbound) {
	name := m.Name
	if name == "" {
		name = "pasted text"
	}
	ctx := e.beginLoad(m.LoadID)
	if ctx == nil {
		e.send(loadCancelledMsg{Type: "load_cancelled", LoadID: m.LoadID})
		return
	}
	defer e.endLoad()
	if strings.TrimSpace(m.Text) == "" {
		e.send(errorsMsg{Type: "errors", LoadID: m.LoadID, Errors: []InputError{{File: name, Line: 1, Message: "there is no data: paste a matrix or CSV, or choose a file",
			Text: name + ":1: there is no data: paste a matrix or CSV, or choose a file"}}})
		return
	}
	if app.FleetWanted(m.Text, m.Vehicles, m.Fleet) {
		e.loadFleet(m, name)
		return
	}
	var matrix *strings.Reader
	if strings.TrimSpace(m.Matrix) != "" {
		matrix = strings.NewReader(m.Matrix)
	}
	var d *format.Dataset
	var err error
	progress := e.progress(ctx, m.LoadID)
	if matrix != nil {
		d, err = app.LoadProgress(strings.NewReader(m.Text), matrix, name, m.MatrixName, m.Options, progress)
	} else {
		d, err = app.LoadProgress(strings.NewReader(m.Text), nil, name, m.MatrixName, m.Options, progress)
	}
	if ctx.Err() != nil {
		// Cancelled: whatever was loaded before stays, as if this load
		// had never been asked for.
		e.send(loadCancelledMsg{Type: "load_cancelled", LoadID: m.LoadID})
		return
	}
	if err != nil {
		e.mu.Lock()
		e.d, e.fd = nil, nil
		e.mu.Unlock()
		e.send(errorsMsg{Type: "errors", LoadID: m.LoadID, Errors: inputErrors(err, name)})
		return
	}
	s := SummariseDataset(d)
	if ctx.Err() != nil {
		e.send(loadCancelledMsg{Type: "load_cancelled", LoadID: m.LoadID})
		return
	}
	e.mu.Lock()
	e.d, e.fd = d, nil
	e.mu.Unlock()
	e.send(loadedMsg{Type: "loaded", LoadID: m.LoadID, Summary: s})
}

func (e *Engine) start(m inbound) {
	e.mu.Lock()
	d, fd := e.d, e.fd
	e.mu.Unlock()
	if fd != nil {
		e.startFleet(m, fd)
		return
	}
	if d == nil {
		e.fail("no data is loaded: load a file, a paste or an example first")
		return
	}
	o := m.RunOptions
	if !(o.Budget > 0 && o.Budget <= maxBudget) && !(o.Budget == 0 && o.Iterations > 0) {
		e.fail("budget %s s: want seconds above 0 and at most %d", strconv.FormatFloat(o.Budget, 'g', -1, 64), maxBudget)
		return
	}
	if o.Workers > 1 {
		o.Workers = 1 // one thread per worker: the page runs more workers instead
	}
	switch m.Role {
	case "", "search", "bound":
	default:
		e.fail("role %q: want search, bound or nothing (both)", m.Role)
		return
	}
	if m.Role == "search" {
		o.NoBound = true
		o.Seed += int64(m.Worker) * 7919
	}
	asked := o.Budget
	o.Budget -= waited(m.ClickedAt, o.Budget)
	s, err := o.Settings()
	if err != nil {
		e.fail("%v", err)
		return
	}
	ctx, cancel := context.WithCancel(context.Background())
	e.mu.Lock()
	e.ids++
	r := &run{id: e.ids, cancel: cancel, mix: make(chan solver.Mix, 1), adopt: make(chan []int, 4), done: make(chan struct{}), start: time.Now()}
	e.cur = r
	e.mu.Unlock()
	e.send(startedMsg{Type: "started", Run: r.id, Role: m.Role, Budget: asked, Seed: o.Seed, Mix: mixOut(s.Mix), Fixed: o.Fixed, Objective: s.Objective.String()})
	if m.Role == "bound" {
		go e.boundSide(ctx, r, d, s)
		return
	}
	go e.search(ctx, r, d, o)
}

// waited is how many seconds a start message of a budget of budget
// seconds waited between the click (clickedAt, ms since the epoch) and
// now: what comes off the budget. At most half the budget, and 0 for no
// stamp or a clock that seems wrong.
func waited(clickedAt, budget float64) float64 {
	if clickedAt <= 0 || budget <= 0 {
		return 0
	}
	w := time.Since(time.UnixMilli(int64(clickedAt))).Seconds()
	if w <= 0 || w > budget/2 {
		return 0
	}
	return w
}

// mixOut gives the weights the search starts from, for display.
func mixOut(m solver.Mix) map[string]float64 {
	out := map[string]float64{}
	for _, o := range solver.Operators {
		if m == nil {
			out[o] = 1
		} else {
			out[o] = m[o]
		}
	}
	return out
}

// plans coalesces the plans of a run so that at most one is posted every
// planEvery; it is safe for the engine's and the exact search's goroutines.
type plans struct {
	e        *Engine
	r        *run
	d        *format.Dataset
	obj      solver.Objective
	every    time.Duration
	mu       sync.Mutex
	pending  *solver.Plan
	lastPost time.Time
	iters    int
	improved int
}

// exportsUpTo is the largest day whose plan messages carry the CSV and
// JSON exports; above it none does (the page asks for the CSV export with
// an "export" message), since writing them takes the worker a tenth of a
// second or more per plan.
const exportsUpTo = 300

func (p *plans) post(pl solver.Plan, res solver.Result, j *format.PlanReport) {
	p.postWith(pl, res, j, p.d.Instance.N <= exportsUpTo)
}

func (p *plans) postWith(pl solver.Plan, res solver.Result, j *format.PlanReport, exports bool) {
	if j == nil {
		pj := p.d.PlanReport(p.obj, pl, &res)
		j = &pj
	}
	if !exports {
		p.e.send(planMsg{Type: "plan", Run: p.r.id, Plan: *j})
		return
	}
	var csv, js bytes.Buffer
	if err := format.WriteCSV(&csv, p.d.Instance, *j); err != nil {
		p.e.fail("cannot write the plan as CSV: %v", err)
	}
	if err := format.WriteJSON(&js, *j); err != nil {
		p.e.fail("cannot write the plan as JSON: %v", err)
	}
	// The plan is encoded once: the JSON export is the plan object too.
	p.e.post(planMessage(p.r.id, js.Bytes(), csv.Bytes()))
}

// planMessage is the plan message with its exports, written by hand:
// {"type":"plan","run":RUN,"plan":JSON,"csv":"CSV","json":"JSON"}, the JSON
// export (our own encoder's output, so valid JSON) standing as the plan
// object as it is. At 1,000 sites encoding/json took the worker tens of
// milliseconds more for the same message (it checks and compacts the raw
// plan and escapes both texts through reflection).
func planMessage(run int, js, csv []byte) []byte {
	b := make([]byte, 0, 64+len(js)*2+len(csv)+len(csv)/8)
	b = append(b, `{"type":"plan","run":`...)
	b = strconv.AppendInt(b, int64(run), 10)
	b = append(b, `,"plan":`...)
	b = append(b, bytes.TrimSpace(js)...)
	b = append(b, `,"csv":`...)
	b = jsonlite.AppendString(b, csv, false)
	b = append(b, `,"json":`...)
	b = jsonlite.AppendString(b, js, false)
	return append(b, '}')
}

// flush posts the pending plan. Call with p.mu held.
func (p *plans) flush() {
	if p.pending == nil {
		return
	}
	pl := *p.pending
	p.pending = nil
	p.lastPost = time.Now()
	p.iters = max(p.iters, pl.Iteration)
	p.post(pl, solver.Result{Iterations: p.iters, Elapsed: time.Since(p.r.start), Improvements: p.improved}, nil)
}

func (p *plans) improve(pl solver.Plan) {
	p.mu.Lock()
	defer p.mu.Unlock()
	p.improved++
	p.pending = &pl
	if time.Since(p.lastPost) >= p.every {
		p.flush()
	}
}

// search runs the search (and, for role "", the bound beside it) through
// the application layer, as `visitline solve` does.
func (e *Engine) search(ctx context.Context, r *run, d *format.Dataset, o app.RunOptions) {
	in := d.Instance
	defer close(r.done)
	defer r.cancel()
	obj, _ := solver.ParseObjective(o.Objective)
	pl := &plans{e: e, r: r, d: d, obj: obj, every: planEvery(in.N)}
	h := app.Hooks{MixUpdates: r.mix, Adopt: r.adopt, ProgressEvery: 50 * time.Millisecond, OnImprove: pl.improve,
		OnProgress: func(p solver.Progress) {
			pl.mu.Lock()
			defer pl.mu.Unlock()
			pl.flush()
			pl.iters = p.Iteration
			e.send(progressMsg{Type: "progress", Run: r.id, Iterations: p.Iteration, Elapsed: p.Elapsed.Seconds(),
				BestCost: in.InputUnits(p.BestCost), Feasible: p.Feasible, Weights: p.Weights})
		},
		OnExplaining: func() {
			pl.mu.Lock()
			defer pl.mu.Unlock()
			e.send(progressMsg{Type: "progress", Run: r.id, Iterations: pl.iters, Elapsed: time.Since(r.start).Seconds(), Explaining: true})
		}}
	out, err := app.Run(ctx, d, o, h)
	pl.mu.Lock()
	defer pl.mu.Unlock()
	if err != nil {
		pl.flush()
		e.send(finishedMsg{Type: "finished", Run: r.id, Why: solver.StopError, Message: err.Error(),
			Iterations: pl.iters, Elapsed: time.Since(r.start).Seconds(), Improvements: pl.improved})
		return
	}
	pl.pending = nil
	res := out.Result
	fin := finishedMsg{Type: "finished", Run: r.id, Why: out.Why, Note: out.Note, Iterations: res.Iterations,
		Elapsed: time.Since(r.start).Seconds(), Improvements: max(res.Improvements, pl.improved), Feasible: res.Best.Feasible}
	if res.Best.Route != nil {
		// The last word on the best plan, as `solve --format json` has it.
		// Over exportsUpTo nodes without the exports, as the plans before
		// it: the page writes the JSON export from the plan object and asks
		// for the CSV one when it is wanted (writing them took the worker
		// most of the time between a stop and "finished" at 2,000 sites).
		pl.postWith(res.Best, res, &out.Plan, in.N <= exportsUpTo)
		c := in.InputUnits(res.Best.Cost)
		fin.BestCost = &c
	}
	e.send(fin)
}

// boundSide is the bound worker: the lower bound and the exact search,
// pruned by the plans the search workers find (sent with "adopt"), and
// for a day that cannot be met, the explanation.
func (e *Engine) boundSide(ctx context.Context, r *run, d *format.Dataset, s solver.Settings) {
	in := d.Instance
	defer close(r.done)
	defer r.cancel()
	bctx := ctx
	if s.Budget > 0 {
		var cancel context.CancelFunc
		bctx, cancel = context.WithTimeout(ctx, s.Budget-time.Since(r.start))
		defer cancel()
	}
	var mu sync.Mutex
	incCost, incOK := int64(0), false
	take := func(route []int) {
		if solver.CheckRoute(in, route) != nil {
			return
		}
		sch := solver.Evaluate(in, route)
		if c := sch.Cost(s.Objective); sch.Feasible && (!incOK || c < incCost) {
			mu.Lock()
			incCost, incOK = c, true
			mu.Unlock()
		}
	}
	// Adopted plans arrive on r.adopt while the bound runs, and while the
	// explanation runs: a feasible one ends the explanation (the day can
	// be met after all; a search worker's first plan of a large day may
	// come after the bound's time).
	var explaining context.CancelFunc
	stopTaking := make(chan struct{})
	taken := make(chan struct{})
	go func() {
		defer close(taken)
		for {
			select {
			case route := <-r.adopt:
				take(route)
				mu.Lock()
				if incOK && explaining != nil {
					explaining()
				}
				mu.Unlock()
			case <-stopTaking:
				return
			}
		}
	}()
	b := bound.Exact(bctx, in, bound.Options{Objective: s.Objective, Incumbent: func() (int64, bool) {
		mu.Lock()
		defer mu.Unlock()
		return incCost, incOK
	}})
	for len(r.adopt) > 0 {
		take(<-r.adopt)
	}
	why := solver.StopBudget
	if ctx.Err() != nil {
		why = solver.StopStopped
	}
	mu.Lock()
	if b.Route != nil && (!incOK || b.Cost < incCost) {
		sch := solver.Evaluate(in, b.Route)
		p := solver.Plan{Route: append([]int(nil), b.Route...), Schedule: sch, Cost: sch.Cost(s.Objective), Feasible: sch.Feasible,
			Elapsed: time.Since(r.start), Operator: "exact"}
		mu.Unlock()
		(&plans{e: e, r: r, d: d, obj: s.Objective}).postWith(p, solver.Result{Best: p, Elapsed: p.Elapsed, Improvements: 1}, nil, true)
		mu.Lock()
		if !incOK || p.Cost < incCost {
			incCost, incOK = p.Cost, p.Feasible
		}
	}
	msg := boundMsg{Type: "bound", Run: r.id, Infeasible: b.Infeasible}
	if b.Valid {
		lb := in.InputUnits(b.Value)
		msg.LowerBound, msg.Method = &lb, b.Method
		if incOK && b.Value >= incCost {
			msg.ProvenOptimal = true
			why = solver.StopComplete
		}
	}
	explain := !incOK && ctx.Err() == nil && (b.Infeasible || s.Budget > 0)
	limit := app.ExplainLimit(s.Budget)
	if s.Budget > 0 {
		limit = app.ExplainTime(s.Budget, time.Since(r.start))
	}
	var ectx context.Context
	ecancel := context.CancelFunc(func() {})
	if explain && limit > 0 {
		ectx, ecancel = context.WithCancel(ctx)
		explaining = ecancel
	}
	mu.Unlock()
	defer ecancel()
	if ectx != nil {
		// No plan meets every window (proven, or none found in the
		// budget): say why, within what is left of the budget's leeway.
		e.send(progressMsg{Type: "progress", Run: r.id, Elapsed: time.Since(r.start).Seconds(), Explaining: true})
		var j format.PlanReport
		app.Explain(ectx, &j, d, limit)
		mu.Lock()
		if !incOK {
			msg.Conflict, msg.Reason = j.Conflict, j.Reason
		}
		explaining = nil
		mu.Unlock()
	}
	close(stopTaking)
	<-taken
	e.send(msg)
	e.send(finishedMsg{Type: "finished", Run: r.id, Why: why, Elapsed: time.Since(r.start).Seconds()})
}

func (e *Engine) changeMix(m inbound) {
	mix, err := checkMix(m.Mix)
	if err != nil || mix == nil {
		if err == nil {
			err = fmtlite.Errorf("empty mix: give a weight to at least one operator")
		}
		e.fail("mix: %v", err)
		return
	}
	e.mu.Lock()
	r := e.cur
	e.mu.Unlock()
	running := false
	elapsed := 0.0
	if r != nil {
		select {
		case <-r.done:
		default:
			// Keep only the newest mix: drop one the search has not taken yet.
			select {
			case <-r.mix:
			default:
			}
			r.mix <- mix
			running = true
			elapsed = time.Since(r.start).Seconds()
		}
	}
	id := 0
	if r != nil {
		id = r.id
	}
	e.send(mixMsg{Type: "mix", Run: id, Mix: mixOut(mix), Running: running, Elapsed: elapsed})
}

// adoptPlan hands a route found by another worker to the running search
// (or the bound), keeping only the newest few.
func (e *Engine) adoptPlan(m inbound) {
	e.mu.Lock()
	r := e.cur
	e.mu.Unlock()
	if r == nil || len(m.Route) == 0 {
		return
	}
	select {
	case <-r.done:
		return
	default:
	}
	for {
		select {
		case r.adopt <- m.Route:
			return
		default:
			select {
			case <-r.adopt:
			default:
			}
		}
	}
}

// stopRun cancels the running search and waits until it has said
// "finished", so that messages of two runs never interleave.
func (e *Engine) stopRun() {
	e.mu.Lock()
	r := e.cur
	e.cur = nil
	e.mu.Unlock()
	if r == nil {
		return
	}
	r.cancel()
	<-r.done
}

// export writes a plan of the loaded data in a format that needs more than
// the plan message carries: today the calendar, which needs the day.
func (e *Engine) export(m inbound) {
	e.mu.Lock()
	d := e.d
	e.mu.Unlock()
	reply := func(text, problem string) {
		e.send(exportMsg{Type: "export", Format: m.Format, Text: text, Error: problem})
	}
	if d == nil {
		reply("", "no data is loaded")
		return
	}
	if m.Format != "ics" && m.Format != "csv" {
		reply("", fmtlite.Sprintf("format %q: want ics or csv", m.Format))
		return
	}
	if fd := e.fleetDay(); fd != nil {
		if m.Format == "csv" {
			reply("", "a team's CSV comes with its plans")
			return
		}
		text, err := fleetICS(fd, m)
		if err != nil {
			reply("", err.Error())
			return
		}
		reply(text, "")
		return
	}
	in := d.Instance
	if err := solver.CheckRoute(in, m.Route); err != nil {
		reply("", "the plan does not fit the loaded data: "+err.Error())
		return
	}
	var day time.Time
	if m.Date != "" {
		var err error
		if day, err = time.Parse("2006-01-02", m.Date); err != nil {
			reply("", fmtlite.Sprintf("day %q: want YYYY-MM-DD", m.Date))
			return
		}
	}
	obj, _ := solver.ParseObjective(m.Objective)
	sch := solver.Evaluate(in, m.Route)
	p := solver.Plan{Route: m.Route, Schedule: sch, Cost: sch.Cost(obj), Feasible: sch.Feasible}
	var b bytes.Buffer
	if m.Format == "csv" {
		// The CSV export of a large day's plan, written when asked for
		// rather than with every plan (it took the worker a third of a
		// second at 5,000 sites between a Stop and the run's end).
		if err := format.WriteCSV(&b, in, d.PlanReport(obj, p, nil)); err != nil {
			reply("", err.Error())
			return
		}
		reply(b.String(), "")
		return
	}
	if err := format.WriteICS(&b, d, p, format.ICSOptions{Date: day, Stamp: time.Now()}); err != nil {
		reply("", err.Error())
		return
	}
	reply(b.String(), "")
}
