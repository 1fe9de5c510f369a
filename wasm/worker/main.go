//go:build js && wasm

// Command worker is the analysis core compiled to wasm and run in a
// dedicated Web Worker (web/worker.js starts it). It has no UI code: it
// reads {json, names, bufs} messages, runs them through package job, and
// posts {json, bufs} replies with every ArrayBuffer in the transfer list.
//
// The onmessage callback never blocks: it copies the bytes out of the JS
// buffers and starts a goroutine; requests run one at a time in arrival
// order.
package main

import (
	"context"
	"encoding/json"
	"syscall/js"

	"amplink/wasm/job"
	"amplink/wasm/wire"
)

type message struct {
	req   wire.Request
	names []string
	bufs  [][]byte
}

func main() {
	queue := make(chan message, 64)
	self := js.Global()
	post := func(rep wire.Reply, bufs [][]byte) {
		b, err := json.Marshal(rep)
		if err != nil {
			b, _ = json.Marshal(wire.Reply{Op: wire.OpError, Seq: rep.Seq, Error: "worker: " + err.Error()})
			bufs = nil
		}
		msg := js.Global().Get("Object").New()
		msg.Set("json", string(b))
		arr := js.Global().Get("Array").New()
		transfer := js.Global().Get("Array").New()
		for _, buf := range bufs {
			u8 := js.Global().Get("Uint8Array").New(len(buf))
			js.CopyBytesToJS(u8, buf)
			ab := u8.Get("buffer")
			arr.Call("push", ab)
			transfer.Call("push", ab)
		}
		msg.Set("bufs", arr)
		self.Call("postMessage", msg, transfer)
	}
	onMessage := js.FuncOf(func(this js.Value, args []js.Value) any {
		data := args[0].Get("data")
		var m message
		if err := json.Unmarshal([]byte(data.Get("json").String()), &m.req); err != nil {
			post(wire.Reply{Op: wire.OpError, Error: "worker: bad request: " + err.Error()}, nil)
			return nil
		}
		if names := data.Get("names"); names.Truthy() {
			for i := 0; i < names.Length(); i++ {
				m.names = append(m.names, names.Index(i).String())
			}
		}
		if bufs := data.Get("bufs"); bufs.Truthy() {
			for i := 0; i < bufs.Length(); i++ {
				u8 := js.Global().Get("Uint8Array").New(bufs.Index(i))
				b := make([]byte, u8.Length())
				js.CopyBytesToGo(b, u8)
				m.bufs = append(m.bufs, b)
			}
		}
		queue <- m
		return nil
	})
	self.Set("onmessage", onMessage)
	if ready := self.Get("amplinkReady"); ready.Type() == js.TypeFunction {
		ready.Invoke()
	}
	var w job.Worker
	for m := range queue {
		w.Handle(context.Background(), m.req, m.names, m.bufs, post)
	}
}
