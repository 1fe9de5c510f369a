//go:build !wasm

package main

import (
	"bytes"
	"compress/gzip"
	"context"
	"errors"
	"io"
	"net/http"
	"net/http/httptest"
	"os"
	"os/signal"
	"path/filepath"
	"regexp"
	"strings"
	"sync"
	"syscall"
	"testing"
	"time"

	"amplink/app"
)

// The site is built once per test binary, lazily, into a directory that
// TestMain removes at the end; tests that do not need it do not pay for it.
var (
	siteRoot string
	siteOnce sync.Once
	siteDir  string
	siteInfo siteStats
	siteErr  error
)

func TestMain(m *testing.M) {
	var err error
	if siteRoot, err = os.MkdirTemp("", "amplink-sitetest-"); err != nil {
		panic(err)
	}
	code := m.Run()
	os.RemoveAll(siteRoot)
	os.Exit(code)
}

// testSite returns the directory of the built site.
func testSite(t testing.TB) (string, siteStats) {
	t.Helper()
	siteOnce.Do(func() {
		siteDir = filepath.Join(siteRoot, "site")
		siteInfo, siteErr = buildSite(siteDir, "")
	})
	if siteErr != nil {
		t.Fatalf("building the site: %v", siteErr)
	}
	return siteDir, siteInfo
}

func TestSiteFiles(t *testing.T) {
	dir, st := testSite(t)
	for _, name := range []string{
		"index.html", "app.js", "app-worker.js", "manifest.webmanifest", "wasm_exec.js", "app.css",
		"web/app.wasm", "web/worker.wasm", "web/worker.js", "web/start.js", "web/wasm_exec.js", "web/app.css",
		"web/icon.svg", "web/icon-192.png", "web/icon-512.png",
	} {
		t.Run(name, func(t *testing.T) {
			fi, err := os.Stat(filepath.Join(dir, name))
			if err != nil {
				t.Fatal(err)
			}
			if fi.Size() == 0 {
				t.Fatalf("%s is empty", name)
			}
		})
	}
	for _, name := range []string{"app.wasm", "worker.wasm"} {
		b, err := os.ReadFile(filepath.Join(dir, "web", name))
		if err != nil {
			t.Fatal(err)
		}
		// The wasm magic number "\0asm" (WebAssembly core spec, binary format §5.5.16).
		if !bytes.HasPrefix(b, []byte("\x00asm")) {
			t.Errorf("%s does not start with the wasm magic number", name)
		}
		var z bytes.Buffer
		w, _ := gzip.NewWriterLevel(&z, gzip.BestCompression)
		w.Write(b)
		w.Close()
		t.Logf("%s: %.2f MB raw, %.2f MB gzipped", name, float64(len(b))/1e6, float64(z.Len())/1e6)
	}
	if len(st.Version) != 16 {
		t.Errorf("version %q: want 16 hex digits", st.Version)
	}
}

// TestSiteRelative checks that nothing in the generated entry files points
// at the server root or at another host, so the site works under any path
// prefix and never calls out.
func TestSiteRelative(t *testing.T) {
	dir, st := testSite(t)
	rootRef := regexp.MustCompile(`(?:href|src)="/[^"]*"|"/(?:app|web|wasm_exec|manifest)[^"]*"`)
	remote := regexp.MustCompile(`https?://`)
	for _, name := range []string{"index.html", "app.js", "app-worker.js", "manifest.webmanifest"} {
		t.Run(name, func(t *testing.T) {
			b, err := os.ReadFile(filepath.Join(dir, name))
			if err != nil {
				t.Fatal(err)
			}
			s := string(b)
			if m := rootRef.FindString(s); m != "" {
				t.Errorf("root-relative reference %s", m)
			}
			if m := remote.FindString(s); m != "" {
				i := strings.Index(s, m)
				t.Errorf("absolute URL in %s: %q", name, s[i:min(len(s), i+80)])
			}
		})
	}
	idx, _ := os.ReadFile(filepath.Join(dir, "index.html"))
	for _, want := range []string{
		`http-equiv="Content-Security-Policy"`,
		`'wasm-unsafe-eval'`,
		`id="file-input"`, `id="load-demo"`, `id="run-analysis"`, `id="cancel-analysis"`, `id="progress"`, `id="results"`,
		"not a diagnostic device", "nothing is uploaded",
	} {
		if !strings.Contains(string(idx), want) {
			t.Errorf("index.html lacks %s", want)
		}
	}
	sw, _ := os.ReadFile(filepath.Join(dir, "app-worker.js"))
	for _, want := range []string{`"./web/worker.js"`, `"./web/worker.wasm"`, `"./web/wasm_exec.js"`, `"./web/icon.svg"`, `"web/app.wasm"`, `"./"`, st.Version} {
		if !strings.Contains(string(sw), want) {
			t.Errorf("app-worker.js does not cache %s", want)
		}
	}
}

