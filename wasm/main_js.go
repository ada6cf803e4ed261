//go:build js && wasm

package main

import (
	"syscall/js"
	"time"
)

// main wires the engine to the worker: worker.js calls
// globalThis.visitlineEngine.handle(text) for each message from the page and
// relays what the engine posts (JSON text) back to the page.
func main() {
	post := js.Global().Get("visitlineReply")
	e := NewEngine(func(b []byte) { post.Invoke(string(b)) },
		// Sleeping parks every goroutine, so Go's wasm runtime returns to
		// the worker's event loop and queued messages get delivered;
		// runtime.Gosched would not leave Go.
		func() { time.Sleep(time.Millisecond) })
	inbox := make(chan string, 256)
	handle := js.FuncOf(func(this js.Value, args []js.Value) any {
		if len(args) > 0 {
			s := args[0].String()
			// A callback must not block the event loop: hand the message
			// over and return at once.
			select {
			case inbox <- s:
			default:
				go func() { inbox <- s }()
			}
		}
		return nil
	})
	obj := js.Global().Get("Object").New()
	obj.Set("handle", handle)
	js.Global().Set("visitlineEngine", obj)
	e.Ready()
	for msg := range inbox {
		e.Handle(msg)
	}
}
