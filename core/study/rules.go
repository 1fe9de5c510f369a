package study

import (
	"encoding/json"
	"errors"
	"fmt"
	"io"
	"path"
	"strconv"
	"strings"
)

// The rules Find applies to each name: what kind of companion it is, whether
// the filter keeps a recording, and how companions are inherited from the
// folders above a recording (the BIDS inheritance principle).

// kindOf returns the companion kind of a name, or "".
func kindOf(n Name) string {
	switch {
	case n.Ext == ".tsv" && (n.Suffix == "events" || n.Suffix == "channels" || n.Suffix == "electrodes" || n.Suffix == "trials"):
		return n.Suffix
	case n.Ext == ".csv" && n.Suffix == "trials":
		return n.Suffix // amplink's own trials table may be CSV
	}
	return ""
}

// reject returns why the filter leaves r out, or "".
func (f Filter) reject(r *Recording, want map[string]bool) string {
	switch {
	case len(want) > 0 && !want[r.Sub]:
		return "participant sub-" + r.Sub + " is not selected"
	case f.Task != "" && r.Task != f.Task:
		return fmt.Sprintf("task %q, not %q", r.Task, f.Task)
	case f.Session != "" && r.Ses != strings.TrimPrefix(f.Session, "ses-"):
		return fmt.Sprintf("session %q, not %q", r.Ses, f.Session)
	case f.Run != "" && !sameRun(r.Run, f.Run):
		return fmt.Sprintf("run %q, not %q", r.Run, f.Run)
	}
	return ""
}

// sameRun compares run indices as numbers ("01" is run 1).
func sameRun(a, b string) bool {
	x, err1 := strconv.Atoi(a)
	y, err2 := strconv.Atoi(strings.TrimPrefix(b, "run-"))
	if err1 != nil || err2 != nil {
		return a == b
	}
	return x == y
}

// attach finds each kind of companion for r by the inheritance principle.
func attach(r *Recording, comps []*companion) error {
	dir := path.Dir(r.Path)
	for _, kind := range companionKinds {
		var best []*companion
		bestDepth, bestN := -1, -1
		for _, c := range comps {
			if c.kind != kind || !above(c.dir, dir) || !subset(c.name, r.Name) {
				continue
			}
			n := len(c.name.Entities)
			switch {
			case c.depth > bestDepth || (c.depth == bestDepth && n > bestN):
				best, bestDepth, bestN = []*companion{c}, c.depth, n
			case c.depth == bestDepth && n == bestN:
				best = append(best, c)
			}
		}
		if len(best) > 1 {
			var ps []string
			for _, c := range best {
				ps = append(ps, c.path)
			}
			return fmt.Errorf("the inheritance principle gives no single %s table: %s apply at the same level", kind, strings.Join(ps, " and "))
		}
		if len(best) == 1 {
			if r.Companions == nil {
				r.Companions = map[string]string{}
			}
			r.Companions[kind] = best[0].path
			best[0].used = true
		}
	}
	return nil
}

// above reports whether folder a is folder b or one of its ancestors ("" is
// the root).
func above(a, b string) bool {
	return a == "" || a == b || strings.HasPrefix(b, a+"/")
}

// subset reports whether every entity of c appears in r with the same value.
func subset(c, r Name) bool {
	for _, e := range c.Entities {
		if r.Get(e.Key) != e.Value {
			return false
		}
	}
	return true
}

// readDescription reads Name and BIDSVersion from dataset_description.json;
// a file that cannot be read becomes a note.
func (s *Study) readDescription(open Opener) {
	f, err := open.Open("dataset_description.json")
	if err != nil {
		s.Notes = append(s.Notes, "dataset_description.json: "+err.Error())
		return
	}
	const maxDesc = 1 << 20
	if f.Size > maxDesc {
		s.Notes = append(s.Notes, fmt.Sprintf("dataset_description.json: %d bytes is too large to read (at most %d)", f.Size, maxDesc))
		return
	}
	b := make([]byte, f.Size)
	if _, err := f.R.ReadAt(b, 0); err != nil && !errors.Is(err, io.EOF) {
		s.Notes = append(s.Notes, "dataset_description.json: "+err.Error())
		return
	}
	var d struct {
		Name        string
		BIDSVersion string
	}
	if err := json.Unmarshal(b, &d); err != nil {
		s.Notes = append(s.Notes, "dataset_description.json: "+err.Error())
		return
	}
	s.Name, s.BIDSVersion = d.Name, d.BIDSVersion
	if d.Name == "" || d.BIDSVersion == "" {
		s.Notes = append(s.Notes, "dataset_description.json lacks Name or BIDSVersion (BIDS requires both)")
	}
}

// TrimRoot removes the dataset's own folder from paths listed from above
// it, as a browser lists a picked folder ("study/sub-01/…"): when every
// path lies inside one folder that is not itself part of the BIDS layout
// (not sub-<label>, code, derivatives, …), it returns that folder and the
// paths below it; otherwise "" and the paths unchanged.
func TrimRoot(paths []string) (string, []string) {
	root := ""
	for _, p := range paths {
		p = strings.TrimPrefix(strings.ReplaceAll(p, "\\", "/"), "/")
		first, _, ok := strings.Cut(p, "/")
		if !ok || (root != "" && first != root) {
			return "", paths
		}
		root = first
	}
	if root == "" || strings.HasPrefix(root, "sub-") || otherDirs[root] {
		return "", paths
	}
	out := make([]string, len(paths))
	for i, p := range paths {
		out[i] = strings.TrimPrefix(strings.TrimPrefix(strings.ReplaceAll(p, "\\", "/"), "/"), root+"/")
	}
	return root, out
}
