//go:build !wasm

package main

import (
	"os"
	"path/filepath"
	"regexp"
	"strings"
	"testing"
)

// The page as the static site pre-renders it (before any script runs):
// the contract ids, labels tied to every field, and nothing the
// Content-Security-Policy would refuse.

var (
	tagRe  = regexp.MustCompile(`<([a-zA-Z][a-zA-Z0-9]*)((?:\s+[a-zA-Z-]+(?:="[^"]*")?)*)\s*/?>`)
	attrRe = regexp.MustCompile(`([a-zA-Z-]+)(?:="([^"]*)")?`)
)

type tag struct {
	name  string
	attrs map[string]string
}

func parseTags(html string) []tag {
	var out []tag
	for _, m := range tagRe.FindAllStringSubmatch(html, -1) {
		t := tag{name: strings.ToLower(m[1]), attrs: map[string]string{}}
		for _, a := range attrRe.FindAllStringSubmatch(m[2], -1) {
			t.attrs[a[1]] = a[2]
		}
		out = append(out, t)
	}
	return out
}

func TestPagePrerendered(t *testing.T) {
	dir, _ := testSite(t)
	b, err := os.ReadFile(filepath.Join(dir, "index.html"))
	if err != nil {
		t.Fatal(err)
	}
	tags := parseTags(string(b))
	ids := map[string]int{}
	labels := map[string]bool{}
	for _, tg := range tags {
		if id, ok := tg.attrs["id"]; ok {
			ids[id]++
		}
		if tg.name == "label" {
			labels[tg.attrs["for"]] = true
		}
	}
	t.Run("contract ids", func(t *testing.T) {
		for _, id := range []string{"file-input", "load-demo", "run-analysis", "cancel-analysis", "progress", "results"} {
			if ids[id] != 1 {
				t.Errorf("id %q appears %d times, want once", id, ids[id])
			}
		}
	})
	t.Run("unique ids", func(t *testing.T) {
		for id, n := range ids {
			if n > 1 {
				t.Errorf("id %q appears %d times", id, n)
			}
		}
	})
	t.Run("labels", func(t *testing.T) {
		fields := 0
		for _, tg := range tags {
			switch tg.name {
			case "input", "select", "progress":
				fields++
				if id := tg.attrs["id"]; id == "" || !labels[id] {
					t.Errorf("<%s id=%q> has no <label for>", tg.name, id)
				}
			case "label":
				if f := tg.attrs["for"]; ids[f] == 0 {
					t.Errorf("<label for=%q> names no element", f)
				}
			}
		}
		if fields < 10 {
			t.Errorf("only %d form fields pre-rendered", fields)
		}
	})
	t.Run("csp safe", func(t *testing.T) {
		for _, tg := range tags {
			if _, ok := tg.attrs["style"]; ok {
				t.Errorf("<%s> has an inline style attribute, which style-src 'self' refuses", tg.name)
			}
			for a := range tg.attrs {
				if strings.HasPrefix(a, "on") {
					t.Errorf("<%s> has an inline %s handler", tg.name, a)
				}
			}
			if tg.name == "script" && tg.attrs["src"] == "" {
				t.Errorf("inline <script>, which script-src 'self' refuses")
			}
		}
		if strings.Contains(string(b), "<style") {
			t.Error("inline <style> element")
		}
	})
	t.Run("cautions", func(t *testing.T) {
		s := string(b)
		for _, want := range []string{
			"not a diagnostic device",
			"institution",
			"nothing is uploaded",
			"The page holds recordings of up to 1024 MiB of samples", // what it can hold, before a file is picked
		} {
			if !strings.Contains(s, want) {
				t.Errorf("the page does not say %q", want)
			}
		}
	})
}
