//go:build !wasm

package app

import (
	goapp "github.com/maxence-charriere/go-app/v9/pkg/app"
)

// CSP is the Content-Security-Policy of the page: everything from this
// origin only, wasm compilation allowed, workers from this origin, nothing
// posted anywhere. Inline scripts and inline style attributes are refused,
// so the components never use Style(); classes in web/app.css do the work.
const CSP = "default-src 'self'; script-src 'self' 'wasm-unsafe-eval'; " +
	"worker-src 'self'; connect-src 'self'; img-src 'self' data: blob:; " +
	"style-src 'self'; font-src 'self'; object-src 'none'; base-uri 'self'; form-action 'none'"

// HeaderCSP is the policy the server sends as a header: CSP plus
// frame-ancestors 'none', which refuses framing (clickjacking); browsers
// ignore frame-ancestors in a <meta> policy, so the meta carries CSP alone.
const HeaderCSP = CSP + "; frame-ancestors 'none'"

// Title is the page title.
const Title = "amplink: power-based connectivity"

// relative is a go-app resource provider whose static paths are relative
// ("./web/x"), so the written site works under any path prefix. The
// package paths go-app always makes absolute ("/app.js", ...) are rewritten
// by the site writer (see cmd/amplink/site.go).
type relative struct{}

func (relative) Package() string { return "" }
func (relative) Static() string  { return "." }
func (relative) AppWASM() string { return "web/app.wasm" }

// Handler returns the go-app handler describing the page. version must
// change whenever any served file changes (the site writer uses a hash of
// the built files), so that the service worker refreshes its cache.
func Handler(version string) *goapp.Handler {
	return &goapp.Handler{
		Name:            "amplink",
		ShortName:       "amplink",
		Title:           Title,
		Description:     "Power-based functional connectivity for EEG, MEG and LFP, computed on this computer.",
		Author:          "amplink",
		Lang:            "en",
		BackgroundColor: "#fbfaf7",
		ThemeColor:      "#1f3a4d",
		LoadingLabel:    LoadingLabel,
		Version:         version,
		Resources:       relative{},
		Icon: goapp.Icon{
			Default:    "/web/icon-192.png",
			Large:      "/web/icon-512.png",
			SVG:        "/web/icon.svg",
			AppleTouch: "/web/icon-192.png",
		},
		Styles:  []string{"/web/app.css"},
		Scripts: []string{"/web/start.js defer"},
		CacheableResources: []string{
			"/web/icon.svg",
			"/web/worker.js",
			"/web/worker.wasm",
			"/web/wasm_exec.js",
		},
		RawHeaders: []string{
			`<meta http-equiv="Content-Security-Policy" content="` + CSP + `">`,
			`<meta name="referrer" content="no-referrer">`,
		},
	}
}
