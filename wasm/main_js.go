//go:build js && wasm

package main

import (
	"syscall/js"

	"visitline/solver/turn"
)

// hostTurn returns a pause that blocks until the worker's event loop has
// run: it posts to a MessageChannel of its own and waits for the callback.
// Go's wasm runtime returns to the event loop only when every goroutine is
// blocked, so each long-running goroutine (the search, the bound) calls it
// in turn (package turn paces them); the page's messages, queued before
// the channel's, are delivered first. A message channel, not setTimeout(0):
// nested timers are clamped to 4 ms.
func hostTurn() func() {
	woken := make(chan struct{}, 64)
	ch := js.Global().Get("MessageChannel").New()
	ch.Get("port1").Set("onmessage", js.FuncOf(func(this js.Value, args []js.Value) any {
		select {
		case woken <- struct{}{}:
		default:
		}
		return nil
	}))
	port := ch.Get("port2")
	return func() {
		port.Call("postMessage", 0)
		<-woken
	}
}

// main wires the engine to the worker: worker.js calls
// globalThis.visitlineEngine.handle(text) for each message from the page and
// relays what the engine posts (JSON text) back to the page.
func main() {
	post := js.Global().Get("visitlineReply")
	turn.Host = hostTurn()
	e := NewEngine(func(b []byte) { post.Invoke(string(b)) })
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
