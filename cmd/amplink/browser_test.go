//go:build !wasm

package main

import (
	"archive/zip"
	"bufio"
	"bytes"
	"context"
	"encoding/json"
	"fmt"
	"io"
	"io/fs"
	"math"
	"net"
	"net/http"
	"net/http/httptest"
	"net/http/httputil"
	"net/url"
	"os"
	"os/exec"
	"path/filepath"
	"slices"
	"sort"
	"strconv"
	"strings"
	"sync"
	"testing"
	"time"

	cdpbrowser "github.com/chromedp/cdproto/browser"
	"github.com/chromedp/cdproto/page"
	"github.com/chromedp/cdproto/runtime"
	"github.com/chromedp/chromedp"

	"amplink/app"
	"amplink/app/wire"
	"amplink/core/data"
	"amplink/core/demo"
	"amplink/core/format"
	"amplink/core/format/edf"
	"amplink/core/pipeline"
	"amplink/core/recipe"
	"amplink/core/report"
	"amplink/wasm/job"
)

// The browser tests drive Debian's Chromium like a user would, against the
// site that `amplink site` writes, served under a path prefix by a plain
// file server. Every request is recorded at the test server (the workers'
// and the service worker's requests do not show in the page's network
// events), and the browser is routed through a recording proxy on
// 127.0.0.1 so that a request to any other origin is seen too.

const chromiumPath = "/usr/bin/chromium"

// prefix is where the site is served: it must work under any path.
const prefix = "/some/prefix/"

type request struct {
	Method, Path, Phase string
	At                  time.Time
}

// origin serves the site and records every request with the test phase it
// came in.
type origin struct {
	mu      sync.Mutex
	phase   string
	offline bool
	reqs    []request
	site    http.Handler
}

func (o *origin) setPhase(p string) {
	o.mu.Lock()
	o.phase = p
	o.mu.Unlock()
	phaseLog = append(phaseLog, p+" from "+time.Now().Format("15:04:05.000"))
}

var phaseLog []string

func (o *origin) setOffline(v bool) { o.mu.Lock(); o.offline = v; o.mu.Unlock() }

func (o *origin) ServeHTTP(w http.ResponseWriter, r *http.Request) {
	o.mu.Lock()
	o.reqs = append(o.reqs, request{Method: r.Method, Path: r.URL.Path, Phase: o.phase, At: time.Now()})
	offline, site := o.offline, o.site
	o.mu.Unlock()
	if offline {
		http.Error(w, "offline", http.StatusServiceUnavailable)
		return
	}
	if !strings.HasPrefix(r.URL.Path, prefix) {
		http.NotFound(w, r)
		return
	}
	http.StripPrefix(strings.TrimSuffix(prefix, "/"), site).ServeHTTP(w, r)
}

// setSite serves another site from now on (a new version).
func (o *origin) setSite(h http.Handler) { o.mu.Lock(); o.site = h; o.mu.Unlock() }

func (o *origin) requests(phase string) []request {
	o.mu.Lock()
	defer o.mu.Unlock()
	var out []request
	for _, r := range o.reqs {
		if phase == "" || r.Phase == phase {
			out = append(out, r)
		}
	}
	return out
}

// proxy forwards requests for the test origin and refuses, and records,
// everything else. Requests that carry Sec-Fetch-* headers come from a
// page or worker; Chromium's own background calls (which it makes even
// with --disable-background-networking) carry none, and go through CONNECT
// to its vendor's hosts; those are logged, not failed.
type proxy struct {
	mu      sync.Mutex
	target  *url.URL
	fwd     *httputil.ReverseProxy
	foreign []string // from the page or a worker
	vendor  []string // from the browser itself
}

var vendorHosts = []string{".google.com", ".googleapis.com", ".gstatic.com", ".gvt1.com", ".gvt2.com", ".googleusercontent.com", ".chromium.org", ".doubleclick.net"}

func isVendor(host string) bool {
	h, _, err := net.SplitHostPort(host)
	if err != nil {
		h = host
	}
	for _, v := range vendorHosts {
		if strings.HasSuffix("."+h, v) {
			return true
		}
	}
	return false
}

func (p *proxy) ServeHTTP(w http.ResponseWriter, r *http.Request) {
	if r.Method != http.MethodConnect && r.URL.Host == p.target.Host {
		p.fwd.ServeHTTP(w, r)
		return
	}
	p.mu.Lock()
	what := r.Method + " " + r.Host + r.URL.Path
	fromPage := r.Header.Get("Sec-Fetch-Mode") != "" || r.Header.Get("Sec-Fetch-Site") != ""
	if fromPage || !isVendor(r.Host) {
		p.foreign = append(p.foreign, what)
	} else {
		p.vendor = append(p.vendor, what)
	}
	p.mu.Unlock()
	http.Error(w, "amplink test proxy: no other origin", http.StatusForbidden)
}

// browser is one Chromium with one tab and what it reported.
type browser struct {
	ctx      context.Context
	origin   *origin
	proxy    *proxy
	base     string // the site's URL
	mu       sync.Mutex
	problems []string  // console errors, exceptions
	long     []float64 // after the page was ready
	startup  []float64 // before: wasm instantiation and the Go runtime's start
	byLoad   []string  // the start-up tasks of each page load, in order
	loads    int       // page loads so far
	longAt   []string
	marks    []string
}

// mark notes the page clock at a step, to place long tasks.
func (b *browser) mark(t *testing.T, what string) {
	now, _ := chromedp.Run(b.ctx, chromedp.Evaluate[float64](`performance.now()`))
	b.mu.Lock()
	b.marks = append(b.marks, fmt.Sprintf("%s at %.0f ms", what, now))
	b.mu.Unlock()
}

// longTaskJS runs before any page script: it keeps every main-thread long
// task (the Long Tasks API reports tasks over 50 ms).
const longTaskJS = `window.__amplinkLong = [];
try {
  new PerformanceObserver((list) => {
    for (const e of list.getEntries()) window.__amplinkLong.push([e.duration, e.startTime]);
  }).observe({type: "longtask", buffered: true});
} catch (e) {}
window.__amplinkCSP = [];
document.addEventListener("securitypolicyviolation", (e) => {
  window.__amplinkCSP.push(e.violatedDirective + " " + e.blockedURI);
});`

func newBrowser(t *testing.T) *browser {
	t.Helper()
	if _, err := os.Stat(chromiumPath); err != nil {
		if os.Getenv("CI") == "true" {
			t.Fatalf("CI: %s is needed for the browser tests: %v", chromiumPath, err)
		}
		t.Skipf("no %s: %v", chromiumPath, err)
	}
	dir, _ := testSite(t)
	o := &origin{site: SiteHandler(dir), phase: "load"}
	srv := httptest.NewServer(o)
	t.Cleanup(srv.Close)
	target, _ := url.Parse(srv.URL)
	px := &proxy{target: target, fwd: httputil.NewSingleHostReverseProxy(target)}
	psrv := httptest.NewServer(px)
	t.Cleanup(psrv.Close)

	opts := append(chromedp.DefaultExecAllocatorOptions[:],
		chromedp.ExecPath(chromiumPath),
		chromedp.Headless,
		chromedp.NoSandbox,
		chromedp.DisableGPU,
		chromedp.NoFirstRun,
		chromedp.Flag("disable-quic", true),
		chromedp.Flag("disable-background-networking", true),
		chromedp.Flag("disable-component-update", true),
		chromedp.Flag("disable-sync", true),
		chromedp.Flag("proxy-server", psrv.URL),
		chromedp.Flag("proxy-bypass-list", "<-loopback>"),
		chromedp.UserDataDir(t.TempDir()),
		chromedp.WindowSize(1280, 900),
	)
	actx, cancelA := chromedp.NewExecAllocator(context.Background(), opts...)
	t.Cleanup(cancelA)
	b := &browser{origin: o, proxy: px, base: srv.URL + prefix}
	ctx, cancel := chromedp.NewContext(actx, chromedp.WithListener(func(ev any) {
		switch ev := ev.(type) {
		case *runtime.EventConsoleAPICalled:
			if ev.Type == runtime.ConsoleAPICalledTypeError || ev.Type == runtime.ConsoleAPICalledTypeAssert {
				var parts []string
				for _, a := range ev.Args {
					if a.Value != nil {
						parts = append(parts, string(a.Value))
					} else {
						parts = append(parts, a.Description)
					}
				}
				b.mu.Lock()
				b.problems = append(b.problems, "console."+string(ev.Type)+": "+strings.Join(parts, " "))
				b.mu.Unlock()
			}
		case *runtime.EventExceptionThrown:
			d := ev.ExceptionDetails
			text := d.Text
			if d.Exception != nil {
				text += " " + d.Exception.Description
			}
			b.mu.Lock()
			b.problems = append(b.problems, "exception: "+text)
			b.mu.Unlock()
		}
	}))
	t.Cleanup(cancel)
	b.ctx = ctx
	if err := chromedp.Do(ctx); err != nil {
		t.Fatalf("starting %s: %v", chromiumPath, err)
	}
	if _, err := chromedp.Call(ctx, page.AddScriptToEvaluateOnNewDocument, page.AddScriptToEvaluateOnNewDocumentParams{Source: longTaskJS}); err != nil {
		t.Fatal(err)
	}
	t.Cleanup(func() { b.check(t) })
	return b
}

