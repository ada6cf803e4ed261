// Package bound proves how good a plan is, and says why a day cannot be
// planned when it cannot.
//
//   - Lower: lower bounds on the optimal objective. The assignment relaxation
//     (Hungarian method over the arcs that window reasoning leaves), and the
//     state-space relaxation of Christofides, Mingozzi and Toth (1981) with
//     time and ng-route memories (Baldacci, Mingozzi and Roberti 2011,
//     2012): paths of the right length that meet every window and never
//     return to a node of a small neighbourhood they still remember, with
//     Lagrangian node penalties fitted by deflected subgradient ascent.
//     For the completion objective, also a bound from the windows alone.
//   - Exact: the bounds, then a dynamic programme over (visited set, last
//     node, time) with (time, cost) dominance, window propagation,
//     precedences and the relaxation's cost-to-go as completion bound, run
//     with a growing cap on the labels per stage. A run that drops labels
//     still yields a valid bound (the least bound of what it dropped); a run
//     that drops nothing is exact and proves the optimum or infeasibility.
//   - Solve: the engine and Exact side by side within one budget, sharing
//     the best cost; a proof stops the engine.
//   - Explain and FeasibleExists: a minimal conflict set of visits, the least
//     widening of one window and a visit to drop, in a plain sentence.
//   - Enumerate: exhaustive search for small instances, the test oracle.
//
// Every value this package calls a bound is at most the optimum: arithmetic
// is exact (int64 in the instance's scale), every pruning rule is a
// relaxation, and merged or dropped labels only ever make a bound more
// optimistic. Preprocessing rules use shortest paths, so they hold when travel
// times break the triangle inequality. Routes found here are checked with
// solver.Evaluate before they are reported.
//
// Position pins and the fixed prefix (done visits) are constraints of the
// exact search and of the state-space relaxation; the assignment bound only
// sees the arcs they remove. Explain drops position pins from its sub-days,
// since positions shift when visits are removed, and says when the pins alone
// are the cause.
//
// The package never prints, never reads files and imports only the engine
// and the standard library. Long work takes a context.Context, checks it
// about every thousand steps, and under GOOS=js gives the worker's event
// loop a turn about every 20 ms (package solver/turn), so that a stop or a
// weight change gets in while it runs.
package bound
