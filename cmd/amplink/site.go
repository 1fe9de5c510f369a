//go:build !wasm

package main

import (
	"bytes"
	"context"
	"crypto/sha256"
	"encoding/hex"
	"errors"
	"flag"
	"fmt"
	"io"
	"net"
	"net/http"
	"os"
	"os/exec"
	"os/signal"
	"path"
	"path/filepath"
	"regexp"
	"sort"
	"strings"
	"sync"
	"syscall"
	"time"

	goapp "github.com/maxence-charriere/go-app/v9/pkg/app"

	"amplink/app"
	"amplink/web"
)

// cmdSite writes the static site:
//
//	amplink site --out DIR [--src MODULE_DIR]
//
// It builds the page (wasm/page) and the analysis worker (wasm/worker) to
// js/wasm with the Go toolchain, so it runs inside the amplink source tree
// (or is pointed at it with --src). The site works under any path prefix
// of any plain file server.
func cmdSite(stdout, stderr io.Writer, args []string) error {
	fs := flag.NewFlagSet("site", flag.ContinueOnError)
	fs.SetOutput(stderr)
	out := fs.String("out", "", "directory to write the site into (required)")
	src := fs.String("src", "", "amplink module directory to build from (default: the module of the current directory)")
	if err := fs.Parse(args); err != nil {
		return err
	}
	if fs.NArg() > 0 {
		return fmt.Errorf("site: unexpected argument %q", fs.Arg(0))
	}
	if *out == "" {
		return errors.New("site: --out DIR is required")
	}
	st, err := buildSite(*out, *src)
	if err != nil {
		return err
	}
	fmt.Fprintf(stdout, "site written to %s (version %s; page %s, worker %s)\n", *out, st.Version, sizeText(st.PageWasm), sizeText(st.WorkerWasm))
	return nil
}

// cmdServe builds the site into a temporary directory and serves it:
//
//	amplink serve [--addr 127.0.0.1:8080] [--src MODULE_DIR]
//
// It prints the URL and serves until interrupted.
func cmdServe(stdout, stderr io.Writer, args []string) error {
	fs := flag.NewFlagSet("serve", flag.ContinueOnError)
	fs.SetOutput(stderr)
	addr := fs.String("addr", "127.0.0.1:8080", "address to listen on")
	src := fs.String("src", "", "amplink module directory to build from (default: the module of the current directory)")
	if err := fs.Parse(args); err != nil {
		return err
	}
	if fs.NArg() > 0 {
		return fmt.Errorf("serve: unexpected argument %q", fs.Arg(0))
	}
	// SIGTERM (a service manager, kill) stops the server like Ctrl-C, so
	// that the temporary site is removed either way.
	ctx, stop := signal.NotifyContext(context.Background(), serveSignals...)
	defer stop()
	return serveTemp(ctx, stdout, stderr, *addr, func(dir string) error {
		_, err := buildSite(dir, *src)
		return err
	})
}

// serveSignals end amplink serve.
var serveSignals = []os.Signal{os.Interrupt, syscall.SIGTERM}

// serveTemp builds the site with build into a fresh temporary directory,
// serves it on addr until ctx ends, and removes the directory.
func serveTemp(ctx context.Context, stdout, stderr io.Writer, addr string, build func(dir string) error) error {
	dir, err := os.MkdirTemp("", "amplink-site-")
	if err != nil {
		return err
	}
	defer os.RemoveAll(dir)
	fmt.Fprintln(stderr, "building the site…")
	if err := build(dir); err != nil {
		return err
	}
	return serveSite(ctx, stdout, stderr, addr, dir)
}

