// Package web holds the page's static assets: the style sheet, the icons
// and the worker bootstrap (worker.js). The built .wasm files are not
// here; `amplink site` builds them into the site's web/ directory.
package web
