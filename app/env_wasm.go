//go:build wasm

package app

import (
	"encoding/json"
	"errors"
	"strconv"
	"strings"
	"syscall/js"
	"time"

	goapp "github.com/maxence-charriere/go-app/v9/pkg/app"

	"amplink/app/startup"
	"amplink/app/wire"
)

// handle is a browser File (or Blob).
type handle = js.Value

// buffer is an ArrayBuffer received from a worker.
type buffer = js.Value

// pool is the set of analysis workers. Everything here runs on the page's
// thread and only moves messages; the workers do the work.
type pool struct {
	workers []js.Value
	funcs   []js.Func
	onReply func(worker int, rep wire.Reply, bufs []buffer)
}

// workerCount is navigator.hardwareConcurrency, at least 1: one worker per
// core. The page's own thread only moves messages and draws in tasks of
// under 200 ms, so a busy worker on every core leaves it responsive (the
// browser tests time its tasks while the workers compute).
func workerCount() int {
	n := js.Global().Get("navigator").Get("hardwareConcurrency")
	if n.Type() != js.TypeNumber {
		return 1
	}
	return max(1, n.Int())
}

func newPool(n int, onReply func(int, wire.Reply, []buffer)) *pool {
	p := &pool{onReply: onReply}
	p.spawn(n)
	return p
}

func (p *pool) spawn(n int) {
	for k := 0; k < n; k++ {
		w := js.Global().Get("Worker").New("web/worker.js")
		k := k
		onMsg := js.FuncOf(func(this js.Value, args []js.Value) any {
			data := args[0].Get("data")
			var rep wire.Reply
			if err := json.Unmarshal([]byte(data.Get("json").String()), &rep); err != nil {
				rep = wire.Reply{Op: wire.OpError, Error: "page: bad reply from worker: " + err.Error()}
			}
			var bufs []buffer
			if b := data.Get("bufs"); b.Truthy() {
				for i := 0; i < b.Length(); i++ {
					bufs = append(bufs, b.Index(i))
				}
			}
			p.onReply(k, rep, bufs)
			return nil
		})
		onErr := js.FuncOf(func(this js.Value, args []js.Value) any {
			msg := "worker failed to start"
			if m := args[0].Get("message"); m.Truthy() {
				msg = "worker: " + m.String()
			}
			p.onReply(k, wire.Reply{Op: wire.OpFatal, Error: msg}, nil)
			return nil
		})
		w.Set("onmessage", onMsg)
		w.Set("onerror", onErr)
		p.workers = append(p.workers, w)
		p.funcs = append(p.funcs, onMsg, onErr)
	}
}

// restart terminates every worker (stopping whatever it computes at once)
// and starts fresh ones.
func (p *pool) restart() {
	n := len(p.workers)
	for _, w := range p.workers {
		w.Call("terminate")
	}
	for _, f := range p.funcs {
		f.Release()
	}
	p.workers, p.funcs = nil, nil
	p.spawn(n)
}

func (p *pool) size() int { return len(p.workers) }

// send posts req with the given files: Files (Blobs), which the worker
// reads in slices and which posting does not copy, or ArrayBuffers, which
// go in the transfer list.
func (p *pool) send(k int, req wire.Request, names []string, bufs []js.Value) {
	b, err := json.Marshal(req)
	if err != nil {
		panic("app: " + err.Error())
	}
	msg := js.Global().Get("Object").New()
	msg.Set("json", string(b))
	ns := js.Global().Get("Array").New()
	for _, n := range names {
		ns.Call("push", n)
	}
	arr := js.Global().Get("Array").New()
	transfer := js.Global().Get("Array").New()
	arrayBuffer := js.Global().Get("ArrayBuffer")
	for _, buf := range bufs {
		arr.Call("push", buf)
		if buf.InstanceOf(arrayBuffer) {
			transfer.Call("push", buf)
		}
	}
	msg.Set("names", ns)
	msg.Set("bufs", arr)
	p.workers[k].Call("postMessage", msg, transfer)
}