// check fails the test on anything the page must never do.
func (b *browser) check(t *testing.T) {
	b.collectLong(t)
	b.mu.Lock()
	defer b.mu.Unlock()
	for _, p := range b.problems {
		t.Errorf("browser: %s", p)
	}
	// Start-up (instantiating the page's wasm, starting the Go runtime and
	// the first drawing) is split into tasks too (web/start.js,
	// app/startup); it is held to the same limit as everything after.
	for _, d := range append(b.startup, b.long...) {
		if d > 200 {
			t.Errorf("a main-thread task took %.0f ms (limit 200 ms)", d)
		}
	}
	if len(b.longAt) > 0 || testing.Verbose() {
		t.Logf("long tasks over 200 ms: %v; page steps: %v", b.longAt, b.marks)
	}
	if len(b.startup) > 0 {
		sort.Float64s(b.startup)
		t.Logf("start-up long tasks (before the page is ready): %v ms; by page load: %s", b.startup, strings.Join(b.byLoad, "; "))
	}
	if len(b.long) > 0 {
		sort.Float64s(b.long)
		t.Logf("main-thread long tasks (> 50 ms): %d, longest %.0f ms", len(b.long), b.long[len(b.long)-1])
	}
	for _, r := range b.origin.requests("") {
		if r.Method != http.MethodGet {
			t.Errorf("non-GET request %s %s", r.Method, r.Path)
		}
		// app-worker.js is the browser's own update check of the service
		// worker, which it makes on its own schedule past the page; it
		// carries nothing and the page does not ask for it
		if r.Phase == "analysis" && r.Path != prefix+"app-worker.js" {
			t.Errorf("request during an analysis: %s %s at %s", r.Method, r.Path, r.At.Format("15:04:05.000"))
		}
	}
	b.proxy.mu.Lock()
	defer b.proxy.mu.Unlock()
	for _, f := range b.proxy.foreign {
		t.Errorf("request to another origin: %s", f)
	}
	if len(b.proxy.vendor) > 0 {
		t.Logf("Chromium's own background requests (refused, not the page's): %v", b.proxy.vendor)
	}
}

// collectLong reads the long tasks of the current document.
func (b *browser) collectLong(t *testing.T) {
	var ds [][2]float64
	s, err := chromedp.Run(b.ctx, chromedp.Evaluate[string](`JSON.stringify(window.__amplinkLong || [])`))
	if err != nil {
		return
	}
	json.Unmarshal([]byte(s), &ds)
	var csp []string
	if c, err := chromedp.Run(b.ctx, chromedp.Evaluate[string](`JSON.stringify(window.__amplinkCSP || [])`)); err == nil {
		json.Unmarshal([]byte(c), &csp)
	}
	chromedp.Run(b.ctx, chromedp.Evaluate[chromedp.Void](`window.__amplinkCSP = []`))
	if m, err := chromedp.Run(b.ctx, chromedp.Evaluate[string](`JSON.stringify(performance.getEntriesByType("mark").map(e => e.name + " " + Math.round(e.startTime)))`)); err == nil {
		b.mu.Lock()
		b.marks = append(b.marks, m)
		b.mu.Unlock()
	}
	ready, _ := chromedp.Run(b.ctx, chromedp.Evaluate[float64](`(performance.getEntriesByName("amplink-ready")[0] || {startTime: 1e12}).startTime`))
	b.mu.Lock()
	for _, v := range csp {
		b.problems = append(b.problems, "Content-Security-Policy violation: "+v)
	}
	var mine []string
	for _, d := range ds {
		if d[1] < ready {
			b.startup = append(b.startup, d[0])
			mine = append(mine, fmt.Sprintf("%.0f", d[0]))
		} else {
			b.long = append(b.long, d[0])
		}
		if d[0] > 200 {
			b.longAt = append(b.longAt, fmt.Sprintf("%.0f ms at %.0f ms", d[0], d[1]))
		}
	}
	if len(mine) > 0 {
		b.loads++
		b.byLoad = append(b.byLoad, fmt.Sprintf("#%d: %s", b.loads, strings.Join(mine, " ")))
	}
	b.mu.Unlock()
	chromedp.Run(b.ctx, chromedp.Evaluate[chromedp.Void](`window.__amplinkLong = []`))
}

// open navigates to the site (plus a fragment) and waits until the page
// has mounted; it returns the time from navigation to ready.
func (b *browser) open(t *testing.T, fragment string) time.Duration {
	t.Helper()
	b.collectLong(t)
	if err := chromedp.Do(b.ctx, chromedp.Navigate("about:blank")); err != nil {
		t.Fatal(err)
	}
	start := time.Now()
	if err := chromedp.Do(b.ctx, chromedp.Navigate(b.base+fragment)); err != nil {
		t.Fatal(err)
	}
	b.waitState(t, "ready", 60*time.Second)
	b.mark(t, "ready")
	return time.Since(start)
}

func (b *browser) state(t *testing.T) string {
	s, _ := chromedp.Run(b.ctx, chromedp.Evaluate[string](`(document.getElementById("status") || {dataset: {}}).dataset.state || ""`))
	return s
}

// waitState polls #status[data-state] until it is want.
func (b *browser) waitState(t *testing.T, want string, timeout time.Duration) {
	t.Helper()
	expr := fmt.Sprintf(`(() => { const e = document.getElementById("status"); return !!e && e.dataset.state === %q; })()`, want)
	deadline := time.Now().Add(timeout)
	for {
		_, err := chromedp.Run(b.ctx, chromedp.Poll[bool](expr, chromedp.WithPollingTimeout(time.Until(deadline)), chromedp.WithPollingInterval(20*time.Millisecond)))
		if err == nil {
			return
		}
		// a navigation (a reload of the page) destroys the context the
		// poll runs in; poll again in the new one
		if (strings.Contains(err.Error(), "Cannot find context") || strings.Contains(err.Error(), "navigated or closed")) && time.Now().Before(deadline) {
			continue
		}
		t.Fatalf("waiting for state %q (now %q, error %q): %v", want, b.state(t), b.text(t, "#run-error"), err)
	}
}

// click activates a button as a keyboard user does (focus, then the
// button's click): a pointer click lands where the button was when its box
// was measured, and the page may still be moving under it (a form or a
// table just redrawn above it), so it would miss now and then.
func (b *browser) click(t *testing.T, id string) {
	t.Helper()
	js := fmt.Sprintf(`(() => { const e = document.getElementById(%q); if (!e || e.disabled) return false; e.focus(); e.click(); return true; })()`, id)
	ok, err := chromedp.Run(b.ctx, chromedp.Evaluate[bool](js))
	if err != nil || !ok {
		t.Fatalf("click #%s: no such enabled button (%v)", id, err)
	}
}

func (b *browser) text(t *testing.T, sel string) string {
	s, _ := chromedp.Run(b.ctx, chromedp.Evaluate[string](fmt.Sprintf(`(document.querySelector(%q) || {textContent: ""}).textContent`, sel)))
	return s
}

// pick gives files to the page's file input, as choosing them in the
// file dialog does.
func (b *browser) pick(t *testing.T, paths []string) {
	t.Helper()
	if err := chromedp.Do(b.ctx, chromedp.SetUploadFiles(chromedp.ID("file-input"), paths)); err != nil {
		t.Fatal(err)
	}
}

// setField types a value into a form input and commits it (change event).
func (b *browser) setField(t *testing.T, id, value string) {
	t.Helper()
	js := fmt.Sprintf(`(() => { const e = document.getElementById(%q); if (!e) return false; e.value = %q; e.dispatchEvent(new Event("change", {bubbles: true})); return true; })()`, id, value)
	ok, err := chromedp.Run(b.ctx, chromedp.Evaluate[bool](js))
	if err != nil || !ok {
		t.Fatalf("set #%s: %v", id, err)
	}
}

// formValues reads every recipe input of the page.
func (b *browser) formValues(t *testing.T) map[string]string {
	t.Helper()
	s, err := chromedp.Run(b.ctx, chromedp.Evaluate[string](`JSON.stringify(Object.fromEntries(
		[...document.querySelectorAll("[id^='f-']")].map(e => [e.id, e.type === "checkbox" ? String(e.checked) : e.value])))`))
	if err != nil {
		t.Fatal(err)
	}
	m := map[string]string{}
	json.Unmarshal([]byte(s), &m)
	return m
}

// pageTable is the results table as the page shows it: R holds each
// cell's full value (its title when the page shows it rounded), S the text
// shown; the analyses' heading rows are left out.
type pageTable struct {
	H []string   `json:"h"`
	R [][]string `json:"r"`
	S [][]string `json:"s"`
}

