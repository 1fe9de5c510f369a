package main

import (
	"fmt"
	"os"
	"path/filepath"
	"slices"
	"strconv"
	"testing"
	"time"

	"github.com/chromedp/cdproto/page"
	"github.com/chromedp/chromedp"

	"amplink/app/wire"
	"amplink/core/format"
	"amplink/wasm/job"
)

// TestBrowserWorkload runs the standard benchmark workload (written by
// cmd/amplink-workload) through the page, as a user would: pick the files
// and the recipe, run, read the table. It is a benchmark, not a check of
// the suite: it runs only when AMPLINK_WORKLOAD names the workload's
// directory, never in CI. AMPLINK_WORKLOAD_WORKERS sets the core count the
// page sees (it starts one worker per core; default: the machine's), AMPLINK_WORKLOAD_REPS the number of runs (default 3).
//
//	go run ./cmd/amplink-workload --out /tmp/wl
//	AMPLINK_WORKLOAD=/tmp/wl go test -run TestBrowserWorkload -v ./cmd/amplink
//
// It logs the wall time from clicking Run to the finished table, and the
// page's marks: run → every worker's units (reading the file in slices,
// decoding, computing), → results (combining, on one worker), → done
// (drawing the table).
func TestBrowserWorkload(t *testing.T) {
	dir := os.Getenv("AMPLINK_WORKLOAD")
	if dir == "" {
		t.Skip("set AMPLINK_WORKLOAD to the directory cmd/amplink-workload wrote")
	}
	reps := 3
	if v, err := strconv.Atoi(os.Getenv("AMPLINK_WORKLOAD_REPS")); err == nil && v > 0 {
		reps = v
	}
	b := newBrowser(t)
	if v, err := strconv.Atoi(os.Getenv("AMPLINK_WORKLOAD_WORKERS")); err == nil && v > 0 {
		js := fmt.Sprintf(`Object.defineProperty(Navigator.prototype, "hardwareConcurrency", {get: () => %d});`, v)
		if _, err := chromedp.Call(b.ctx, page.AddScriptToEvaluateOnNewDocument, page.AddScriptToEvaluateOnNewDocumentParams{Source: js}); err != nil {
			t.Fatal(err)
		}
	}
	ready := b.open(t, "")
	t.Logf("page load to ready %v", ready.Round(time.Millisecond))
	if _, err := chromedp.Run(b.ctx, chromedp.Evaluate[bool](`navigator.serviceWorker.ready.then(() => true)`, chromedp.EvalAwaitPromise)); err != nil {
		t.Fatal(err)
	}
	workers, _ := chromedp.Run(b.ctx, chromedp.Evaluate[int](`navigator.hardwareConcurrency`))
	paths := []string{filepath.Join(dir, "workload.f32"), filepath.Join(dir, "workload.json"), filepath.Join(dir, "recipe.json")}
	b.pick(t, paths)
	b.waitState(t, "loaded", 2*time.Minute)

	var walls []float64
	for i := 0; i < reps; i++ {
		chromedp.Run(b.ctx, chromedp.Evaluate[chromedp.Void](`["amplink-run", "amplink-units", "amplink-results", "amplink-done"].forEach(n => performance.clearMarks(n))`))
		d := b.runAnalysis(t, 20*time.Minute)
		walls = append(walls, d.Seconds())
		marks, _ := chromedp.Run(b.ctx, chromedp.Evaluate[map[string]float64](`Object.fromEntries(performance.getEntriesByType("mark").map(e => [e.name, e.startTime]))`))
		t.Logf("run %d: %.2f s from the click to the table (run → units %.2f s, → results %.2f s, → drawn %.2f s)", i+1, d.Seconds(),
			(marks["amplink-units"]-marks["amplink-run"])/1000, (marks["amplink-results"]-marks["amplink-units"])/1000,
			(marks["amplink-done"]-marks["amplink-results"])/1000)
	}
	slices.Sort(walls)
	t.Logf("standard workload in the page, %d worker(s) (hardwareConcurrency %d): median %.2f s of %v", max(1, workers), workers, walls[len(walls)/2], walls)

	pt := b.table(t)
	checkHeader(t, pt.H)
	src := wire.Source{Name: "workload.f32"}
	files := job.Files{}
	for _, p := range paths[:2] {
		data, err := os.ReadFile(p)
		if err != nil {
			t.Fatal(err)
		}
		files[filepath.Base(p)] = format.Bytes(filepath.Base(p), data)
	}
	rj, err := os.ReadFile(paths[2])
	if err != nil {
		t.Fatal(err)
	}
	compareNative(t, pt, nativeRun(t, rj, src, files))
}
