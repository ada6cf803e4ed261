// Package benchdata reads the table of best-known values that comes with
// the published TSPTW collection (best-known.csv: family, instance,
// best_known, and optionally lower_bound and bound_from). The measurement
// lab and the tests of solver and solver/bound read it through this one
// reader. It reads text only; where the collection lives is the caller's
// business.
package benchdata

import (
	"encoding/csv"
	"errors"
	"fmt"
	"io"
	"os"
	"path/filepath"
	"strconv"
	"strings"
)

// Known is one row of best-known.csv.
type Known struct {
	Family, Instance string
	// Best is the best-known travel (or completion) value.
	Best float64
	// Lower is the published lower bound, when the row has one.
	Lower    float64
	HasLower bool
	// Source names the paper the values come from (bound_from).
	Source string
	// Line is the row's line in the file, for messages.
	Line int
}

// Key is "family/instance", the name bench and the tests look rows up by.
func (k Known) Key() string { return k.Family + "/" + k.Instance }

// Read reads best-known rows from r; name is the file's name in errors.
// A first row starting with "family" is the header. The TSPLIB folder's
// optimal.csv (instance,type,nodes,optimal,source) is read too: its rows
// belong to the family named by the folder the file lies in, and their
// instances are named without the file extension.
func Read(r io.Reader, name string) ([]Known, error) {
	cr := csv.NewReader(r)
	cr.FieldsPerRecord = -1
	var out []Known
	tsplib := false
	for first := true; ; first = false {
		rec, err := cr.Read()
		if errors.Is(err, io.EOF) {
			return out, nil
		}
		if err != nil {
			return nil, fmt.Errorf("%s: %w", name, err)
		}
		line, _ := cr.FieldPos(0)
		if first && len(rec) > 0 && strings.EqualFold(strings.TrimSpace(rec[0]), "family") {
			continue
		}
		if first && len(rec) >= 4 && strings.TrimSpace(rec[0]) == "instance" && strings.TrimSpace(rec[3]) == "optimal" {
			tsplib = true
			continue
		}
		if first && len(rec) >= 3 && strings.TrimSpace(rec[0]) == "instance" && strings.TrimSpace(rec[2]) == "vehicles" {
			return nil, fmt.Errorf("%s:%d: this is the table of the team benchmark (instance,customers,vehicles,distance), read with team days in Solomon's format; for one-vehicle days want family,instance,best_known[,lower_bound,bound_from]", name, line)
		}
		if tsplib {
			if len(rec) < 4 {
				return nil, fmt.Errorf("%s:%d: want instance,type,nodes,optimal[,source], got %d fields", name, line, len(rec))
			}
			k := Known{Family: filepath.Base(filepath.Dir(name)), Instance: rec[0], Line: line}
			if k.Best, err = strconv.ParseFloat(strings.TrimSpace(rec[3]), 64); err != nil {
				return nil, fmt.Errorf("%s:%d:4: optimal %q is not a number", name, line, rec[3])
			}
			if len(rec) > 4 {
				k.Source = rec[4]
			}
			out = append(out, k)
			continue
		}
		if len(rec) < 3 {
			return nil, fmt.Errorf("%s:%d: want family,instance,best_known[,lower_bound,bound_from], got %d fields", name, line, len(rec))
		}
		k := Known{Family: rec[0], Instance: rec[1], Line: line}
		if k.Best, err = strconv.ParseFloat(strings.TrimSpace(rec[2]), 64); err != nil {
			return nil, fmt.Errorf("%s:%d:3: best_known %q is not a number", name, line, rec[2])
		}
		if len(rec) > 3 && strings.TrimSpace(rec[3]) != "" {
			if k.Lower, err = strconv.ParseFloat(strings.TrimSpace(rec[3]), 64); err != nil {
				return nil, fmt.Errorf("%s:%d:4: lower_bound %q is not a number", name, line, rec[3])
			}
			k.HasLower = true
		}
		if len(rec) > 4 {
			k.Source = rec[4]
		}
		out = append(out, k)
	}
}

// Load reads the file at path.
func Load(path string) ([]Known, error) {
	fh, err := os.Open(path)
	if err != nil {
		return nil, err
	}
	defer fh.Close()
	return Read(fh, path)
}

// ByKey indexes rows by Key.
func ByKey(ks []Known) map[string]Known {
	m := make(map[string]Known, len(ks))
	for _, k := range ks {
		m[k.Key()] = k
	}
	return m
}
