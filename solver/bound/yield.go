package bound

import "visitline/solver/turn"

// yielder paces the bound's long loops: tick counts one step (one label
// expansion, one table row); under GOOS=js it gives the host a turn about
// every turn.Every of work (so that the worker's messages get in while the
// bound runs), and every thousand steps or so it returns true, so that the
// caller checks its context then.
type yielder struct {
	p turn.Pacer
}

func (y *yielder) tick() bool { return y.p.Step() }

// ticks counts a step worth k small ones (say, one per candidate it sorts).
func (y *yielder) ticks(k int) bool { return y.p.Add(k) }
