//go:build wasm

// Command page is the amplink page compiled to wasm. It only draws the
// page and passes messages; the analysis runs in Web Workers (wasm/worker).
package main

import (
	"time"

	goapp "github.com/maxence-charriere/go-app/v9/pkg/app"

	"amplink/app"
)

func main() {
	// Hand the event loop back once between the runtime's start-up and the
	// page's: each is then its own main-thread task, not one long one.
	time.Sleep(time.Millisecond)
	app.Routes()
	goapp.RunWhenOnBrowser()
}