// serveSite serves dir on addr until ctx ends.
func serveSite(ctx context.Context, stdout, stderr io.Writer, addr, dir string) error {
	host, _, err := net.SplitHostPort(addr)
	if err != nil {
		return fmt.Errorf("serve: --addr %q: %v", addr, err)
	}
	if ip := net.ParseIP(host); host != "localhost" && (ip == nil || !ip.IsLoopback()) {
		fmt.Fprintf(stderr, "serve: warning: %s is reachable from other computers; the page itself never sends data anywhere\n", host)
	}
	ln, err := net.Listen("tcp", addr)
	if err != nil {
		return fmt.Errorf("serve: %v", err)
	}
	srv := &http.Server{Handler: SiteHandler(dir), ReadHeaderTimeout: 10 * time.Second}
	fmt.Fprintf(stdout, "amplink is at http://%s/\n", ln.Addr())
	errc := make(chan error, 1)
	go func() { errc <- srv.Serve(ln) }()
	select {
	case <-ctx.Done():
		sctx, cancel := context.WithTimeout(context.Background(), 2*time.Second)
		defer cancel()
		srv.Shutdown(sctx)
		return nil
	case err := <-errc:
		return err
	}
}

// SiteHandler serves a written site with the page's security headers.
func SiteHandler(dir string) http.Handler {
	files := http.FileServer(http.Dir(dir))
	return http.HandlerFunc(func(w http.ResponseWriter, r *http.Request) {
		if r.Method != http.MethodGet && r.Method != http.MethodHead {
			http.Error(w, "this site only serves files", http.StatusMethodNotAllowed)
			return
		}
		h := w.Header()
		h.Set("Content-Security-Policy", app.HeaderCSP)
		h.Set("X-Frame-Options", "DENY")
		h.Set("X-Content-Type-Options", "nosniff")
		h.Set("Referrer-Policy", "no-referrer")
		h.Set("Cache-Control", "no-cache")
		// No directory listings: a directory is served only through its
		// index.html.
		p := filepath.Join(dir, filepath.FromSlash(path.Clean("/"+r.URL.Path)))
		if st, err := os.Stat(p); err == nil && st.IsDir() {
			if _, err := os.Stat(filepath.Join(p, "index.html")); err != nil {
				http.NotFound(w, r)
				return
			}
		}
		files.ServeHTTP(w, r)
	})
}

// siteStats describes a written site.
type siteStats struct {
	Version              string
	PageWasm, WorkerWasm int64
}

var routesOnce sync.Once

// buildSite writes the complete site into out.
func buildSite(out, src string) (siteStats, error) {
	var st siteStats
	mod, err := moduleDir(src)
	if err != nil {
		return st, err
	}
	goroot, err := goEnv(mod, "GOROOT")
	if err != nil {
		return st, err
	}
	execJS, err := os.ReadFile(filepath.Join(goroot, "lib", "wasm", "wasm_exec.js"))
	if err != nil {
		return st, fmt.Errorf("site: the Go toolchain's wasm_exec.js: %v", err)
	}
	tmp, err := os.MkdirTemp("", "amplink-wasm-")
	if err != nil {
		return st, err
	}
	defer os.RemoveAll(tmp)
	pageWasm := filepath.Join(tmp, "app.wasm")
	workerWasm := filepath.Join(tmp, "worker.wasm")
	if err := buildWasm(mod, "./wasm/page", pageWasm); err != nil {
		return st, err
	}
	if err := buildWasm(mod, "./wasm/worker", workerWasm); err != nil {
		return st, err
	}

	// The version is a hash of everything the site serves, so the service
	// worker refreshes exactly when something changed.
	h := sha256.New()
	files := map[string][]byte{"wasm_exec.js": execJS}
	for _, p := range []string{pageWasm, workerWasm} {
		b, err := os.ReadFile(p)
		if err != nil {
			return st, err
		}
		files[filepath.Base(p)] = b
	}
	for _, n := range web.Names {
		b, err := web.Assets.ReadFile(n)
		if err != nil {
			return st, err
		}
		files[n] = b
	}
	for _, n := range append([]string{"wasm_exec.js", "app.wasm", "worker.wasm"}, web.Names...) {
		fmt.Fprintf(h, "%s %d\n", n, len(files[n]))
		h.Write(files[n])
	}
	st.Version = hex.EncodeToString(h.Sum(nil))[:16]
	st.PageWasm, st.WorkerWasm = int64(len(files["app.wasm"])), int64(len(files["worker.wasm"]))

	if err := os.MkdirAll(out, 0o755); err != nil {
		return st, err
	}
	routesOnce.Do(app.Routes)
	if err := goapp.GenerateStaticWebsite(out, app.Handler(st.Version)); err != nil {
		return st, fmt.Errorf("site: %v", err)
	}
	for _, n := range []string{"index.html", "app.js", "app-worker.js", "manifest.webmanifest"} {
		p := filepath.Join(out, n)
		b, err := os.ReadFile(p)
		if err != nil {
			return st, fmt.Errorf("site: %v", err)
		}
		b = relativize(n, b)
		if b, err = ownLooks(n, b); err != nil {
			return st, fmt.Errorf("site: %v", err)
		}
		if err := os.WriteFile(p, b, 0o644); err != nil {
			return st, err
		}
	}
	if err := os.WriteFile(filepath.Join(out, "wasm_exec.js"), execJS, 0o644); err != nil {
		return st, err
	}
	webDir := filepath.Join(out, "web")
	if err := os.MkdirAll(webDir, 0o755); err != nil {
		return st, err
	}
	for n, b := range files {
		if err := os.WriteFile(filepath.Join(webDir, n), b, 0o644); err != nil {
			return st, err
		}
	}
	return st, nil
}

