package examples

import (
	"io/fs"
	"path"
	"strings"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"
)

// TestListMatchesTheFolders: every listed file is there, every data file
// of a folder is listed (as a demo or as its matrix), and every folder has
// a README for people.
func TestListMatchesTheFolders(t *testing.T) {
	used := map[string]bool{}
	for _, e := range List {
		_, err := fs.Stat(FS, e.Key)
		assert.NoError(t, err, e.Key)
		used[e.Key] = true
		if e.Matrix != "" {
			m := path.Dir(e.Key) + "/" + e.Matrix
			_, err := fs.Stat(FS, m)
			assert.NoError(t, err, m)
			used[m] = true
		}
		assert.NotEmpty(t, e.Title, e.Key)
		assert.NotEmpty(t, e.About, e.Key)
	}
	dirs, err := fs.ReadDir(FS, ".")
	require.NoError(t, err)
	require.NotEmpty(t, dirs)
	for _, d := range dirs {
		_, err := fs.Stat(FS, d.Name()+"/README.md")
		assert.NoError(t, err, "%s has a README", d.Name())
		files, err := fs.ReadDir(FS, d.Name())
		require.NoError(t, err)
		for _, f := range files {
			name := d.Name() + "/" + f.Name()
			if f.Name() != "README.md" && !strings.HasPrefix(f.Name(), ".") {
				assert.True(t, used[name], "%s is in no example of List", name)
			}
		}
	}
}
