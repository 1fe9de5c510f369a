//go:build wasm

// Command page is the amplink page compiled to wasm. It only draws the
// page and passes messages; the analysis runs in Web Workers (wasm/worker).
package main

import (
	goapp "github.com/maxence-charriere/go-app/v9/pkg/app"

	"amplink/app"
	"amplink/app/startup"
	_ "amplink/app/startup/late"
)

func main() {
	// Each step of the start-up is a main-thread task of its own (see
	// package startup): package start-up, then the routes, then go-app's
	// start and the first drawing (the page yields again in OnInit).
	startup.Yield()
	app.Routes()
	goapp.RunWhenOnBrowser()
}