// go-app always writes these package paths from the root ("/app.js"); the
// site must work under any prefix, so they become relative.
var rootPaths = []string{"/app.css", "/app.js", "/app-worker.js", "/manifest.webmanifest", "/wasm_exec.js"}

// ogURL matches the og:url meta once its attributes are sorted.
var ogURL = regexp.MustCompile(`<meta content="[^"]*" property="og:url">\n?`)

// cspMeta matches the CSP meta once its attributes are sorted.
var cspMeta = regexp.MustCompile(`<meta content="[^"]*" http-equiv="Content-Security-Policy">\n?`)

// relativize rewrites root-relative references in a generated file into
// paths relative to the site's own directory, and drops the og:url meta,
// which names the temporary generator server.
func relativize(name string, b []byte) []byte {
	s := string(b)
	for _, p := range rootPaths {
		s = strings.ReplaceAll(s, `"`+p+`"`, `"`+strings.TrimPrefix(p, "/")+`"`)
	}
	switch name {
	case "index.html":
		s = ogURL.ReplaceAllString(sortAttrs(s), "")
		// The CSP meta goes first in the head, before any script or link,
		// so that it governs everything the head loads.
		if m := cspMeta.FindString(s); m != "" {
			if i := strings.Index(s, "<head>"); i >= 0 {
				s = strings.Replace(s, m, "", 1)
				i = strings.Index(s, "<head>") + len("<head>")
				s = s[:i] + "\n" + strings.TrimSuffix(m, "\n") + s[i:]
			}
		}
		// web/start.js must run before app.js, which go-app always puts
		// first (both are deferred, so they run in document order)
		const start, appJS = `<script defer src="./web/start.js"></script>`, `<script defer src="app.js"></script>`
		if i, j := strings.Index(s, appJS), strings.Index(s, start); i >= 0 && j > i {
			s = s[:i] + start + s[i:j] + s[j+len(start):]
		}
		// go-app forbids zooming; figures and tables must be zoomable
		s = strings.ReplaceAll(s, `, maximum-scale=1, user-scalable=0`, ``)
	case "app-worker.js":
		s = strings.Replace(s, `["/",`, `["./",`, 1)
		s = strings.ReplaceAll(s, `,"/",`, `,"./",`)
		s = strings.ReplaceAll(s, `,"/"]`, `,"./"]`)
	case "manifest.webmanifest":
		s = strings.ReplaceAll(s, `"scope": "/"`, `"scope": "./"`)
		s = strings.ReplaceAll(s, `"start_url": "/"`, `"start_url": "./"`)
	}
	return []byte(s)
}