// await waits for a promise from a goroutine (never the event loop's own).
func await(promise js.Value) (js.Value, error) {
	type result struct {
		v   js.Value
		err error
	}
	ch := make(chan result, 1)
	var then, catch js.Func
	then = js.FuncOf(func(this js.Value, args []js.Value) any {
		ch <- result{v: args[0]}
		return nil
	})
	catch = js.FuncOf(func(this js.Value, args []js.Value) any {
		msg := "failed"
		if len(args) > 0 && args[0].Truthy() {
			msg = args[0].Call("toString").String()
		}
		ch <- result{err: errors.New(msg)}
		return nil
	})
	promise.Call("then", then).Call("catch", catch)
	r := <-ch
	then.Release()
	catch.Release()
	return r.v, r.err
}

func readText(f fileRef) (string, error) {
	v, err := await(f.h.Call("text"))
	if err != nil {
		return "", errors.New(f.Name + ": could not be read: " + err.Error())
	}
	return v.String(), nil
}

// filesOf lists the File objects of a FileList (input.files or
// dataTransfer.files).
func filesOf(list goapp.Value) []fileRef {
	l := goapp.JSValue(list)
	if !l.Truthy() {
		return nil
	}
	var out []fileRef
	for i := 0; i < l.Length(); i++ {
		f := l.Index(i)
		out = append(out, fileRef{Name: f.Get("name").String(), Size: int64(f.Get("size").Float()), h: f})
	}
	return out
}

// blobURL makes an object URL for text (downloads).
func blobURL(text, mime string) string {
	parts := js.Global().Get("Array").New()
	parts.Call("push", text)
	opts := js.Global().Get("Object").New()
	opts.Set("type", mime)
	blob := js.Global().Get("Blob").New(parts, opts)
	return js.Global().Get("URL").Call("createObjectURL", blob).String()
}

// bufferURL makes an object URL for an ArrayBuffer from a worker.
func bufferURL(buf js.Value, mime string) string {
	parts := js.Global().Get("Array").New()
	parts.Call("push", buf)
	opts := js.Global().Get("Object").New()
	opts.Set("type", mime)
	blob := js.Global().Get("Blob").New(parts, opts)
	return js.Global().Get("URL").Call("createObjectURL", blob).String()
}

func revokeURL(u string) {
	if u != "" {
		js.Global().Get("URL").Call("revokeObjectURL", u)
	}
}

// fragment returns location.hash.
func fragment() string {
	return js.Global().Get("location").Get("hash").String()
}

// setFragment replaces the URL fragment without navigating, and returns
// the whole URL.
func setFragment(frag string) string {
	loc := js.Global().Get("location")
	base := strings.SplitN(loc.Get("href").String(), "#", 2)[0]
	u := base + "#" + frag
	js.Global().Get("history").Call("replaceState", js.Null(), "", u)
	return u
}

// copyText puts s on the clipboard when the browser allows it; failures are
// ignored (the link is also shown for copying by hand).
func copyText(s string) {
	clip := js.Global().Get("navigator").Get("clipboard")
	if !clip.Truthy() {
		return
	}
	p := clip.Call("writeText", s)
	noop := js.FuncOf(func(js.Value, []js.Value) any { return nil })
	p.Call("catch", noop)
}

func nowMillis() float64 {
	return js.Global().Get("performance").Call("now").Float()
}

// plotGeometry reads the plot-area geometry that core/plot writes as
// data-* attributes, and the plot's bounding box on screen.
func plotGeometry() (g geometry, box [4]float64, ok bool) {
	doc := js.Global().Get("document")
	el := doc.Call("getElementById", "plot-area")
	if !el.Truthy() {
		return g, box, false
	}
	svg := el.Get("ownerSVGElement")
	if !svg.Truthy() {
		return g, box, false
	}
	attr := func(name string) string {
		v := el.Call("getAttribute", "data-"+name)
		if v.IsNull() {
			return ""
		}
		return v.String()
	}
	g, ok = parseGeometry(attr)
	r := svg.Call("getBoundingClientRect")
	box = [4]float64{r.Get("left").Float(), r.Get("top").Float(), r.Get("width").Float(), r.Get("height").Float()}
	return g, box, ok && box[2] > 0 && box[3] > 0
}

// showSelection draws the dragged rectangle (client coordinates) over the
// power plot. It sets CSSOM properties, which the page's CSP allows (style
// attributes are refused).
func showSelection(x0, y0, x1, y1 float64, visible bool) {
	doc := js.Global().Get("document")
	sel := doc.Call("getElementById", "tf-sel")
	box := doc.Call("getElementById", "tf-box")
	if !sel.Truthy() || !box.Truthy() {
		return
	}
	st := sel.Get("style")
	if !visible {
		st.Set("display", "none")
		return
	}
	r := box.Call("getBoundingClientRect")
	px := func(v float64) string { return strconv.FormatFloat(v, 'f', 1, 64) + "px" }
	st.Set("display", "block")
	st.Set("left", px(min(x0, x1)-r.Get("left").Float()))
	st.Set("top", px(min(y0, y1)-r.Get("top").Float()))
	st.Set("width", px(abs(x1-x0)))
	st.Set("height", px(abs(y1-y0)))
}

