package study

import (
	"fmt"
	"path"
	"strings"

	"amplink/core/format"
)

// Siblings returns the files beside r as dataset.Open asks for them: a
// name ending in "_events.tsv", "_channels.tsv", "_electrodes.tsv",
// "_trials.csv" or "_trials.tsv" (or with "." for the "_") gets the
// companion that applies to r by the inheritance principle, wherever it
// lies, and an error wrapping format.ErrNoSibling when none applies; any
// other name (a recording's own sidecar, such as the .json of an .f32) is
// opened in r's folder.
func (r *Recording) Siblings(open Opener) format.Siblings {
	return &siblings{r: r, open: open}
}

type siblings struct {
	r    *Recording
	open Opener
}

func (s *siblings) Open(name string) (format.File, error) {
	base := path.Base(strings.ReplaceAll(name, "\\", "/"))
	for _, kind := range companionKinds {
		exts := []string{".tsv"}
		if kind == "trials" {
			exts = []string{".csv", ".tsv"}
		}
		for _, ext := range exts {
			if strings.HasSuffix(base, "_"+kind+ext) || strings.HasSuffix(base, "."+kind+ext) {
				p, ok := s.r.Companions[kind]
				if !ok {
					return format.File{}, fmt.Errorf("%s: no %s table applies to %s: %w", name, kind, s.r.Path, format.ErrNoSibling)
				}
				return s.open.Open(p)
			}
		}
	}
	return s.open.Open(path.Join(path.Dir(s.r.Path), base))
}
