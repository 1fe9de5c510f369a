// Package wasm holds the js/wasm programs of the page, entry points like
// cmd/: page (the go-app UI of app/, compiled to wasm) and worker (the
// analysis core in a Web Worker), plus job, what a worker does with each
// message. The messages themselves (app/wire) and the page's start-up
// yields (app/startup) live under app/, below these mains, so that nothing
// under app/ imports anything here.
package wasm
