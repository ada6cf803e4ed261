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

// message is one message from the page: its JSON text and, for a load,
// the sites and matrix texts passed apart (big).
type message struct {
	raw string
	big *[2]string
}

// main wires the engine to the worker: worker.js calls
// globalThis.visitlineEngine.handle(json) for each message from the page
// (handle(json, text, matrix) for a load) and relays what the engine posts
// (JSON text) back to the page. cancelLoad(id) is taken at once, in the
// callback, not behind the load it cancels: the load gives the event loop
// its turns, and the callback runs in one of them.
func main() {
	post := js.Global().Get("visitlineReply")
	turn.Host = hostTurn()
	e := NewEngine(func(b []byte) { post.Invoke(string(b)) })
	inbox := make(chan message, 256)
	handle := js.FuncOf(func(this js.Value, args []js.Value) any {
		if len(args) > 0 {
			m := message{raw: args[0].String()}
			if len(args) >= 3 {
				m.big = &[2]string{args[1].String(), args[2].String()}
			}
			// A callback must not block the event loop: hand the message
			// over and return at once.
			select {
			case inbox <- m:
			default:
				go func() { inbox <- m }()
			}
		}
		return nil
	})
	cancelLoad := js.FuncOf(func(this js.Value, args []js.Value) any {
		id := 0
		if len(args) > 0 && args[0].Type() == js.TypeNumber {
			id = args[0].Int()
		}
		e.CancelLoad(id)
		return nil
	})
	obj := js.Global().Get("Object").New()
	obj.Set("handle", handle)
	obj.Set("cancelLoad", cancelLoad)
	js.Global().Set("visitlineEngine", obj)
	e.Ready()
	for m := range inbox {
		if m.big != nil {
			e.HandleLoad(m.raw, m.big[0], m.big[1])
		} else {
			e.Handle(m.raw)
		}
	}
}
