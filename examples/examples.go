// Package examples holds the invented demo scenarios, embedded so that the
// page and the command line can offer them without reading the disk. Each
// scenario is a folder with a README.md whose first paragraph says what it
// shows, and one or more data files.
package examples

import "embed"

// FS holds every scenario folder.
//
//go:embed */*
var FS embed.FS
