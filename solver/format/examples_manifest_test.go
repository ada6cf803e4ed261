package format

import (
	"path"
	"testing"

	"github.com/stretchr/testify/assert"

	"visitline/examples"
)

// TestExampleCasesFollowTheManifest: the example tests of this package run
// every sites-file demo of examples.List, with the matrix and route end the
// page gives it, so a new demo cannot slip past them.
func TestExampleCasesFollowTheManifest(t *testing.T) {
	cases := map[string]exampleCase{}
	for _, c := range exampleCases {
		cases[c.dir+"/"+c.sites] = c
	}
	for _, e := range examples.List {
		if path.Ext(e.Key) == ".txt" {
			continue // the benchmark matrix format: not a sites file
		}
		c, ok := cases[e.Key]
		if !assert.True(t, ok, "%s: no example case", e.Key) {
			continue
		}
		assert.Equal(t, e.Matrix, c.matrix, e.Key)
		assert.Equal(t, e.Options["end"], c.opt.End, e.Key)
		delete(cases, e.Key)
	}
	assert.Empty(t, cases, "example cases for demos the manifest does not list")
}
