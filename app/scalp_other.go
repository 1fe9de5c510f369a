//go:build !wasm

package app

// bufferText has no buffers to read outside the browser.
func bufferText(buffer) string { return "" }
