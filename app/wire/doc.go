// Package wire defines the messages between the page and its analysis
// workers. A message is a JS object {json: string, data?: ArrayBuffer,
// events?: ArrayBuffer}: the JSON text holds a Request or a Reply, and the
// recording and events bytes travel beside it as transferable buffers, so
// they are moved, never copied, between threads.
//
// The package is plain Go (no syscall/js), so both sides and the native
// tests share it.
package wire
