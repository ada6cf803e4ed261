//go:build js

package format

// stdJSONError: the web worker's build reads JSON with package jsonlite
// alone, whose errors JSONError knows.
func stdJSONError(error) (string, bool) { return "", false }