func (b *browser) table(t *testing.T) pageTable {
	t.Helper()
	s, err := chromedp.Run(b.ctx, chromedp.Evaluate[string](`(() => {
		const rows = [...document.querySelectorAll("#results tbody tr:not(.group)")];
		const shown = td => [...td.childNodes].filter(n => n.nodeType === 3).map(n => n.textContent).join("").trim();
		return JSON.stringify({
			h: [...document.querySelectorAll("#results thead th")].map(e => e.textContent),
			r: rows.map(tr => [...tr.children].map(td => td.hasAttribute("title") ? td.getAttribute("title") : shown(td))),
			s: rows.map(tr => [...tr.children].map(shown))});
	})()`))
	if err != nil {
		t.Fatal(err)
	}
	var pt pageTable
	if err := json.Unmarshal([]byte(s), &pt); err != nil {
		t.Fatal(err)
	}
	return pt
}

// runAnalysis clicks Run and waits for the results; no request may reach
// the server meanwhile.
func (b *browser) runAnalysis(t *testing.T, timeout time.Duration) time.Duration {
	t.Helper()
	b.origin.setPhase("analysis")
	start := time.Now()
	b.mark(t, "run")
	b.click(t, "run-analysis")
	b.waitState(t, "running", 10*time.Second)
	b.waitState(t, "done", timeout)
	b.mark(t, "done")
	d := time.Since(start)
	b.origin.setPhase("idle")
	return d
}

// requiredColumns are the results columns DESIGN.md fixes.
var requiredColumns = []string{"analysis", "type", "seed", "target", "method", "n", "r", "p"}

func checkHeader(t *testing.T, h []string) {
	t.Helper()
	if len(h) < len(requiredColumns) {
		t.Fatalf("header %v: want it to start with %v", h, requiredColumns)
	}
	for i, c := range requiredColumns {
		if h[i] != c {
			t.Fatalf("header %v: column %d is %q, want %q", h, i, h[i], c)
		}
	}
}

// compareNative checks the page's rows against pipeline.Run on the same data
// (the native core): same rows, r equal to 1e-9.
func compareNative(t *testing.T, pt pageTable, res *report.Results) {
	t.Helper()
	if len(pt.R) != len(res.Rows) {
		t.Fatalf("page has %d rows, native run %d", len(pt.R), len(res.Rows))
	}
	rc := -1
	for i, h := range pt.H {
		if h == "r" {
			rc = i
		}
	}
	for i, row := range pt.R {
		want := res.Rows[i]
		k := fmt.Sprintf("row %d (%s, %s → %s)", i+1, want.Analysis, want.Seed, want.Target)
		if row[0] != want.Analysis || row[2] != want.Seed || row[3] != want.Target {
			t.Errorf("%s: page has %v", k, row[:4])
			continue
		}
		if row[rc] == "" {
			if !math.IsNaN(want.R) {
				t.Errorf("%s: page r empty, native %g", k, want.R)
			}
			continue
		}
		got, err := strconv.ParseFloat(row[rc], 64)
		if err != nil {
			t.Errorf("%s: r %q: %v", k, row[rc], err)
			continue
		}
		if math.Abs(got-want.R) > 1e-9 {
			t.Errorf("%s: page r = %.12g, native r = %.12g", k, got, want.R)
		}
	}
}

func nativeRun(t *testing.T, recipeJSON []byte, src wire.Source, files job.Files) *report.Results {
	t.Helper()
	r, err := recipe.Parse(recipeJSON)
	if err != nil {
		t.Fatal(err)
	}
	ds, err := job.Open(r, src, files)
	if err != nil {
		t.Fatal(err)
	}
	res, err := pipeline.Run(context.Background(), r, ds, nil)
	if err != nil {
		t.Fatal(err)
	}
	return res
}

// writeTrialsCSV writes a small epoched CSV (trial,time,C4,Pz; 250 Hz, 24
// trials of −2…2.5 s) whose C4 beta power before 0 s and Pz delta power
// after it rise and fall together across trials.
func writeTrialsCSV(t *testing.T, dir string) (string, []byte) {
	t.Helper()
	path := filepath.Join(dir, "fixture_trials.csv")
	f, err := os.Create(path)
	if err != nil {
		t.Fatal(err)
	}
	w := bufio.NewWriter(f)
	fmt.Fprintln(w, "trial,time,C4,Pz")
	const rate = 250.0
	for tr := 0; tr < 24; tr++ {
		a := 1 + float64((tr*7)%11)/5 // trial gain, shared by both bursts
		for k := 0; k <= 1125; k++ {
			tm := -2 + float64(k)/rate
			noise := math.Sin(float64(k*13+tr*101)) * 0.3
			c4 := noise + a*math.Sin(2*math.Pi*20*tm)*math.Exp(-sq((tm+0.3)/0.15))
			pz := noise*0.7 + a*math.Sin(2*math.Pi*2.5*tm)*math.Exp(-sq((tm-0.55)/0.3))
			fmt.Fprintf(w, "%d,%s,%.6f,%.6f\n", tr+1, strconv.FormatFloat(tm, 'f', 3, 64), c4, pz)
		}
	}
	if err := w.Flush(); err != nil {
		t.Fatal(err)
	}
	f.Close()
	b, err := os.ReadFile(path)
	if err != nil {
		t.Fatal(err)
	}
	return path, b
}

func sq(x float64) float64 { return x * x }

// loadDemo loads the demo and waits until it is ready (the state may
// already read "loaded" from the recording before, so the summary is
// checked too).
func (b *browser) loadDemo(t *testing.T) {
	t.Helper()
	b.click(t, "load-demo")
	if _, err := chromedp.Run(b.ctx, chromedp.Poll[bool](`document.getElementById("status").dataset.state === "loaded" && (document.querySelector("#summary") || {textContent: ""}).textContent.includes("the demo:") && !document.getElementById("run-analysis").disabled`, chromedp.WithPollingTimeout(60*time.Second))); err != nil {
		t.Fatalf("the demo did not load: %v", err)
	}
}

// shot keeps a picture of the page as DIR/NAME.png when AMPLINK_SHOTS=DIR
// is set, to look at.
func (b *browser) shot(t *testing.T, name string) {
	dir := os.Getenv("AMPLINK_SHOTS")
	if dir == "" {
		return
	}
	if png, err := chromedp.Run(b.ctx, chromedp.FullScreenshot(90)); err == nil {
		os.WriteFile(filepath.Join(dir, name+".png"), png, 0o644)
	}
	// and each step on its own, at full size
	for n := 1; n <= 5; n++ {
		sel := fmt.Sprintf("section[aria-labelledby=step-%d]", n)
		if png, err := chromedp.Run(b.ctx, chromedp.Screenshot(chromedp.CSS(sel))); err == nil {
			os.WriteFile(filepath.Join(dir, fmt.Sprintf("%s-step%d.png", name, n)), png, 0o644)
		}
	}
}

// watchProgress records, from now on, every state of the progress line:
// its phase, its text, and whether the bar is full.
func (b *browser) watchProgress(t *testing.T) {
	t.Helper()
	_, err := chromedp.Run(b.ctx, chromedp.Evaluate[bool](`(() => {
		window.__amplinkProgress = [];
		const note = () => {
			const bar = document.getElementById("progress"), txt = document.getElementById("progress-text");
			if (!bar || !txt) return;
			const full = bar.hasAttribute("value") && bar.max > 0 && bar.value >= bar.max;
			const rec = [txt.dataset.phase || "", txt.textContent, full, performance.now()];
			const last = window.__amplinkProgress[window.__amplinkProgress.length - 1];
			if (!last || last[0] !== rec[0] || last[1] !== rec[1] || last[2] !== rec[2]) window.__amplinkProgress.push(rec);
		};
		window.__amplinkProgressObs = new MutationObserver(note);
		window.__amplinkProgressObs.observe(document.body, {subtree: true, childList: true, attributes: true, characterData: true});
		note();
		return true;
	})()`))
	if err != nil {
		t.Fatal(err)
	}
}

// checkProgress checks what watchProgress saw: the phases of a run in
// order, a count of units while computing, a full bar only once the
// units are all done and never while combining, and never "not running"
// beside a full bar.
func (b *browser) checkProgress(t *testing.T) {
	t.Helper()
	s, err := chromedp.Run(b.ctx, chromedp.Evaluate[string](`(window.__amplinkProgressObs && window.__amplinkProgressObs.disconnect(), JSON.stringify(window.__amplinkProgress || []))`))
	if err != nil {
		t.Fatal(err)
	}
	var recs [][]any
	json.Unmarshal([]byte(s), &recs)
	seen := map[string]bool{}
	var lines []string
	for _, r := range recs {
		phase, text, full := r[0].(string), r[1].(string), r[2].(bool)
		seen[phase] = true
		lines = append(lines, fmt.Sprintf("%.0f %s %q full=%v", r[3].(float64), phase, text, full))
		if full && (phase == "" || strings.Contains(text, "not running") || strings.Contains(text, "idle")) {
			t.Errorf("a full bar beside %q", text)
		}
		if full && (phase == "combining" || phase == "packing" || phase == "reading") {
			t.Errorf("a full bar while %s (%q)", phase, text)
		}
		if phase == "computing" && !strings.Contains(text, " of ") && text != "Computing…" {
			t.Errorf("computing without a count: %q", text)
		}
	}
	for _, ph := range []string{"reading", "computing", "combining"} {
		if !seen[ph] {
			t.Errorf("the run never showed the %s phase; progress: %s", ph, strings.Join(lines, "; "))
		}
	}
	if testing.Verbose() {
		t.Logf("progress: %s", strings.Join(lines, "; "))
	}
}

