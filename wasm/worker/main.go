//go:build js && wasm

// Command worker is the analysis core compiled to wasm and run in a
// dedicated Web Worker (web/worker.js starts it). It has no UI code: it
// reads {json, names, bufs} messages, runs them through package job, and
// posts {json, bufs} replies with every ArrayBuffer in the transfer list.
//
// A message's files are ArrayBuffers (copied into Go at once) or Files
// (read later in slices, see blobFile). The onmessage callback never
// blocks: it queues the request, and requests run one at a time in arrival
// order.
package main

import (
	"context"
	"encoding/json"
	"fmt"
	"syscall/js"

	"amplink/app/wire"
	"amplink/core/data"
	"amplink/core/format"
	"amplink/wasm/job"
)

type message struct {
	req   wire.Request
	files []format.File
}

// blobFile reads a File (or any Blob) the page posted a slice at a time
// with FileReaderSync, which dedicated workers have: the file is never
// copied whole, into JS or into Go.
func blobFile(name string, blob js.Value) format.File {
	reader := js.Global().Get("FileReaderSync").New()
	r := &job.SliceReader{Name: name, Size: int64(blob.Get("size").Float())}
	r.Fetch = func(p []byte, off int64) (err error) {
		defer func() {
			if e := recover(); e != nil {
				err = fmt.Errorf("%v", e) // a js.Error: NotReadableError and the like
			}
		}()
		part := blob.Call("slice", float64(off), float64(off)+float64(len(p)))
		u8 := js.Global().Get("Uint8Array").New(reader.Call("readAsArrayBuffer", part))
		if u8.Length() != len(p) {
			return job.ErrShort
		}
		js.CopyBytesToGo(p, u8)
		return nil
	}
	return format.File{Name: name, R: r, Size: r.Size}
}

func main() {
	// a worker's memory is limited: readers refuse larger recordings
	// before allocating, with a message saying so
	data.MaxSampleBytes = wire.MaxBytes
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
		names, bufs := data.Get("names"), data.Get("bufs")
		n := 0
		if bufs.Truthy() {
			n = bufs.Length()
		}
		if !names.Truthy() && n > 0 || names.Truthy() && names.Length() != n {
			post(wire.Reply{Op: wire.OpError, Seq: m.req.Seq, Error: "worker: file names and files do not match"}, nil)
			return nil
		}
		blob := js.Global().Get("Blob")
		for i := 0; i < n; i++ {
			name, b := names.Index(i).String(), bufs.Index(i)
			if b.InstanceOf(blob) {
				m.files = append(m.files, blobFile(name, b))
				continue
			}
			u8 := js.Global().Get("Uint8Array").New(b)
			c := make([]byte, u8.Length())
			js.CopyBytesToGo(c, u8)
			m.files = append(m.files, format.Bytes(name, c))
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
		w.HandleFiles(context.Background(), m.req, m.files, post)
	}
}
