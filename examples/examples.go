// Package examples holds the invented demo scenarios, embedded so that the
// page and the command line can offer them without reading the disk. Each
// scenario is a folder with a README.md for people (what it shows, how to
// run it) and one or more data files; List, below, is what programs read.
// The scenarios are demos, not test fixtures: hand-made fixtures live in
// the repository's testdata/.
package examples

import "embed"

// FS holds every scenario folder.
//
//go:embed */*
var FS embed.FS

// Example is one demo the page offers: a data file (a sites file or a file
// in the benchmark matrix format), with its travel matrix and route options
// where it needs them.
type Example struct {
	// Key is the data file's path in FS, "folder/file"; the page's
	// ?example= takes the folder name or the key.
	Key string
	// Matrix names a travel matrix file in the same folder, or is empty.
	Matrix string
	// Title and About are what the page shows in its list and beside it.
	Title, About string
	// Options are route options by the page's names (end, start, speed,
	// road_factor, shift_start, matrix_unit, done, now), as the flags of
	// visitline solve in the scenario's README.
	Options map[string]string
}

// List is every demo, in the order the page lists them.
var List = []Example{
	{
		Key: "art/sites.csv", Matrix: "travel.tsv", Options: map[string]string{"end": "SOUTH"},
		Title: "Art-handling truck between two stores",
		About: "An open path from the north store to a fixed end at the south store, past galleries, a museum dock with a booked half hour, a framer, a collector and an auction house. Semicolon-delimited, dated times; the travel matrix is pasted from a spreadsheet in another order than the sites, and one-way across the river.",
	},
	{
		Key: "bakery/sites.csv", Matrix: "travel.csv",
		Title: "Bakery morning deliveries",
		About: "A van leaves at 04:35 after loading, drops at twelve cafés before they open, each within its clock-time window, and is back by 09:30: a closed tour over an asymmetric travel matrix in minutes.",
	},
	{
		Key:   "boiler/sites-overbooked.csv",
		Title: "A boiler technician's day · sites-overbooked.csv",
		About: "The technician's day with a tenth job booked into a slot that already holds two long visits: no order meets every slot, and the plan shows who is late and why.",
	},
	{
		Key:   "boiler/sites.csv",
		Title: "A boiler technician's day · sites.csv",
		About: "A heating technician makes nine home visits, each booked into a two-hour slot, from the van yard at 07:30 and back by 18:30. No matrix: travel comes from the sites' lat,lon (haversine, road factor 1.3, 50 km/h) in an invented town.",
	},
	{
		Key:   "warehouse/picks.txt",
		Title: "Warehouse picks",
		About: "A picking vehicle's fifteen pick faces in the plain matrix format (node 0 is the dock, travel in tenths of seconds, asymmetric where the vehicle turns back down an aisle), each with a pick window.",
	},
}
