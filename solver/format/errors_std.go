//go:build !js

package format

import (
	"encoding/json"
	"errors"
	"reflect"
)

// stdJSONError puts an error of encoding/json (the command line's check
// reads a plan with it) in JSONError's words.
func stdJSONError(err error) (string, bool) {
	var se *json.SyntaxError
	var te *json.UnmarshalTypeError
	switch {
	case errors.As(err, &te):
		return typeMessage(te.Field, jsonKind(te.Type), te.Value), true
	case errors.As(err, &se):
		return syntaxMessage(se.Error(), se.Offset), true
	}
	return "", false
}

func jsonKind(t reflect.Type) string {
	if t == nil {
		return "a value"
	}
	switch t.Kind() {
	case reflect.String:
		return "text"
	case reflect.Bool:
		return "true or false"
	case reflect.Int, reflect.Int8, reflect.Int16, reflect.Int32, reflect.Int64, reflect.Uint, reflect.Uint8, reflect.Uint16, reflect.Uint32, reflect.Uint64:
		return "a whole number"
	case reflect.Float32, reflect.Float64:
		return "a number"
	case reflect.Slice, reflect.Array:
		return "a list"
	case reflect.Map, reflect.Struct:
		return "an object"
	case reflect.Pointer:
		return jsonKind(t.Elem())
	}
	return "another kind of value"
}
