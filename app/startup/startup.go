//go:build js && wasm

// Package startup splits the page's start-up into several main-thread
// tasks.
//
// Chromium compiles a wasm function on its first call, on the thread that
// calls it, so the first run of the runtime's, the libraries' and the page's
// start-up code is slow (about 250 ms of compiling for the page on a
// first visit). Run as one task, that would hold the page for longer than
// the 200 ms it may take to answer. Yield ends the current task and resumes
// in a later one. This package's init yields once, right after the runtime
// and syscall/js are up (package start-up runs in import-path order, and
// "amplink/..." sorts before the standard library's names); package
// startup/late yields again once net/http and the other heavy packages the
// page links have started.
package startup

import "syscall/js"

// Yield hands the event loop back to the browser and resumes in a later
// task. It must be called from a goroutine that may block (never from a
// JS callback).
func Yield() {
	ch := make(chan struct{})
	f := js.FuncOf(func(js.Value, []js.Value) any { close(ch); return nil })
	js.Global().Call("setTimeout", f, 0)
	<-ch
	f.Release()
}

func init() { Yield() }
