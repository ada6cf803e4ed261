package main

import (
	"testing"

	"github.com/stretchr/testify/assert"
)

// A malformed message (a share link edited by hand) is answered in plain
// words, without the names of Go types.
func TestMalformedMessageInPlainWords(t *testing.T) {
	cases := []struct{ name, raw, want string }{
		{"object for the name", `{"type":"load","name":{"x":1}}`, `"name": want text, not an object`},
		{"text for the budget", `{"type":"start","budget":"ten"}`, `"budget": want a number, not text`},
		{"cut short", `{"type":"load","text":"id`, "cut short"},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			r := newRecorder()
			e := NewEngine(r.post)
			e.Handle(c.raw)
			m := r.wait(t, "failed")
			msg, _ := m["message"].(string)
			assert.Contains(t, msg, c.want)
			assert.NotContains(t, msg, "Go struct")
			assert.NotContains(t, msg, "unmarshal")
		})
	}
}
