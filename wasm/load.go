package main

import (
	"strings"

	"visitline/solver/format"
)

// loadOptions are the page's route and travel settings, as the command
// line's flags of the same names.
type loadOptions struct {
	Start      string   `json:"start"`
	End        string   `json:"end"` // "start" or "", "free", or a site id
	ShiftStart string   `json:"shift_start"`
	MatrixUnit string   `json:"matrix_unit"` // minutes or seconds
	Speed      float64  `json:"speed"`
	RoadFactor float64  `json:"road_factor"`
	Done       []string `json:"done"`
	Now        string   `json:"now"`
}

// loadDataset reads pasted or dropped text through the one entry point the
// command line uses too: a sites file or a benchmark matrix file, told
// apart by content, with an optional travel matrix.
func loadDataset(m inbound) (*format.Dataset, error) {
	unit, err := format.ParseUnit(m.Options.MatrixUnit)
	if err != nil {
		return nil, err
	}
	o := m.Options
	opt := format.Options{SitesName: m.Name, MatrixName: m.MatrixName, MatrixUnit: unit, Speed: o.Speed, RoadFactor: o.RoadFactor,
		Start: strings.TrimSpace(o.Start), End: strings.TrimSpace(o.End), ShiftStart: strings.TrimSpace(o.ShiftStart), Now: strings.TrimSpace(o.Now)}
	for _, id := range o.Done {
		if id = strings.TrimSpace(id); id != "" {
			opt.Done = append(opt.Done, id)
		}
	}
	if strings.TrimSpace(m.Matrix) == "" {
		return format.Load(strings.NewReader(m.Text), nil, opt)
	}
	return format.Load(strings.NewReader(m.Text), strings.NewReader(m.Matrix), opt)
}
