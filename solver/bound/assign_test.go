package bound

import (
	"context"
	"math/rand"
	"testing"

	"github.com/stretchr/testify/require"

	"visitline/solver"
)

// The assignment bound works out rows on demand above assignFull nodes:
// the same value, potentials and verdict as with the whole matrix, on every
// shape and objective.
func TestAssignmentRowsOnDemandSameBound(t *testing.T) {
	rng := rand.New(rand.NewSource(4))
	old := assignFull
	defer func() { assignFull = old }()
	for trial := 0; trial < 30; trial++ {
		shape := []solver.Shape{solver.Closed, solver.OpenFree, solver.OpenFixed}[trial%3]
		obj := []solver.Objective{solver.TravelTime, solver.CompletionTime}[trial/3%2]
		in := randomInstance(rng, 8+rng.Intn(40), int64(20+rng.Intn(200)), shape)
		p := newProb(in)
		assignFull = old
		v1, pot1, ok1, inf1 := assignmentBound(context.Background(), p, obj, &yielder{})
		assignFull = 2
		v2, pot2, ok2, inf2 := assignmentBound(context.Background(), p, obj, &yielder{})
		require.Equal(t, ok1, ok2, "trial %d", trial)
		require.Equal(t, inf1, inf2, "trial %d", trial)
		require.Equal(t, v1, v2, "trial %d", trial)
		require.Equal(t, pot1, pot2, "trial %d", trial)
	}
}
