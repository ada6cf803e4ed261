package benchdata

import (
	"strings"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"
)

func TestReadRowsWithAndWithoutBounds(t *testing.T) {
	in := "family,instance,best_known,lower_bound,bound_from\n" +
		"Dumas,n20w20.001.txt,378,378,Dumas et al. (1995)\n" +
		"OhlmannThomas,n150w120.001.txt,734,,\n" +
		"Mine,a.txt,12.5\n"
	ks, err := Read(strings.NewReader(in), "bk.csv")
	require.NoError(t, err)
	require.Len(t, ks, 3)
	assert.Equal(t, Known{Family: "Dumas", Instance: "n20w20.001.txt", Best: 378, Lower: 378, HasLower: true, Source: "Dumas et al. (1995)", Line: 2}, ks[0])
	assert.Equal(t, Known{Family: "OhlmannThomas", Instance: "n150w120.001.txt", Best: 734, Line: 3}, ks[1])
	assert.Equal(t, Known{Family: "Mine", Instance: "a.txt", Best: 12.5, Line: 4}, ks[2])
	m := ByKey(ks)
	assert.Equal(t, 734.0, m["OhlmannThomas/n150w120.001.txt"].Best)
	assert.Len(t, m, 3)
}

func TestReadErrorsNameLineAndField(t *testing.T) {
	for _, c := range []struct{ in, want string }{
		{"family,instance,best_known\nDumas,a,x\n", "bk.csv:2:3: best_known \"x\" is not a number"},
		{"Dumas,a,1,y,src\n", "bk.csv:1:4: lower_bound \"y\" is not a number"},
		{"Dumas,a\n", "bk.csv:1: want family,instance,best_known"},
		{"instance,customers,vehicles,distance,found\nday1,12,3,100.5,2026-01-01\n", "bk.csv:1: this is the table of the team benchmark"},
	} {
		_, err := Read(strings.NewReader(c.in), "bk.csv")
		assert.ErrorContains(t, err, c.want, c.in)
	}
}

// The TSPLIB folder's optimal.csv has its own columns; its rows belong to
// the family of the folder it lies in, named without file extensions.
func TestReadTSPLIBOptimal(t *testing.T) {
	src := "instance,type,nodes,optimal,source\npcb442,TSP,442,50778,TSPLIB\nft70,ATSP,70,38673,TSPLIB\n"
	ks, err := Read(strings.NewReader(src), "bench/tsplib/optimal.csv")
	require.NoError(t, err)
	require.Len(t, ks, 2)
	assert.Equal(t, "tsplib/pcb442", ks[0].Key())
	assert.Equal(t, 50778.0, ks[0].Best)
	assert.Equal(t, 38673.0, ks[1].Best)
	_, err = Read(strings.NewReader("instance,type,nodes,optimal\npcb442,TSP,442,many\n"), "tsplib/optimal.csv")
	require.Error(t, err)
	assert.Contains(t, err.Error(), "tsplib/optimal.csv:2:4: optimal \"many\" is not a number")
}
