// Package app is the amplink page: go-app components that compile natively
// (to pre-render the static site) and to wasm (to run in the browser).
//
// The page never reads or decodes a recording, or computes anything itself.
// It keeps the user's File objects and posts them (a handle; no bytes are
// copied) to Web Workers running wasm/worker, which read them in slices;
// results come back as transferable ArrayBuffers, and the page shows them. Only
// recipe parsing (validation messages next to the field they name) runs on
// the page's thread, because it is cheap.
//
// Handler (native builds only) describes the site to go-app; the CLI's
// `amplink site` writes it out as static files.
package app
