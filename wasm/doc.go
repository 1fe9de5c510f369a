// Package wasm holds the js/wasm programs of the page: page (the go-app UI)
// and worker (the analysis core in a Web Worker), plus the pure-Go pieces
// they share: wire (the messages) and job (what a worker does with them).
package wasm
