//go:build js && wasm

// Package late yields the page's start-up once more, after the heavy
// packages below have started (see package startup).
package late

import (
	_ "encoding/json"
	_ "net/http"
	_ "text/template"

	"amplink/app/startup"
)

func init() { startup.Yield() }
