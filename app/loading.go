//go:build !wasm

package app

import (
	"errors"
	"regexp"
	"strings"
)

// LoadingLabel is the loading view's progress line while app.wasm
// downloads; go-app's app.js puts the percentage in place of {progress}
// (it finds the line by its id, app-wasm-loader-label).
const LoadingLabel = "Getting the analysis ready on this computer: {progress}%"

// loadingView is the page's own loading view: the two envelope traces of
// the amplink icon drawing themselves in turn, the name, the progress
// line and what the page promises about the data. The ids are the hooks
// go-app's app.js needs (it removes app-wasm-loader once the program
// runs, writes the progress into app-wasm-loader-label and, on a failure,
// sets the class of app-wasm-loader-icon); the classes are styled in
// web/app.css. Attributes are in name order, as the site writer leaves
// every tag.
const loadingView = `<aside aria-label="amplink is starting" class="starting" id="app-wasm-loader" role="status">
<div class="starting-card">
<div class="starting-mark" id="app-wasm-loader-icon">
<svg aria-hidden="true" viewBox="0 0 64 64">
<rect class="starting-tile" height="64" rx="10" width="64"></rect>
<path class="starting-wave starting-wave-a" d="M4 24 C 20 24, 24 8, 32 8 S 44 24, 60 24"></path>
<path class="starting-wave starting-wave-b" d="M4 40 C 20 40, 24 56, 32 56 S 44 40, 60 40"></path>
</svg>
</div>
<p class="starting-name">amplink</p>
<p class="starting-words" id="app-wasm-loader-label">{label}</p>
<p class="starting-note">Your recordings stay on this computer: nothing is uploaded.</p>
</div>
</aside>`

// stockLoader matches the loading view go-app v9 writes into every page
// (an aside with the id app-wasm-loader), once the site writer has put the
// attributes of each tag in name order.
var stockLoader = regexp.MustCompile(`(?s)<aside class="goapp-app-info" id="app-wasm-loader">.*?</aside>`)

// errStockLoader says the generated page no longer has the loading view
// OwnLoadingView replaces, so the page would show go-app's.
var errStockLoader = errors.New("the generated index.html has no go-app loading view to replace (has go-app changed?)")

// OwnLoadingView replaces go-app's loading view in a generated index.html
// (attributes in name order) by the page's own.
func OwnLoadingView(index string) (string, error) {
	if len(stockLoader.FindAllStringIndex(index, -1)) != 1 {
		return "", errStockLoader
	}
	view := strings.Replace(loadingView, "{label}", strings.ReplaceAll(LoadingLabel, "{progress}", "0"), 1)
	return stockLoader.ReplaceAllLiteralString(index, view), nil
}

// stockLoaderFailure is how go-app's app.js marks the loading icon when
// the wasm fails to load; ownLoaderFailure is the page's class for it.
const (
	stockLoaderFailure = `loaderIcon.className = "goapp-logo";`
	ownLoaderFailure   = `loaderIcon.className = "starting-mark starting-failed";`
)

// OwnLoadingScript changes go-app's app.js so that a failed start marks
// the page's own loading view rather than setting a go-app class.
func OwnLoadingScript(appJS string) (string, error) {
	if strings.Count(appJS, stockLoaderFailure) != 1 {
		return "", errors.New("the generated app.js does not set the loading icon's class as expected (has go-app changed?)")
	}
	return strings.Replace(appJS, stockLoaderFailure, ownLoaderFailure, 1), nil
}
