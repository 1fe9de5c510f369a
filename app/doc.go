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
//
// The files: page.go (the page's state, start-up stages and worker
// replies), actions.go (its event handlers, step by step), render.go and
// render_results.go (drawing the five steps), form.go (the recipe form),
// table.go, words.go and question.go (the results table, the words it is
// read in and each analysis's question), geometry.go (pointer positions on
// figures), handler.go and routes.go (the site),
// scalp.go (clickable scalp maps), share.go (links), loading.go (the loading
// view), and env_wasm.go/env_other.go (what the browser provides, and its
// stand-ins for native builds). Its messages to the workers are app/wire;
// its start-up yields app/startup.
package app
