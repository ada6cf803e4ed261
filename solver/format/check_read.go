//go:build !js

package format

import (
	"encoding/json"
	"io"
)

// ReadClaims reads a plan written by WriteJSON. name is used in errors.
func ReadClaims(r io.Reader, name string) (*Claims, error) {
	var c Claims
	dec := json.NewDecoder(io.LimitReader(r, MaxInputBytes))
	if err := dec.Decode(&c); err != nil {
		return nil, &ParseError{File: name, Field: "plan JSON", Msg: JSONError(err), Err: err}
	}
	if c.Route == nil {
		return nil, &ParseError{File: name, Field: "route", Msg: `missing; want "route": [0, ...] with 0-based node numbers`}
	}
	return &c, nil
}
