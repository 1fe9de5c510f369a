//go:build wasm

package app

import "syscall/js"

// bufferText decodes a figure's ArrayBuffer (UTF-8) to a string.
func bufferText(buf buffer) string {
	if !buf.Truthy() {
		return ""
	}
	return js.Global().Get("TextDecoder").New().Call("decode", buf).String()
}