func TestRelativize(t *testing.T) {
	cases := []struct {
		name, file, in, want string
	}{
		{"script", "index.html", `<script src="/app.js"></script>`, `<script src="app.js"></script>`},
		{"style", "index.html", `<link href="/app.css">`, `<link href="app.css">`},
		{"og url", "index.html", `<meta property="og:url" content="http://127.0.0.1:4321/">x`, `x`},
		{"og url other order", "index.html", "<meta content=\"http://127.0.0.1:4321/\" property=\"og:url\">\nx", `x`},
		{"cache root", "app-worker.js", `["/","/app.js","web/app.wasm"]`, `["./","app.js","web/app.wasm"]`},
		{"cache root middle", "app-worker.js", `["./web/a","/","/app.css"]`, `["./web/a","./","app.css"]`},
		{"scope", "manifest.webmanifest", `"scope": "/", "start_url": "/"`, `"scope": "./", "start_url": "./"`},
		{"worker registration", "app.js", `register("/app-worker.js")`, `register("app-worker.js")`},
		{"attribute order", "index.html", `<meta name="a" content="b"><p>x > y</p><input id="f" readonly value="a b">`, `<meta content="b" name="a"><p>x > y</p><input id="f" readonly value="a b">`},
		{"other text untouched", "app.js", `a = "/"; b = "/other.js"`, `a = "/"; b = "/other.js"`},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			if got := string(relativize(c.file, []byte(c.in))); got != c.want {
				t.Errorf("relativize(%s, %q) = %q, want %q", c.file, c.in, got, c.want)
			}
		})
	}
}

// TestSiteDeterministic builds the site a second time and compares every
// file byte for byte (the project's determinism rule).
func TestSiteDeterministic(t *testing.T) {
	if testing.Short() {
		t.Skip("builds the site twice")
	}
	dir, st := testSite(t)
	dir2 := filepath.Join(t.TempDir(), "again")
	st2, err := buildSite(dir2, "")
	if err != nil {
		t.Fatal(err)
	}
	if st2.Version != st.Version {
		t.Errorf("version %s, then %s", st.Version, st2.Version)
	}
	filepath.Walk(dir, func(p string, fi os.FileInfo, err error) error {
		if err != nil || fi.IsDir() {
			return err
		}
		rel, _ := filepath.Rel(dir, p)
		a, _ := os.ReadFile(p)
		b, err := os.ReadFile(filepath.Join(dir2, rel))
		if err != nil {
			t.Errorf("%s: missing in the second build", rel)
			return nil
		}
		if !bytes.Equal(a, b) {
			i := 0
			for i < len(a) && i < len(b) && a[i] == b[i] {
				i++
			}
			lo := max(0, i-60)
			t.Errorf("%s differs between two builds at byte %d: %q vs %q", rel, i, a[lo:min(len(a), i+60)], b[lo:min(len(b), i+60)])
		}
		return nil
	})
}

func TestSiteHandler(t *testing.T) {
	dir, _ := testSite(t)
	srv := httptest.NewServer(http.StripPrefix("/some/prefix", SiteHandler(dir)))
	defer srv.Close()
	cases := []struct {
		method, path string
		code         int
		ctype        string
	}{
		{"GET", "/some/prefix/", 200, "text/html"},
		{"GET", "/some/prefix/web/app.wasm", 200, "application/wasm"},
		{"GET", "/some/prefix/web/worker.js", 200, "javascript"},
		{"POST", "/some/prefix/", 405, ""},
		{"PUT", "/some/prefix/web/app.css", 405, ""},
		// No directory listings.
		{"GET", "/some/prefix/web/", 404, ""},
		{"GET", "/some/prefix/web", 404, ""},
	}
	for _, c := range cases {
		t.Run(c.method+" "+c.path, func(t *testing.T) {
			req, _ := http.NewRequest(c.method, srv.URL+c.path, nil)
			res, err := http.DefaultClient.Do(req)
			if err != nil {
				t.Fatal(err)
			}
			res.Body.Close()
			if res.StatusCode != c.code {
				t.Fatalf("status %d, want %d", res.StatusCode, c.code)
			}
			if c.code != 200 {
				return
			}
			if got := res.Header.Get("Content-Type"); !strings.Contains(got, c.ctype) {
				t.Errorf("Content-Type %q, want %q", got, c.ctype)
			}
			if got := res.Header.Get("Content-Security-Policy"); got != app.HeaderCSP || !strings.Contains(got, "frame-ancestors 'none'") {
				t.Errorf("Content-Security-Policy %q", got)
			}
			if got := res.Header.Get("X-Frame-Options"); got != "DENY" {
				t.Errorf("X-Frame-Options %q, want DENY", got)
			}
		})
	}
}

