// Package app is the amplink page: go-app components that compile natively
// (to pre-render the static site) and to wasm (to run in the browser).
//
// The page never decodes a recording or computes anything itself. It keeps
// the user's File objects, hands their bytes (as transferable ArrayBuffers)
// to Web Workers running wasm/worker, and shows what they send back. Only
// recipe parsing (validation messages next to the field they name) runs on
// the page's thread, because it is cheap.
//
// Handler (native builds only) describes the site to go-app; the CLI's
// `amplink site` writes it out as static files.
package app