// ownLooks gives a generated file the page's own loading view in place of
// go-app's stock one (see app.OwnLoadingView).
func ownLooks(name string, b []byte) ([]byte, error) {
	var s string
	var err error
	switch name {
	case "index.html":
		s, err = app.OwnLoadingView(string(b))
	case "app.js":
		s, err = app.OwnLoadingScript(string(b))
	default:
		return b, nil
	}
	return []byte(s), err
}

// sortAttrs puts the attributes of every start tag in name order: go-app
// writes them from a map, in a different order on every run, and the site
// must come out byte-identical from the same sources.
func sortAttrs(html string) string {
	var b strings.Builder
	for i := 0; i < len(html); {
		c := html[i]
		if c != '<' || i+1 >= len(html) || !isLetter(html[i+1]) {
			b.WriteByte(c)
			i++
			continue
		}
		j := i + 1
		for j < len(html) && (isLetter(html[j]) || html[j] >= '0' && html[j] <= '9' || html[j] == '-') {
			j++
		}
		name := html[i+1 : j]
		var attrs []string
		for {
			for j < len(html) && (html[j] == ' ' || html[j] == '\n' || html[j] == '\t') {
				j++
			}
			if j >= len(html) || html[j] == '>' || html[j] == '/' {
				break
			}
			k := j
			for k < len(html) && html[k] != '=' && html[k] != ' ' && html[k] != '>' && html[k] != '/' {
				k++
			}
			if k < len(html) && html[k] == '=' {
				k++
				if k < len(html) && (html[k] == '"' || html[k] == '\'') {
					q := html[k]
					k++
					for k < len(html) && html[k] != q {
						k++
					}
					k++
				} else {
					for k < len(html) && html[k] != ' ' && html[k] != '>' {
						k++
					}
				}
			}
			if k > len(html) {
				k = len(html)
			}
			attrs = append(attrs, html[j:k])
			j = k
		}
		sort.Strings(attrs)
		b.WriteByte('<')
		b.WriteString(name)
		for _, a := range attrs {
			b.WriteByte(' ')
			b.WriteString(a)
		}
		i = j
	}
	return b.String()
}

func isLetter(c byte) bool { return c >= 'a' && c <= 'z' || c >= 'A' && c <= 'Z' }

// moduleDir finds the amplink module to build from.
func moduleDir(src string) (string, error) {
	dir := src
	if dir == "" {
		var err error
		if dir, err = os.Getwd(); err != nil {
			return "", err
		}
	}
	for d := dir; ; d = filepath.Dir(d) {
		b, err := os.ReadFile(filepath.Join(d, "go.mod"))
		if err == nil {
			if !bytes.HasPrefix(bytes.TrimSpace(b), []byte("module amplink")) {
				return "", fmt.Errorf("site: %s is not the amplink module; run inside the amplink source tree or pass --src", filepath.Join(d, "go.mod"))
			}
			return d, nil
		}
		if filepath.Dir(d) == d {
			return "", fmt.Errorf("site: no amplink go.mod at or above %s; run inside the amplink source tree or pass --src", dir)
		}
	}
}

func goEnv(dir, key string) (string, error) {
	cmd := exec.Command("go", "env", key)
	cmd.Dir = dir
	b, err := cmd.Output()
	if err != nil {
		return "", fmt.Errorf("site: go env %s: %v (the Go toolchain is needed to build the page)", key, err)
	}
	return strings.TrimSpace(string(b)), nil
}

// buildWasm compiles pkg for js/wasm.
func buildWasm(dir, pkg, out string) error {
	cmd := exec.Command("go", "build", "-trimpath", "-ldflags=-s -w", "-o", out, pkg)
	cmd.Dir = dir
	cmd.Env = append(os.Environ(), "GOOS=js", "GOARCH=wasm", "CGO_ENABLED=0")
	var errb bytes.Buffer
	cmd.Stderr = &errb
	if err := cmd.Run(); err != nil {
		return fmt.Errorf("site: building %s: %v\n%s", pkg, err, errb.String())
	}
	return nil
}

func sizeText(n int64) string {
	return fmt.Sprintf("%.1f MB", float64(n)/1e6)
}