func TestSiteFlags(t *testing.T) {
	cases := []struct {
		name string
		args []string
		want string
	}{
		{"no out", nil, "--out DIR is required"},
		{"extra", []string{"--out", "x", "y"}, `unexpected argument "y"`},
		{"bad src", []string{"--out", filepath.Join(t.TempDir(), "s"), "--src", t.TempDir()}, "no amplink go.mod"},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			var out, errb bytes.Buffer
			err := cmdSite(&out, &errb, c.args)
			if err == nil || !strings.Contains(err.Error(), c.want) {
				t.Fatalf("error %v, want %q", err, c.want)
			}
		})
	}
}

// syncBuffer is a bytes.Buffer safe for one writer and one reader.
type syncBuffer struct {
	mu sync.Mutex
	b  bytes.Buffer
}

func (s *syncBuffer) Write(p []byte) (int, error) {
	s.mu.Lock()
	defer s.mu.Unlock()
	return s.b.Write(p)
}

func (s *syncBuffer) String() string {
	s.mu.Lock()
	defer s.mu.Unlock()
	return s.b.String()
}

// TestServeSite serves a built site on a free loopback port, fetches the
// page from the printed URL, and stops it by cancelling.
func TestServeSite(t *testing.T) {
	dir, _ := testSite(t)
	ctx, cancel := context.WithCancel(context.Background())
	var out, errb syncBuffer
	done := make(chan error, 1)
	go func() { done <- serveSite(ctx, &out, &errb, "127.0.0.1:0", dir) }()
	urlRe := regexp.MustCompile(`http://127\.0\.0\.1:\d+/`)
	var u string
	for i := 0; i < 200 && u == ""; i++ {
		u = urlRe.FindString(out.String())
		time.Sleep(10 * time.Millisecond)
	}
	if u == "" {
		cancel()
		t.Fatalf("no URL printed: %q %q", out.String(), errb.String())
	}
	res, err := http.Get(u)
	if err != nil {
		t.Fatal(err)
	}
	body, _ := io.ReadAll(res.Body)
	res.Body.Close()
	if res.StatusCode != 200 || !strings.Contains(string(body), `id="run-analysis"`) {
		t.Errorf("GET %s: %d, %d bytes", u, res.StatusCode, len(body))
	}
	if errb.String() != "" {
		t.Errorf("a loopback address should print no warning: %q", errb.String())
	}
	cancel()
	select {
	case err := <-done:
		if err != nil {
			t.Errorf("serve returned %v", err)
		}
	case <-time.After(5 * time.Second):
		t.Fatal("serve did not stop when cancelled")
	}
	if err := serveSite(context.Background(), io.Discard, io.Discard, "nonsense", dir); err == nil || !strings.Contains(err.Error(), "--addr") {
		t.Errorf("bad address: %v", err)
	}
}

// TestSiteScriptOrder: web/start.js replaces how app.js loads the wasm,
// so it must run first: both are deferred, so it must come first.
func TestSiteScriptOrder(t *testing.T) {
	dir, _ := testSite(t)
	b, err := os.ReadFile(filepath.Join(dir, "index.html"))
	if err != nil {
		t.Fatal(err)
	}
	s := string(b)
	exec, start, appJS := strings.Index(s, `src="wasm_exec.js"`), strings.Index(s, `src="./web/start.js"`), strings.Index(s, `src="app.js"`)
	if exec < 0 || start < 0 || appJS < 0 || !(exec < start && start < appJS) {
		t.Fatalf("script order: wasm_exec.js at %d, web/start.js at %d, app.js at %d; want them in that order", exec, start, appJS)
	}
}