// bodyRows is the number of data rows in the table body with the given id, or
// −1 when there is none.
func bodyRows(id string) int {
	el := js.Global().Get("document").Call("getElementById", id)
	if !el.Truthy() {
		return -1
	}
	// result rows only, not the analyses' heading rows
	return el.Call("querySelectorAll", "tr:not(.group)").Length()
}

// setBodyHTML replaces the contents of the element with the given id.
func setBodyHTML(id, html string) {
	if el := js.Global().Get("document").Call("getElementById", id); el.Truthy() {
		el.Set("innerHTML", html)
	}
}

// appendBodyHTML parses html at the end of the element with the given id.
func appendBodyHTML(id, html string) {
	if el := js.Global().Get("document").Call("getElementById", id); el.Truthy() {
		el.Call("insertAdjacentHTML", "beforeend", html)
	}
}

// handBack ends the current main-thread task; the caller resumes in a later
// one (see package startup).
func handBack() { startup.Yield() }

// markTime adds a performance mark (for timing the page in tests).
func markTime(name string) {
	js.Global().Get("performance").Call("mark", name)
}

// attachDrag makes the power map draggable: a rectangle follows the
// pointer, and done gets its corners (client coordinates) on release. The
// listeners live on #tf-box itself, so a new map needs no new ones; a new
// #tf-box (after the map was hidden) gets them again.
func attachDrag(done func(x0, y0, x1, y1 float64)) {
	box := js.Global().Get("document").Call("getElementById", "tf-box")
	if !box.Truthy() || box.Get("dataset").Get("drag").Truthy() {
		return
	}
	box.Get("dataset").Set("drag", "on")
	var dragging bool
	var x0, y0 float64
	pos := func(ev js.Value) (float64, float64) { return ev.Get("clientX").Float(), ev.Get("clientY").Float() }
	down := js.FuncOf(func(this js.Value, args []js.Value) any {
		ev := args[0]
		ev.Call("preventDefault")
		dragging = true
		x0, y0 = pos(ev)
		if id := ev.Get("pointerId"); id.Type() == js.TypeNumber {
			box.Call("setPointerCapture", id)
		}
		showSelection(x0, y0, x0, y0, true)
		return nil
	})
	move := js.FuncOf(func(this js.Value, args []js.Value) any {
		if dragging {
			x, y := pos(args[0])
			showSelection(x0, y0, x, y, true)
		}
		return nil
	})
	up := js.FuncOf(func(this js.Value, args []js.Value) any {
		if !dragging {
			return nil
		}
		dragging = false
		x, y := pos(args[0])
		done(x0, y0, x, y)
		return nil
	})
	box.Call("addEventListener", "pointerdown", down)
	box.Call("addEventListener", "pointermove", move)
	box.Call("addEventListener", "pointerup", up)
}

// afterTask calls fn from a JS timer after d, so that it runs in a task of
// its own.
func afterTask(d time.Duration, fn func()) {
	var f js.Func
	f = js.FuncOf(func(js.Value, []js.Value) any {
		f.Release()
		fn()
		return nil
	})
	js.Global().Call("setTimeout", f, d.Milliseconds())
}

// focusField scrolls the element with the given id into view and focuses it.
func focusField(id string) {
	el := js.Global().Get("document").Call("getElementById", id)
	if !el.Truthy() {
		return
	}
	opts := js.Global().Get("Object").New()
	opts.Set("block", "center")
	el.Call("scrollIntoView", opts)
	el.Call("focus")
}

// copyBuffer copies an ArrayBuffer (sending one to a worker transfers it).
func copyBuffer(b buffer) buffer { return b.Call("slice", 0) }

// bufferText decodes an ArrayBuffer of UTF-8 text.
func bufferText(buf js.Value) string {
	if !buf.Truthy() {
		return ""
	}
	return js.Global().Get("TextDecoder").New().Call("decode", js.Global().Get("Uint8Array").New(buf)).String()
}