// logMarks logs the page's own timing marks of the last run: load (the
// recording built or read), run (Run to the drawn table), the units, and
// combining (all units in to the results back).
func (b *browser) logMarks(t *testing.T, what string) {
	s, _ := chromedp.Run(b.ctx, chromedp.Evaluate[string](`JSON.stringify(Object.fromEntries(performance.getEntriesByType("mark").map(m => [m.name, m.startTime])))`))
	m := map[string]float64{}
	json.Unmarshal([]byte(s), &m)
	sec := func(a, z string) string {
		if m[a] == 0 || m[z] == 0 {
			return "?"
		}
		return fmt.Sprintf("%.1f s", (m[z]-m[a])/1000)
	}
	// the longest main-thread task while the workers computed (Run to the
	// last unit in), and while they combined and drew (to the results)
	busy, _ := chromedp.Run(b.ctx, chromedp.Evaluate[[]float64](fmt.Sprintf(`[[%[1]g, %[2]g], [%[2]g, %[3]g]].map(([a, z]) => (window.__amplinkLong || []).filter(e => e[1] >= a && e[1] < z).reduce((m, e) => Math.max(m, e[0]), 0))`,
		m["amplink-run"], m["amplink-units"], m["amplink-results"])))
	if len(busy) != 2 {
		busy = []float64{-1, -1}
	}
	t.Logf("timing: %s: run %s (units %s, combining %s, drawing %s); worker: %s; %d workers; longest main-thread task (of those over 50 ms) while computing %.0f ms, while combining %.0f ms", what,
		sec("amplink-run", "amplink-done"), sec("amplink-run", "amplink-units"), sec("amplink-units", "amplink-results"),
		sec("amplink-results", "amplink-done"), b.text(t, "#run-timings"), workers(b), busy[0], busy[1])
}

// workers is how many workers the page starts: one per core it sees.
func workers(b *browser) int {
	n, _ := chromedp.Run(b.ctx, chromedp.Evaluate[int](`navigator.hardwareConcurrency`))
	return max(1, n)
}

// sameCell compares two results cells: equal text, or numbers equal to a
// relative 1e-9.
func sameCell(a, b string) bool {
	if a == b {
		return true
	}
	x, ex := strconv.ParseFloat(a, 64)
	y, ey := strconv.ParseFloat(b, 64)
	return ex == nil && ey == nil && math.Abs(x-y) <= 1e-9*math.Max(math.Abs(x), math.Abs(y))
}

// sameTable compares two results.csv texts apart from row order: the same
// header, and the rows, ordered by their text, cell by cell (sameCell).
func sameTable(a, b []byte) error {
	ta, err := app.ParseTable(string(a))
	if err != nil {
		return err
	}
	tb, err := app.ParseTable(string(b))
	if err != nil {
		return err
	}
	if !slices.Equal(ta.Header, tb.Header) {
		return fmt.Errorf("header %v, want %v", ta.Header, tb.Header)
	}
	if len(ta.Rows) != len(tb.Rows) {
		return fmt.Errorf("%d rows, want %d", len(ta.Rows), len(tb.Rows))
	}
	key := func(r []string) string {
		// the identifying columns: analysis, type, seed, target, and
		// condition or cluster where present
		k := strings.Join(r[:4], ",")
		for _, name := range []string{"condition", "cluster"} {
			if c := ta.Col(name); c >= 0 && c < len(r) {
				k += "," + r[c]
			}
		}
		return k
	}
	sort.SliceStable(ta.Rows, func(i, j int) bool { return key(ta.Rows[i]) < key(ta.Rows[j]) })
	sort.SliceStable(tb.Rows, func(i, j int) bool { return key(tb.Rows[i]) < key(tb.Rows[j]) })
	for i := range ta.Rows {
		for j := range ta.Header {
			if !sameCell(ta.Rows[i][j], tb.Rows[i][j]) {
				return fmt.Errorf("row %s, %s: %q, want %q", key(ta.Rows[i]), ta.Header[j], ta.Rows[i][j], tb.Rows[i][j])
			}
		}
	}
	return nil
}

// sigDigits counts the significant digits of a number as written.
func sigDigits(s string) int {
	s = strings.TrimLeft(strings.TrimPrefix(s, "-"), "0.")
	if i := strings.IndexAny(s, "eE"); i >= 0 {
		s = s[:i]
	}
	return len(strings.ReplaceAll(s, ".", ""))
}

// checkPrecision: no number the table shows has more than 5 significant
// digits, and every rounded cell keeps its full value in its title.
func checkPrecision(t *testing.T, pt pageTable) {
	t.Helper()
	bad := 0
	for i, row := range pt.S {
		for j, cell := range row {
			if _, err := strconv.ParseFloat(cell, 64); err != nil {
				continue
			}
			if n := sigDigits(cell); n > 5 && bad < 5 {
				bad++
				t.Errorf("row %d, %s: %q has %d significant digits", i+1, pt.H[j], cell, n)
			}
		}
	}
}

// trialsRecipe suits the trials CSV: C4 beta before the event against
// delta after it on every channel.
const trialsRecipe = `{
  "spectral": {"method": "wavelet", "low": 2, "high": 40, "steps": 20, "spacing": "log", "cycles": [3, 8]},
  "analyses": [
    {"id": "fixture", "type": "trial-window", "method": "spearman",
     "seed":   {"channel": "C4", "time": [-0.5, -0.1], "freq": [15, 25]},
     "target": {"channel": "*",  "time": [0.3, 0.8],   "freq": [1.5, 3.5]},
     "permutations": 200, "randomSeed": 11, "correction": "fdr"}
  ]
}`

