//go:build !wasm

package app

import (
	"strings"
	"testing"

	"amplink/web"
)

// go-app v9.8.0's loading view as the site writer leaves it (attributes in
// name order), copied from a generated index.html.
const stockIndex = `<body>
<div class="shell">page</div>
<aside class="goapp-app-info" id="app-wasm-loader">
<img class="goapp-logo goapp-spin" id="app-wasm-loader-icon" src="./web/icon-192.png">
<p class="goapp-label" id="app-wasm-loader-label">Loading 0%</p>
</aside>
</body>`

func TestOwnLoadingView(t *testing.T) {
	got, err := OwnLoadingView(stockIndex)
	if err != nil {
		t.Fatal(err)
	}
	if strings.Contains(got, "goapp") || strings.Contains(got, "icon-192.png") {
		t.Errorf("go-app's loading view survives:\n%s", got)
	}
	for _, want := range []string{
		`<div class="shell">page</div>`, // the rest of the page is untouched
		// the hooks app.js needs, on the page's own elements
		`class="starting" id="app-wasm-loader"`, `class="starting-mark" id="app-wasm-loader-icon"`,
		`<p class="starting-words" id="app-wasm-loader-label">Getting the analysis ready on this computer: 0%</p>`,
		"nothing is uploaded",
	} {
		if !strings.Contains(got, want) {
			t.Errorf("the loading view lacks %s:\n%s", want, got)
		}
	}
	if strings.Count(got, `id="app-wasm-loader`) != 3 {
		t.Errorf("want the three ids app.js uses exactly once each:\n%s", got)
	}
	for _, bad := range []string{"<body></body>", stockIndex + stockIndex} {
		if _, err := OwnLoadingView(bad); err == nil {
			t.Errorf("no error for a page with %d stock loading views", strings.Count(bad, "goapp-app-info"))
		}
	}
}

func TestOwnLoadingScript(t *testing.T) {
	const js = "  } catch (err) {\n    loaderIcon.className = \"goapp-logo\";\n    loaderLabel.innerText = err;\n"
	got, err := OwnLoadingScript(js)
	if err != nil {
		t.Fatal(err)
	}
	if want := "loaderIcon.className = \"starting-mark starting-failed\";"; !strings.Contains(got, want) || strings.Contains(got, "goapp-logo") {
		t.Errorf("OwnLoadingScript gave %q", got)
	}
	if _, err := OwnLoadingScript("no loader here"); err == nil {
		t.Error("no error for an app.js without the stock failure class")
	}
}

// The loading view's classes are all styled in web/app.css (read through
// the same embed the site writer copies).
func TestLoadingViewStyled(t *testing.T) {
	css := loadingCSS(t)
	for _, cls := range []string{"starting", "starting-card", "starting-mark", "starting-tile", "starting-wave", "starting-wave-a", "starting-wave-b", "starting-name", "starting-words", "starting-note", "starting-failed"} {
		if !strings.Contains(loadingView+ownLoaderFailure, cls) {
			t.Errorf("class %s is not used", cls)
		}
		if !strings.Contains(css, "."+cls+" ") && !strings.Contains(css, "."+cls+"\n") && !strings.Contains(css, "."+cls+" {") {
			t.Errorf("web/app.css has no rule for .%s", cls)
		}
	}
}

func loadingCSS(t *testing.T) string {
	t.Helper()
	b, err := web.Assets.ReadFile("app.css")
	if err != nil {
		t.Fatal(err)
	}
	return string(b)
}