// TestSiteLoadingView: the written page shows its own loading view, not
// go-app's stock one, and app.js marks a failed start with the page's class.
func TestSiteLoadingView(t *testing.T) {
	dir, _ := testSite(t)
	idx, err := os.ReadFile(filepath.Join(dir, "index.html"))
	if err != nil {
		t.Fatal(err)
	}
	js, err := os.ReadFile(filepath.Join(dir, "app.js"))
	if err != nil {
		t.Fatal(err)
	}
	if i := strings.Index(string(idx), "goapp-"); i >= 0 {
		t.Errorf("index.html still has a go-app class: %q", idx[i:min(len(idx), i+60)])
	}
	for _, want := range []string{`class="starting" id="app-wasm-loader"`, `id="app-wasm-loader-label">Getting the analysis ready on this computer: 0%<`} {
		if !strings.Contains(string(idx), want) {
			t.Errorf("index.html lacks %s", want)
		}
	}
	if !strings.Contains(string(js), `"starting-mark starting-failed"`) || strings.Contains(string(js), `"goapp-logo"`) {
		t.Error("app.js does not mark a failed start with the page's own class")
	}
	if !strings.Contains(string(js), `const goappLoadingLabel = "Getting the analysis ready on this computer: {progress}%"`) {
		t.Error("app.js does not carry the page's loading words")
	}
}

// TestSiteCSPMetaFirst: the CSP meta must come first in the head, before
// any script or link, so that it governs everything the head loads.
func TestSiteCSPMetaFirst(t *testing.T) {
	dir, _ := testSite(t)
	b, err := os.ReadFile(filepath.Join(dir, "index.html"))
	if err != nil {
		t.Fatal(err)
	}
	s := string(b)
	head := strings.Index(s, "<head>")
	csp := strings.Index(s, `http-equiv="Content-Security-Policy"`)
	if head < 0 || csp < 0 {
		t.Fatalf("no head (%d) or CSP meta (%d)", head, csp)
	}
	first := strings.Index(s[head+len("<head>"):], "<") + head + len("<head>")
	if !strings.HasPrefix(s[first:], `<meta content="`+app.CSP+`" http-equiv="Content-Security-Policy">`) {
		t.Fatalf("the head starts with %.80q, want the CSP meta", s[first:])
	}
}

// TestServeSIGTERMRemovesTempDir: amplink serve stops on SIGTERM as on
// Ctrl-C, and removes its temporary site directory.
func TestServeSIGTERMRemovesTempDir(t *testing.T) {
	ctx, stop := signal.NotifyContext(context.Background(), serveSignals...)
	defer stop()
	var out, errb syncBuffer
	var dir string
	done := make(chan error, 1)
	built := make(chan struct{})
	go func() {
		done <- serveTemp(ctx, &out, &errb, "127.0.0.1:0", func(d string) error {
			dir = d
			close(built)
			return os.WriteFile(filepath.Join(d, "index.html"), []byte("<!doctype html>"), 0o644)
		})
	}()
	<-built
	urlRe := regexp.MustCompile(`http://127\.0\.0\.1:\d+/`)
	for i := 0; i < 200 && urlRe.FindString(out.String()) == ""; i++ {
		time.Sleep(10 * time.Millisecond)
	}
	if err := syscall.Kill(os.Getpid(), syscall.SIGTERM); err != nil {
		t.Fatal(err)
	}
	select {
	case err := <-done:
		if err != nil {
			t.Fatalf("serve returned %v", err)
		}
	case <-time.After(5 * time.Second):
		t.Fatal("serve did not stop on SIGTERM")
	}
	if _, err := os.Stat(dir); !errors.Is(err, os.ErrNotExist) {
		t.Fatalf("temporary site %s is still there (%v)", dir, err)
	}
}

// TestSiteZoom: the page may be zoomed (go-app's own viewport forbids it).
func TestSiteZoom(t *testing.T) {
	dir, _ := testSite(t)
	b, err := os.ReadFile(filepath.Join(dir, "index.html"))
	if err != nil {
		t.Fatal(err)
	}
	if s := string(b); strings.Contains(s, "user-scalable=0") || strings.Contains(s, "maximum-scale=1") || !strings.Contains(s, `name="viewport"`) {
		t.Errorf("viewport forbids zooming or is missing")
	}
}