// TestBrowser is the page as a user meets it, end to end in Chromium.
func TestBrowser(t *testing.T) {
	if testing.Short() {
		t.Skip("drives a browser")
	}
	if _, err := exec.LookPath("go"); err != nil {
		if os.Getenv("CI") == "true" {
			t.Fatal("CI: the Go toolchain is needed to build the site")
		}
		t.Skip("needs the Go toolchain to build the site")
	}
	b := newBrowser(t)
	ready := b.open(t, "")
	t.Logf("timing: page load to ready %v (first visit)", ready.Round(time.Millisecond))
	// let the service worker finish caching before anything is measured
	if _, err := chromedp.Run(b.ctx, chromedp.Evaluate[bool](`navigator.serviceWorker.ready.then(() => true)`, chromedp.EvalAwaitPromise)); err != nil {
		t.Fatal(err)
	}
	b.origin.setPhase("idle")

	t.Run("order", func(t *testing.T) {
		// on the bare page Run and the identity check wait for a recording,
		// and say so; they stay disabled while the demo is built, and the
		// reason goes once it is loaded, with no message left behind
		waiting := func() (string, bool) {
			s, _ := chromedp.Run(b.ctx, chromedp.Evaluate[string](`JSON.stringify([document.getElementById("run-analysis").disabled,
				document.getElementById("identity-check").disabled, (document.getElementById("run-wait") || {textContent: ""}).textContent])`))
			var v []any
			json.Unmarshal([]byte(s), &v)
			if len(v) != 3 {
				return "", false
			}
			return v[2].(string), v[0].(bool) && v[1].(bool)
		}
		if why, off := waiting(); !off || !strings.Contains(why, "recording") {
			t.Errorf("bare page: Run and Identity check disabled %v, reason %q", off, why)
		}
		if s := b.text(t, "#run-error"); s != "" {
			t.Errorf("bare page shows a run error %q", s)
		}
		b.shot(t, "bare")
		b.click(t, "load-demo")
		if why, off := waiting(); !off || why == "" {
			t.Errorf("while the demo is built: Run disabled %v, reason %q", off, why)
		}
		b.waitState(t, "loaded", 60*time.Second)
		if why, off := waiting(); off || why != "" {
			t.Errorf("demo loaded: Run still disabled (%q)", why)
		}
		if s := b.text(t, "#run-error") + b.text(t, ".field.invalid"); s != "" {
			t.Errorf("demo loaded: a stale message %q", s)
		}
		// the demo explains itself, and says what was loaded
		sum := b.text(t, "#summary")
		for _, w := range []string{"continuous recording, cut into 180 epochs", "What the demo holds", "r ≈ 0.4 at Pz"} {
			if !strings.Contains(sum, w) {
				t.Errorf("demo summary lacks %q: %q", w, sum)
			}
		}
	})

	t.Run("demo", func(t *testing.T) {
		if b.state(t) != "loaded" {
			b.click(t, "load-demo")
			b.waitState(t, "loaded", 60*time.Second)
		}
		b.watchProgress(t)
		d := b.runAnalysis(t, 180*time.Second)
		t.Logf("timing: demo analysis wall time %v", d.Round(time.Millisecond))
		b.logMarks(t, "demo")
		b.checkProgress(t)
		pt := b.table(t)
		checkHeader(t, pt.H)
		if len(pt.R) == 0 {
			t.Fatal("no result rows")
		}
		native := nativeRun(t, demo.Recipe(), wire.Source{Demo: true}, nil)
		job.AddRecording(native, "demo")
		compareNative(t, pt, native)
		checkPrecision(t, pt)
		// the demo's own recipe raises no caution
		warn, _ := chromedp.Run(b.ctx, chromedp.Evaluate[string](`[...document.querySelectorAll(".warnings")].map(e => e.textContent).join(" ")`))
		if strings.Contains(strings.Join(native.Warnings, " "), "runs past") || strings.Contains(warn, "runs past the epoch edge") {
			t.Errorf("the demo recipe raises cautions: %v (page: %q)", native.Warnings, warn)
		}
		// rows are grouped under each analysis's question, with which p
		// the rows report; significant rows are marked
		groups, _ := chromedp.Run(b.ctx, chromedp.Evaluate[string](`[...document.querySelectorAll("#results tr.group")].map(e => e.textContent).join("\n")`))
		for _, w := range []string{"beta-to-delta Across trials, does C4 15–25 Hz power", "p: t approximation", "n_eff drives p", "p_surr: surrogate p"} {
			if !strings.Contains(groups, w) {
				t.Errorf("group headings lack %q:\n%s", w, groups)
			}
		}
		if n, _ := chromedp.Run(b.ctx, chromedp.Evaluate[int](`document.querySelectorAll("#results tr.sig .mark").length`)); n == 0 {
			t.Error("no row is marked significant (the demo's beta-to-delta Pz row is)")
		}
		// the main columns are shown; asked, every column of results.csv
		header, _ := native.Table()
		if len(pt.H) >= len(header) {
			t.Errorf("the page shows all %d columns by default; it should show the main ones", len(header))
		}
		// the click is handled on go-app's loop: wait for the new header
		// (drawn together with the state "drawing"), then for the rows
		columns := func(n int) {
			t.Helper()
			if _, err := chromedp.Run(b.ctx, chromedp.Poll[bool](fmt.Sprintf(`document.querySelectorAll("#results thead th").length === %d`, n), chromedp.WithPollingTimeout(10*time.Second))); err != nil {
				t.Fatalf("the table did not get %d columns: %v", n, err)
			}
			b.waitState(t, "done", 20*time.Second)
		}
		b.click(t, "all-columns")
		columns(len(header))
		if all := b.table(t); !slices.Equal(all.H, header) || len(all.R) != len(pt.R) {
			t.Errorf("every column: %d columns and %d rows, want %d and %d", len(all.H), len(all.R), len(header), len(pt.R))
		}
		b.click(t, "all-columns")
		columns(len(pt.H))
		if back := b.table(t); !slices.Equal(back.H, pt.H) {
			t.Errorf("main columns again: %v, want %v", back.H, pt.H)
		}
		// every figure is shown and every download is offered as a Blob
		s, err := chromedp.Run(b.ctx, chromedp.Evaluate[string](`JSON.stringify({
			figs: document.querySelectorAll(".thumb img.svgimg").length,
			links: [...document.querySelectorAll("a[download]")].filter(a => a.href.startsWith("blob:")).map(a => a.getAttribute("download"))})`))
		if err != nil {
			t.Fatal(err)
		}
		var got struct {
			Figs  int
			Links []string
		}
		json.Unmarshal([]byte(s), &got)
		if got.Figs != len(native.Figures) {
			t.Errorf("%d figures shown, the run made %d", got.Figs, len(native.Figures))
		}
		// AMPLINK_SCREENSHOT=file.png keeps a picture of the page, to look at
		if shot := os.Getenv("AMPLINK_SCREENSHOT"); shot != "" {
			if png, err := chromedp.Run(b.ctx, chromedp.FullScreenshot(100)); err == nil {
				os.WriteFile(shot, png, 0o644)
			}
		}
		// open the first figure: it draws at the width of the column
		if len(native.Figures) > 0 {
			if _, err := chromedp.Run(b.ctx, chromedp.Evaluate[bool](`document.querySelector(".thumb").click(), true`)); err != nil {
				t.Fatal(err)
			}
			if _, err := chromedp.Run(b.ctx, chromedp.Poll[bool](`(() => { const i = document.querySelector("#figure-large svg"); return !!i && i.getBoundingClientRect().width > 800 && !!i.querySelector("title"); })()`, chromedp.WithPollingTimeout(20*time.Second))); err != nil {
				t.Errorf("the first figure did not draw large: %v", err)
			}
			b.shot(t, "figure-large")
		}
		want := map[string]bool{"results.csv": true, "results.json": true, "recipe.json": true}
		for _, f := range native.Figures {
			want[f.Name+".svg"] = true
		}
		for _, l := range got.Links {
			delete(want, l)
		}
		if len(want) > 0 {
			t.Errorf("downloads missing: %v (offered %v)", want, got.Links)
		}
	})

	t.Run("sort", func(t *testing.T) {
		before := len(b.table(t).R)
		// keyboard: focus the r header and press Enter
		if err := chromedp.Do(b.ctx, chromedp.Focus(chromedp.CSS("#results thead th:nth-child(7)")), chromedp.KeyEvent("\r")); err != nil {
			t.Fatal(err)
		}
		if _, err := chromedp.Run(b.ctx, chromedp.Poll[bool](`document.querySelector("#results thead th:nth-child(7)").getAttribute("aria-sort") === "ascending"`, chromedp.WithPollingTimeout(5*time.Second))); err != nil {
			t.Fatalf("the r column did not sort: %v", err)
		}
		b.waitState(t, "done", 10*time.Second) // the rows are rewritten a chunk at a time
		pt := b.table(t)
		if len(pt.R) != before {
			t.Fatalf("%d rows after sorting, %d before", len(pt.R), before)
		}
		prev := math.Inf(-1)
		for _, row := range pt.R {
			if row[6] == "" {
				continue
			}
			v, _ := strconv.ParseFloat(row[6], 64)
			if v < prev {
				t.Fatalf("rows not in increasing r: %g after %g", v, prev)
			}
			prev = v
		}
	})

	// On the seed-to-all scalp map, a click on an electrode (or Enter on a
	// focused one) makes it the analysis's seed channel; the next run draws
	// the map of that seed.
	t.Run("scalp seed", func(t *testing.T) {
		const box = "#scalp-beta-to-delta_scalp_C4"
		b.mark(t, "scalp-open")
		seed := func(want string) {
			t.Helper()
			expr := `(document.getElementById("f-analyses-0-seed-channel") || {}).value === ` + strconv.Quote(want)
			if _, err := chromedp.Run(b.ctx, chromedp.Poll[bool](expr, chromedp.WithPollingTimeout(10*time.Second))); err != nil {
				t.Fatalf("the form's seed channel is %q, want %q (%v)", b.formValues(t)["f-analyses-0-seed-channel"], want, err)
			}
		}
		seed("C4")
		// open the map at full width from its thumbnail (its SVG goes into
		// the page then) and click Pz's marker where it is drawn
		open := `(() => { const t = [...document.querySelectorAll("button.thumb")].find(b => b.title.startsWith("beta-to-delta: ") && b.title.includes("with the C4 seed")); if (!t) return false; t.click(); return true; })()`
		if ok, err := chromedp.Run(b.ctx, chromedp.Evaluate[bool](open)); err != nil || !ok {
			t.Fatalf("no thumbnail of the C4 scalp map (%v)", err)
		}
		if _, err := chromedp.Run(b.ctx, chromedp.Poll[bool](`!!document.querySelector(`+strconv.Quote(box+` [data-channel="Pz"]`)+`)`, chromedp.WithPollingTimeout(10*time.Second))); err != nil {
			t.Fatalf("no clickable scalp map: %v", err)
		}
		b.mark(t, "scalp-click")
		if err := chromedp.Do(b.ctx, chromedp.Click(chromedp.CSS(box+` [data-channel="Pz"] circle`), chromedp.NodeVisible)); err != nil {
			t.Fatal(err)
		}
		seed("Pz")
		if msg := b.text(t, ".scalp-msg"); !strings.Contains(msg, "is now Pz") {
			t.Errorf("message %q", msg)
		}
		// keyboard: focus Cz and press Enter
		b.mark(t, "scalp-enter")
		if _, err := chromedp.Run(b.ctx, chromedp.Evaluate[bool](`(() => { const g = document.querySelector(`+strconv.Quote(box+` [data-channel="Cz"]`)+`); g.focus(); return document.activeElement === g; })()`)); err != nil {
			t.Fatal(err)
		}
		if err := chromedp.Do(b.ctx, chromedp.KeyEvent("\r")); err != nil {
			t.Fatal(err)
		}
		seed("Cz")
		b.runAnalysis(t, 180*time.Second)
		s, err := chromedp.Run(b.ctx, chromedp.Evaluate[string](`JSON.stringify([...document.querySelectorAll("a[download]")].map(a => a.getAttribute("download")))`))
		if err != nil {
			t.Fatal(err)
		}
		if !strings.Contains(s, `"beta-to-delta_scalp_Cz.svg"`) || strings.Contains(s, `"beta-to-delta_scalp_C4.svg"`) {
			t.Errorf("after re-seeding at Cz the figures are %s", s)
		}
		b.setField(t, "f-analyses-0-seed-channel", "C4")
		seed("C4")
	})

	t.Run("identity", func(t *testing.T) {
		b.origin.setPhase("analysis")
		b.click(t, "identity-check")
		b.waitState(t, "identity-done", 120*time.Second)
		b.origin.setPhase("idle")
		got := b.text(t, "#identity-result")
		if !strings.Contains(got, "passed") {
			t.Fatalf("identity check: %q", got)
		}
	})

	t.Run("power", func(t *testing.T) {
		b.click(t, "show-power")
		if _, err := chromedp.Run(b.ctx, chromedp.Poll[bool](`!!document.querySelector("#tf-box #plot-area")`, chromedp.WithPollingTimeout(60*time.Second))); err != nil {
			t.Fatalf("no power map: %v (%s)", err, b.text(t, ".step:nth-of-type(2) .error"))
		}
		// drag a rectangle across the middle of the plot area; the seed
		// window fields must take the mapped values
		box, err := chromedp.Run(b.ctx, chromedp.Evaluate[string](`(() => {
			document.getElementById("tf-box").scrollIntoView({block: "center"});
			return JSON.stringify(document.getElementById("plot-area").getBoundingClientRect());
		})()`))
		if err != nil {
			t.Fatal(err)
		}
		var r struct{ X, Y, Width, Height float64 }
		json.Unmarshal([]byte(box), &r)
		x0, y0 := r.X+0.25*r.Width, r.Y+0.3*r.Height
		x1, y1 := r.X+0.5*r.Width, r.Y+0.6*r.Height
		if err := chromedp.Do(b.ctx, chromedp.DragAndDropXY(x0, y0, x1, y1, 8)); err != nil {
			t.Fatal(err)
		}
		if _, err := chromedp.Run(b.ctx, chromedp.Poll[bool](`document.getElementById("f-analyses-0-seed-time-0").value !== "-0.5"`, chromedp.WithPollingTimeout(5*time.Second))); err != nil {
			t.Fatalf("the drag did not set the seed window: %v (page says %q)", err, b.text(t, "#drag-msg"))
		}
		v := b.formValues(t)
		t0, _ := strconv.ParseFloat(v["f-analyses-0-seed-time-0"], 64)
		t1, _ := strconv.ParseFloat(v["f-analyses-0-seed-time-1"], 64)
		f0, _ := strconv.ParseFloat(v["f-analyses-0-seed-freq-0"], 64)
		f1, _ := strconv.ParseFloat(v["f-analyses-0-seed-freq-1"], 64)
		if !(t0 < t1 && f0 < f1) {
			t.Fatalf("seed window from the drag: %g–%g s, %g–%g Hz", t0, t1, f0, f1)
		}
		t.Logf("dragged seed window: %g–%g s, %g–%g Hz", t0, t1, f0, f1)
	})

	t.Run("file", func(t *testing.T) {
		// a recording and a recipe given together: the recipe fills the
		// form, the recording is summarised, and Run analyses it
		dir := t.TempDir()
		path, data := writeTrialsCSV(t, dir)
		recipePath := filepath.Join(dir, "fixture-recipe.json")
		if err := os.WriteFile(recipePath, []byte(trialsRecipe), 0o644); err != nil {
			t.Fatal(err)
		}
		b.pick(t, []string{path, recipePath})
		name := filepath.Base(path)
		if _, err := chromedp.Run(b.ctx, chromedp.Poll[bool](fmt.Sprintf(`(document.querySelector("#summary") || {textContent: ""}).textContent.includes(%q)`, name), chromedp.WithPollingTimeout(60*time.Second))); err != nil {
			t.Fatalf("no summary of %s: %v (%s)", name, err, b.text(t, ".step .error"))
		}
		b.waitState(t, "loaded", 60*time.Second)
		if s := b.text(t, "#summary"); !strings.Contains(s, "24 trials") || !strings.Contains(s, "C4") {
			t.Fatalf("summary: %q", s)
		}
		if v := b.formValues(t); v["f-analyses-0-id"] != "fixture" || v["f-spectral-high"] != "40" {
			t.Fatalf("the recipe did not fill the form: %v", v)
		}
		b.runAnalysis(t, 120*time.Second)
		pt := b.table(t)
		checkHeader(t, pt.H)
		if len(pt.R) == 0 {
			t.Fatal("no result rows")
		}
		compareNative(t, pt, nativeRun(t, []byte(trialsRecipe), wire.Source{Name: name}, job.Files{name: format.Bytes(name, data)}))

		// a recipe dropped on its own, with a recording open, runs at once
		b.origin.setPhase("analysis")
		b.pick(t, []string{recipePath})
		b.waitState(t, "running", 20*time.Second)
		b.waitState(t, "done", 120*time.Second)
		b.origin.setPhase("idle")
		if got := b.table(t); len(got.R) != len(pt.R) {
			t.Errorf("the re-run gave %d rows, the first run %d", len(got.R), len(pt.R))
		}
	})

	t.Run("edf", func(t *testing.T) {
		// the demo's EDF+ with its trials and events tables, under names
		// that say nothing of what they are, picked together as a user
		// picks their own: each is recognised by its content; the power
		// shows on the fresh form; the demo recipe, dropped next, runs
		// with the rows amplink run gives; the archive is laid out as
		// amplink run --out and amplink merge takes its results.csv
		src := t.TempDir()
		var so, se bytes.Buffer
		if err := run(&so, &se, []string{"demo", "--out", src}); err != nil {
			t.Fatalf("demo: %v %s", err, se.String())
		}
		dir := t.TempDir()
		cp := func(from, to string) string {
			b, err := os.ReadFile(filepath.Join(src, from))
			if err != nil {
				t.Fatal(err)
			}
			p := filepath.Join(dir, to)
			if err := os.WriteFile(p, b, 0o644); err != nil {
				t.Fatal(err)
			}
			return p
		}
		edfPath := cp("demo_edf.edf", "session.edf")
		trialsPath := cp("demo_edf_trials.csv", "per-trial.csv")
		eventsPath := cp("demo_continuous_events.tsv", "markers.tsv")
		recipePath := cp("recipe.json", "settings.json")
		cliOut := t.TempDir()
		if err := run(&so, &se, []string{"run", "--recipe", recipePath, "--events", eventsPath, "--trials", trialsPath, "--out", cliOut, edfPath}); err != nil {
			t.Fatalf("amplink run: %v %s", err, se.String())
		}

		b.pick(t, []string{trialsPath, edfPath, eventsPath})
		b.waitState(t, "loaded", 60*time.Second)
		roles, _ := chromedp.Run(b.ctx, chromedp.Evaluate[string](`JSON.stringify([...document.querySelectorAll("#file-roles select")].map(e => e.dataset.file + "=" + e.value))`))
		if want := `["per-trial.csv=trials","session.edf=recording","markers.tsv=events"]`; roles != want {
			t.Errorf("files taken as %s, want %s", roles, want)
		}
		if s := b.text(t, "#summary"); !strings.Contains(s, "session.edf") || !strings.Contains(s, "tone × 180") {
			t.Errorf("summary %q", s)
		}
		// the power, before any analysis is described
		b.click(t, "show-power")
		if _, err := chromedp.Run(b.ctx, chromedp.Poll[bool](`!!document.querySelector("#tf-box #plot-area") || !!document.getElementById("power-error")`, chromedp.WithPollingTimeout(60*time.Second))); err != nil {
			t.Fatalf("no power map on the fresh form: %v", err)
		}
		if e := b.text(t, "#power-error"); e != "" {
			t.Fatalf("Show power on the fresh form: %q", e)
		}
		b.shot(t, "edf-power")

		// the recipe on its own: it fills the form and runs at once
		b.origin.setPhase("analysis")
		b.watchProgress(t)
		b.pick(t, []string{recipePath})
		b.waitState(t, "running", 20*time.Second)
		b.waitState(t, "done", 240*time.Second)
		b.origin.setPhase("idle")
		b.logMarks(t, "demo recipe on the EDF")
		b.checkProgress(t)
		b.shot(t, "edf-results")

		cliCSV, err := os.ReadFile(filepath.Join(cliOut, "results.csv"))
		if err != nil {
			t.Fatal(err)
		}
		cli, err := app.ParseTable(string(cliCSV))
		if err != nil {
			t.Fatal(err)
		}
		// the page's rows are the CLI's: text equal, numbers equal to 1e-9
		// (the core compiled to wasm rounds a few last bits differently)
		pt := b.table(t)
		if len(pt.R) != len(cli.Rows) {
			t.Fatalf("page %d rows, amplink run %d", len(pt.R), len(cli.Rows))
		}
		for i, row := range pt.R {
			for j, h := range pt.H {
				c := cli.Col(h)
				if c < 0 {
					t.Fatalf("page column %s is not in the CLI's results.csv", h)
				}
				if !sameCell(row[j], cli.Rows[i][c]) {
					t.Errorf("row %d, %s: page %q, amplink run %q", i+1, h, row[j], cli.Rows[i][c])
				}
			}
		}

		// one archive of everything, as amplink run --out lays it out
		dl := t.TempDir()
		if _, err := chromedp.Call(b.ctx, cdpbrowser.SetDownloadBehavior, cdpbrowser.SetDownloadBehaviorParams{Behavior: cdpbrowser.SetDownloadBehaviorBehaviorAllow, DownloadPath: dl}); err != nil {
			t.Fatal(err)
		}
		b.click(t, "download-all")
		zipPath := filepath.Join(dl, "amplink-results.zip")
		var zr *zip.ReadCloser
		for end := time.Now().Add(20 * time.Second); time.Now().Before(end); time.Sleep(200 * time.Millisecond) {
			if zr, err = zip.OpenReader(zipPath); err == nil {
				break
			}
		}
		if zr == nil {
			t.Fatalf("no archive downloaded: %v", err)
		}
		defer zr.Close()
		var inZip []string
		files := map[string][]byte{}
		for _, f := range zr.File {
			inZip = append(inZip, f.Name)
			rc, err := f.Open()
			if err != nil {
				t.Fatal(err)
			}
			files[f.Name], _ = io.ReadAll(rc)
			rc.Close()
		}
		var inDir []string
		filepath.WalkDir(cliOut, func(p string, d fs.DirEntry, err error) error {
			if err == nil && !d.IsDir() {
				rel, _ := filepath.Rel(cliOut, p)
				inDir = append(inDir, filepath.ToSlash(rel))
			}
			return nil
		})
		sort.Strings(inZip)
		sort.Strings(inDir)
		if !slices.Equal(inZip, inDir) {
			t.Errorf("archive holds %v\namplink run --out writes %v", inZip, inDir)
		}
		if err := sameTable(files["results.csv"], cliCSV); err != nil {
			t.Errorf("the archive's results.csv differs from amplink run's (apart from row order): %v", err)
		}
		cliRecipe, _ := os.ReadFile(filepath.Join(cliOut, "recipe.json"))
		if !bytes.Equal(files["recipe.json"], cliRecipe) {
			t.Errorf("the archive's recipe.json differs from amplink run's:\n%s\nwant\n%s", files["recipe.json"], cliRecipe)
		}
		pageCSV := filepath.Join(t.TempDir(), "results.csv")
		os.WriteFile(pageCSV, files["results.csv"], 0o644)
		if err := run(&so, &se, []string{"merge", "--out", filepath.Join(t.TempDir(), "group.csv"), pageCSV}); err != nil {
			t.Errorf("amplink merge refuses the page's results.csv: %v", err)
		}
	})

	t.Run("events", func(t *testing.T) {
		// a continuous recording with its events in a second file: the
		// summary counts the events and the epoch settings take the type
		dir := t.TempDir()
		var rec strings.Builder
		rec.WriteString("time,C4,Pz\n")
		for k := 0; k < 250*40; k++ {
			tm := float64(k) / 250
			fmt.Fprintf(&rec, "%.3f,%.5f,%.5f\n", tm, math.Sin(2*math.Pi*10*tm), math.Cos(2*math.Pi*3*tm))
		}
		var ev strings.Builder
		ev.WriteString("onset\tduration\ttrial_type\n")
		for i := 0; i < 12; i++ {
			fmt.Fprintf(&ev, "%d\t0.1\ttone\n", 3+3*i)
		}
		recPath := filepath.Join(dir, "session_eeg.csv")
		evPath := filepath.Join(dir, "session_events.tsv")
		os.WriteFile(recPath, []byte(rec.String()), 0o644)
		os.WriteFile(evPath, []byte(ev.String()), 0o644)
		b.pick(t, []string{recPath, evPath})
		if _, err := chromedp.Run(b.ctx, chromedp.Poll[bool](`(document.querySelector("#summary") || {textContent: ""}).textContent.includes("session_eeg.csv")`, chromedp.WithPollingTimeout(60*time.Second))); err != nil {
			t.Fatalf("no summary: %v (%s)", err, b.text(t, ".step .error"))
		}
		b.waitState(t, "loaded", 30*time.Second)
		s := b.text(t, "#summary")
		if !strings.Contains(s, "tone × 12") || !strings.Contains(s, "continuous") {
			t.Fatalf("summary %q: want 12 tone events on continuous data", s)
		}
		v := b.formValues(t)
		if v["f-epochs-enabled"] != "true" || v["f-epochs-event"] != "tone" {
			t.Errorf("epoch settings not taken from the events: %v", v)
		}
	})

	t.Run("audio", func(t *testing.T) {
		// a WAV file (RIFF/WAVE, 16-bit PCM, mono, 8 kHz, 1 s of 440 Hz):
		// the page says the gain is unknown and the units arbitrary
		const rate, n = 8000, 8000
		var w []byte
		le32 := func(v uint32) { w = append(w, byte(v), byte(v>>8), byte(v>>16), byte(v>>24)) }
		le16 := func(v uint16) { w = append(w, byte(v), byte(v>>8)) }
		w = append(w, "RIFF"...)
		le32(36 + 2*n)
		w = append(w, "WAVEfmt "...)
		le32(16)
		le16(1)
		le16(1)
		le32(rate)
		le32(2 * rate)
		le16(2)
		le16(16)
		w = append(w, "data"...)
		le32(2 * n)
		for k := 0; k < n; k++ {
			le16(uint16(int16(8000 * math.Sin(2*math.Pi*440*float64(k)/rate))))
		}
		path := filepath.Join(t.TempDir(), "tone.wav")
		os.WriteFile(path, w, 0o644)
		b.pick(t, []string{path})
		if _, err := chromedp.Run(b.ctx, chromedp.Poll[bool](`(document.querySelector("#summary") || {textContent: ""}).textContent.includes("tone.wav")`, chromedp.WithPollingTimeout(60*time.Second))); err != nil {
			t.Fatalf("no summary: %v (%s)", err, b.text(t, ".step .error"))
		}
		if s := b.text(t, "#summary"); !strings.Contains(s, "gain is unknown") || !strings.Contains(s, "arbitrary units") {
			t.Errorf("no audio caution in %q", s)
		}
	})

	t.Run("cancel", func(t *testing.T) {
		b.loadDemo(t)
		b.setField(t, "f-analyses-0-permutations", "1000000")
		b.origin.setPhase("analysis")
		b.click(t, "run-analysis")
		b.waitState(t, "running", 10*time.Second)
		time.Sleep(1500 * time.Millisecond)
		if s := b.state(t); s != "running" {
			t.Fatalf("state %q before cancelling: the long run should still be going", s)
		}
		b.origin.setPhase("idle")
		start := time.Now()
		b.click(t, "cancel-analysis")
		b.waitState(t, "cancelled", time.Second)
		t.Logf("timing: cancel shown after %v", time.Since(start).Round(time.Millisecond))
		if s := b.text(t, "#run-status"); !strings.Contains(s, "cancelled") {
			t.Fatalf("status %q", s)
		}
		// the fresh workers work: the identity check runs to the end
		b.waitState(t, "cancelled", time.Second)
		b.click(t, "identity-check")
		b.waitState(t, "identity-done", 120*time.Second)
	})

	t.Run("large", func(t *testing.T) {
		dir := t.TempDir()
		// a file over what the page takes is refused before it is read;
		// sparse, so it costs no disk
		huge := filepath.Join(dir, "huge.edf")
		f, err := os.Create(huge)
		if err != nil {
			t.Fatal(err)
		}
		if err := f.Truncate(wire.MaxBytes + 1); err != nil {
			t.Fatal(err)
		}
		f.Close()
		b.pick(t, []string{huge})
		if _, err := chromedp.Run(b.ctx, chromedp.Poll[bool](`(document.getElementById("load-error") || {textContent: ""}).textContent.includes("at most 1024 MiB")`, chromedp.WithPollingTimeout(5*time.Second))); err != nil {
			t.Fatalf("a file over 1 GiB was not refused: %v (%q)", err, b.text(t, "#load-error"))
		}
		// an EDF under that size whose samples would not fit a worker
		// (64 signals × 4200 one-second records at 1 kHz: 269 million
		// samples, 1075 MB as float32) streams from its Blob: the worker
		// reads its header and records, never holds the samples, and the
		// page takes it (the sample budget then applies to what a recipe
		// holds, as TestEnvelopeStreamsAboveBudget checks in the worker)
		rec := &data.Recording{Rate: 1000}
		for c := 0; c < 64; c++ {
			rec.Channels = append(rec.Channels, data.Channel{Name: fmt.Sprintf("E%d", c+1), Unit: "uV"})
			rec.Samples = append(rec.Samples, make([]float32, 1000))
		}
		var eb bytes.Buffer
		if err := edf.Write(&eb, rec, edf.WriteOptions{}); err != nil {
			t.Fatal(err)
		}
		head := eb.Bytes()
		hb, err := strconv.Atoi(strings.TrimSpace(string(head[184:192])))
		if err != nil {
			t.Fatal(err)
		}
		rb := int64(len(head) - hb)     // the one record
		copy(head[236:244], "-1      ") // number of records: from the file size
		big := filepath.Join(dir, "long-64ch.edf")
		if err := os.WriteFile(big, head[:hb], 0o644); err != nil {
			t.Fatal(err)
		}
		if err := os.Truncate(big, int64(hb)+4200*rb); err != nil {
			t.Fatal(err)
		}
		b.pick(t, []string{big})
		b.waitState(t, "loaded", 60*time.Second)
		if sum := b.text(t, "#summary"); !strings.Contains(sum, "long-64ch.edf") || !strings.Contains(sum, "64") {
			t.Errorf("the streamed recording's summary %q does not name the file and its 64 channels", sum)
		}
		if msg := b.text(t, "#load-error"); msg != "" {
			t.Errorf("a recording that streams was refused: %q", msg)
		}
	})

	t.Run("validation", func(t *testing.T) {
		b.loadDemo(t)
		// a reversed band: the core's message appears at that field, and
		// Run refuses until it is fixed
		b.setField(t, "f-analyses-0-seed-freq-0", "30")
		if _, err := chromedp.Run(b.ctx, chromedp.Poll[bool](`(() => {
			const f = document.getElementById("f-analyses-0-seed-freq-0").closest(".field");
			const w = f && f.querySelector(".why");
			return f.classList.contains("invalid") && !!w && w.textContent.startsWith("Analysis 1, seed band:") &&
				w.querySelector(".path").textContent === "analyses[0].seed.freq";
		})()`, chromedp.WithPollingTimeout(5*time.Second))); err != nil {
			t.Fatalf("no message in the form's words at the seed band field: %v (%q)", err, b.text(t, ".field.invalid .why"))
		}
		// the message does not widen its field
		if wide, _ := chromedp.Run(b.ctx, chromedp.Evaluate[bool](`(() => {
			const f = document.getElementById("f-analyses-0-seed-freq-0"), why = f.closest(".field").querySelector(".why");
			return why.getBoundingClientRect().width > f.closest(".field").getBoundingClientRect().width + 1;
		})()`)); wide {
			t.Error("the message is wider than its field")
		}
		b.shot(t, "field-error")
		b.click(t, "run-analysis")
		if _, err := chromedp.Run(b.ctx, chromedp.Poll[bool](`(document.getElementById("run-error") || {textContent: ""}).textContent.includes("marked field")`, chromedp.WithPollingTimeout(5*time.Second))); err != nil {
			t.Fatalf("Run did not refuse the bad recipe: %v", err)
		}
		if s := b.text(t, "#run-error"); !strings.Contains(s, "Analysis 1, seed band") || strings.Contains(s, "analyses[0]") {
			t.Errorf("run message %q is not in the form's words", s)
		}
		// its link brings the field into view
		b.click(t, "run-error-field")
		if _, err := chromedp.Run(b.ctx, chromedp.Poll[bool](`document.activeElement && document.activeElement.id === "f-analyses-0-seed-freq-0"`, chromedp.WithPollingTimeout(5*time.Second))); err != nil {
			t.Errorf("the message's link did not bring the field into view: %v", err)
		}
		b.setField(t, "f-analyses-0-seed-freq-0", "15")
		if _, err := chromedp.Run(b.ctx, chromedp.Poll[bool](`document.querySelectorAll(".field.invalid").length === 0 && !document.getElementById("run-error")`, chromedp.WithPollingTimeout(5*time.Second))); err != nil {
			t.Fatalf("the message stayed after the fix: %v", err)
		}
		// an unknown channel is caught while typing
		b.setField(t, "f-analyses-0-seed-channel", "C44")
		if _, err := chromedp.Run(b.ctx, chromedp.Poll[bool](`(document.querySelector(".field.invalid .why") || {textContent: ""}).textContent.includes("\"C44\" is not a channel")`, chromedp.WithPollingTimeout(5*time.Second))); err != nil {
			t.Errorf("an unknown channel was not caught while typing: %v", err)
		}
		b.setField(t, "f-analyses-0-seed-channel", "C4")
		// a new analysis, and a switched type, mark nothing the user has
		// not typed in yet
		before, _ := chromedp.Run(b.ctx, chromedp.Evaluate[int](`document.querySelectorAll(".analysis").length`))
		b.click(t, "add-window")
		// the new analysis and its fields are drawn after the click's task
		last := fmt.Sprintf("f-analyses-%d-type", before)
		if _, err := chromedp.Run(b.ctx, chromedp.Poll[bool](fmt.Sprintf(`document.querySelectorAll(".analysis").length === %d && !!document.getElementById(%q)`, before+1, last), chromedp.WithPollingTimeout(5*time.Second))); err != nil {
			t.Fatalf("no analysis %d after Add: %v", before+1, err)
		}
		n := before + 1
		b.setField(t, last, "comodulogram")
		time.Sleep(300 * time.Millisecond)
		if s := b.text(t, ".field.invalid .why"); s != "" {
			t.Errorf("a fresh analysis shows %q before anything was typed", s)
		}
		if has, _ := chromedp.Run(b.ctx, chromedp.Evaluate[bool](fmt.Sprintf(`!!document.getElementById("f-analyses-%d-covariates")`, n-1))); has {
			t.Error("a cross-frequency map offers covariates")
		}
		b.click(t, "edit-analysis-0") // the first analysis open again, for the link test
		if _, err := chromedp.Run(b.ctx, chromedp.Poll[bool](`!!document.getElementById("f-analyses-0-permutations")`, chromedp.WithPollingTimeout(5*time.Second))); err != nil {
			t.Fatalf("analysis 1 did not open again: %v", err)
		}
	})

	t.Run("link", func(t *testing.T) {
		b.setField(t, "f-analyses-0-permutations", "250")
		b.setField(t, "f-spectral-steps", "24")
		b.click(t, "copy-link")
		if _, err := chromedp.Run(b.ctx, chromedp.Poll[bool](`!!document.getElementById("share-url")`, chromedp.WithPollingTimeout(5*time.Second))); err != nil {
			t.Fatal(err)
		}
		link, err := chromedp.Run(b.ctx, chromedp.Evaluate[string](`document.getElementById("share-url").value`))
		if err != nil {
			t.Fatal(err)
		}
		i := strings.Index(link, "#r=")
		if i < 0 {
			t.Fatalf("link %q has no #r= fragment", link)
		}
		before := b.formValues(t)
		b.open(t, link[i:])
		if _, err := chromedp.Run(b.ctx, chromedp.Poll[bool](`document.getElementById("f-analyses-0-permutations").value === "250"`, chromedp.WithPollingTimeout(5*time.Second))); err != nil {
			t.Fatalf("the link did not restore the settings: %v", err)
		}
		after := b.formValues(t)
		for k, v := range before {
			if after[k] != v {
				t.Errorf("%s: %q before, %q from the link", k, v, after[k])
			}
		}
	})

	t.Run("offline", func(t *testing.T) {
		b.origin.setOffline(true)
		defer b.origin.setOffline(false)
		before := len(b.origin.requests(""))
		d := b.open(t, "")
		t.Logf("timing: page load to ready %v (offline, from the service worker's cache)", d.Round(time.Millisecond))
		b.click(t, "load-demo")
		b.waitState(t, "loaded", 60*time.Second)
		b.click(t, "identity-check")
		b.waitState(t, "identity-done", 120*time.Second)
		for _, r := range b.origin.requests("")[before:] {
			// the browser itself checks app-worker.js for an update on
			// every navigation, past the service worker; offline that
			// check fails and the cached version keeps serving
			if r.Path != "/favicon.ico" && r.Path != prefix+"app-worker.js" {
				t.Errorf("offline, the page still asked the server for %s", r.Path)
			}
		}
	})

	t.Run("update", func(t *testing.T) {
		// a new version on the server: the page says so and offers a
		// reload (go-app's service worker finds it; OnAppUpdate shows it)
		dir, _ := testSite(t)
		next := filepath.Join(t.TempDir(), "site")
		if err := os.CopyFS(next, os.DirFS(dir)); err != nil {
			t.Fatal(err)
		}
		sw := filepath.Join(next, "app-worker.js")
		js, err := os.ReadFile(sw)
		if err != nil {
			t.Fatal(err)
		}
		if err := os.WriteFile(sw, append(js, "\n// the next version\n"...), 0o644); err != nil {
			t.Fatal(err)
		}
		b.origin.setSite(SiteHandler(next))
		defer b.origin.setSite(SiteHandler(dir))
		if _, err := chromedp.Run(b.ctx, chromedp.Evaluate[bool](`goappServiceWorkerRegistration.update().then(() => true)`, chromedp.EvalAwaitPromise)); err != nil {
			t.Fatal(err)
		}
		if _, err := chromedp.Run(b.ctx, chromedp.Poll[bool](`!!document.querySelector(".update button")`, chromedp.WithPollingTimeout(30*time.Second))); err != nil {
			t.Fatalf("no update notice: %v", err)
		}
		if s := b.text(t, ".update"); !strings.Contains(s, "new version") {
			t.Fatalf("update notice %q", s)
		}
		// the reload button loads the page again, and it starts
		if _, err := chromedp.Run(b.ctx, chromedp.Evaluate[bool](`document.querySelector(".update button").click(), true`)); err != nil {
			t.Fatal(err)
		}
		b.waitState(t, "ready", 60*time.Second)
	})

	var paths []string
	for _, r := range b.origin.requests("") {
		paths = append(paths, r.Path)
	}
	t.Logf("requests at the server: %d (%s)", len(paths), strings.Join(uniq(paths), ", "))
	t.Logf("phases: %v", phaseLog)
}

func uniq(s []string) []string {
	seen := map[string]bool{}
	var out []string
	for _, v := range s {
		if !seen[v] {
			seen[v] = true
			out = append(out, v)
		}
	}
	return out
}
