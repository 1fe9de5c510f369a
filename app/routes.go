package app

import goapp "github.com/maxence-charriere/go-app/v9/pkg/app"

// Routes registers the page for every path, so the site works under any
// path prefix (the static site is one page; its links are relative).
func Routes() {
	goapp.Route("/", &Page{})
	goapp.RouteWithRegexp("^/.*", &Page{})
}
