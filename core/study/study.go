package study

import (
	"fmt"
	"path"
	"sort"
	"strconv"
	"strings"

	"amplink/core/format"
	"amplink/core/format/bids"
)

// Opener opens a file of the dataset by its slash-separated path relative to
// the dataset root. A missing file is an error wrapping format.ErrNoSibling.
type Opener interface {
	Open(path string) (format.File, error)
}

// Entity is one key-value pair of a BIDS file name.
type Entity struct {
	Key   string `json:"key"`
	Value string `json:"value"`
}

// Name is a parsed BIDS file name: its entities in order, the suffix and
// the extension (with its dot, e.g. ".edf").
type Name struct {
	Entities []Entity `json:"entities"`
	Suffix   string   `json:"suffix"`
	Ext      string   `json:"ext"`
}

// Get returns the value of the entity key, empty when the name has none.
func (n Name) Get(key string) string {
	for _, e := range n.Entities {
		if e.Key == key {
			return e.Value
		}
	}
	return ""
}

// entityOrder is the order of the entities in the specification's entity
// table (appendix "Entity table"; from memory, checked for the entities of
// EEG, MEG and iEEG: sub, ses, task, acq, run, proc, space, split, desc).
var entityOrder = []string{"sub", "ses", "sample", "task", "tracksys", "acq", "nuc", "voi", "ce", "trc", "stain", "rec", "dir", "run", "mod", "echo", "flip", "inv", "mt", "part", "proc", "hemi", "space", "split", "recording", "chunk", "seg", "res", "den", "label", "desc"}

var entityRank = func() map[string]int {
	m := map[string]int{}
	for i, k := range entityOrder {
		m[k] = i
	}
	return m
}()

// ParseName parses a BIDS file name (the base name, without folders):
// key-value entities joined by "_", then the suffix, then the extension
// from the first dot. The entities must be known, each at most once, in the
// specification's order, with alphanumeric values; run, echo, flip, inv,
// split and chunk take a non-negative integer. A name with no entities is
// allowed (a dataset-level companion such as "events.tsv").
func ParseName(base string) (Name, error) {
	var n Name
	stem := base
	if i := strings.IndexByte(base, '.'); i >= 0 {
		stem, n.Ext = base[:i], strings.ToLower(base[i:])
	}
	parts := strings.Split(stem, "_")
	n.Suffix = parts[len(parts)-1]
	if !bids.IsLabel(n.Suffix) {
		return Name{}, fmt.Errorf("suffix %q is not alphanumeric", n.Suffix)
	}
	last := -1
	for _, p := range parts[:len(parts)-1] {
		k, v, ok := strings.Cut(p, "-")
		if !ok {
			return Name{}, fmt.Errorf("%q is not an entity key-value pair", p)
		}
		r, known := entityRank[k]
		if !known {
			return Name{}, fmt.Errorf("unknown entity %q", k)
		}
		if !bids.IsLabel(v) {
			return Name{}, fmt.Errorf("entity %s has value %q, not an alphanumeric label", k, v)
		}
		switch k {
		case "run", "echo", "flip", "inv", "split", "chunk":
			if _, err := strconv.ParseUint(v, 10, 31); err != nil {
				return Name{}, fmt.Errorf("entity %s has value %q, not a non-negative integer", k, v)
			}
		}
		if r == last {
			return Name{}, fmt.Errorf("entity %s appears twice", k)
		}
		if r < last {
			return Name{}, fmt.Errorf("entity %s comes after %s; the specification's order is %s", k, entityOrder[last], orderOf(n.Entities, k))
		}
		last = r
		n.Entities = append(n.Entities, Entity{k, v})
	}
	return n, nil
}

// orderOf lists the keys of es plus k in the specification's order.
func orderOf(es []Entity, k string) string {
	keys := []string{k}
	for _, e := range es {
		keys = append(keys, e.Key)
	}
	sort.Slice(keys, func(i, j int) bool { return entityRank[keys[i]] < entityRank[keys[j]] })
	return strings.Join(keys, ", ")
}

// Companion kinds, in the order they are reported.
var companionKinds = []string{"events", "channels", "electrodes", "trials"}

// Recording is one recording found in the dataset.
type Recording struct {
	Path     string `json:"path"`     // slash-separated, relative to the root
	Datatype string `json:"datatype"` // eeg, meg or ieeg
	Name     Name   `json:"name"`
	Sub      string `json:"sub"`
	Ses      string `json:"ses,omitempty"`
	Task     string `json:"task,omitempty"`
	Acq      string `json:"acq,omitempty"`
	Run      string `json:"run,omitempty"`
	// Companions maps a kind (events, channels, electrodes, trials) to the
	// path of the table that applies by the inheritance principle.
	Companions map[string]string `json:"companions,omitempty"`
	// Participant holds the participant's participants.tsv columns (missing
	// values left out); nil when there is no row for the participant.
	Participant map[string]string `json:"participant,omitempty"`
	// Group is the value of the chosen group column.
	Group string `json:"group,omitempty"`
}

// Base returns the recording's file name, which is unique in a dataset
// (it carries the sub and ses entities) and names the recording in results.
func (r *Recording) Base() string { return path.Base(r.Path) }

// Skipped is a file or folder that Find did not use, with the reason.
type Skipped struct {
	Path   string `json:"path"`
	Reason string `json:"reason"`
}

// Filter selects recordings. Empty fields select everything.
type Filter struct {
	Task         string   // task label
	Session      string   // session label
	Run          string   // run index; "1" matches run-01
	Participants []string // labels, with or without "sub-"
	// GroupColumn names the participants.tsv column that assigns each
	// recording to one of two groups. Recordings whose participant has no
	// value there are skipped.
	GroupColumn string
}

// Study is what Find found.
type Study struct {
	Name        string      `json:"name,omitempty"`        // dataset_description.json Name
	BIDSVersion string      `json:"bidsVersion,omitempty"` // dataset_description.json BIDSVersion
	Recordings  []Recording `json:"recordings"`
	Skipped     []Skipped   `json:"skipped,omitempty"`
	// Columns lists the participants.tsv columns after participant_id; nil
	// without a participants.tsv.
	Columns     []string `json:"columns,omitempty"`
	GroupColumn string   `json:"groupColumn,omitempty"`
	// Groups lists the two group labels in byte order, when a group column
	// was chosen.
	Groups []string `json:"groups,omitempty"`
	Notes  []string `json:"notes,omitempty"`
}

// Participants, Sessions, Tasks and Runs list the distinct labels among
// the recordings, sorted.
func (s *Study) Participants() []string {
	return s.distinct(func(r *Recording) string { return r.Sub })
}
func (s *Study) Sessions() []string { return s.distinct(func(r *Recording) string { return r.Ses }) }
func (s *Study) Tasks() []string    { return s.distinct(func(r *Recording) string { return r.Task }) }
func (s *Study) Runs() []string     { return s.distinct(func(r *Recording) string { return r.Run }) }

func (s *Study) distinct(f func(*Recording) string) []string {
	seen := map[string]bool{}
	var out []string
	for i := range s.Recordings {
		if v := f(&s.Recordings[i]); v != "" && !seen[v] {
			seen[v] = true
			out = append(out, v)
		}
	}
	sort.Strings(out)
	return out
}

// GroupOf maps each recording's base name to its group; nil without a
// group column. It is the table `amplink run --groups` reads.
func (s *Study) GroupOf() map[string]string {
	if s.GroupColumn == "" {
		return nil
	}
	m := map[string]string{}
	for i := range s.Recordings {
		m[s.Recordings[i].Base()] = s.Recordings[i].Group
	}
	return m
}

// Data extensions amplink reads, and those of BIDS formats it does not.
var (
	readExt = map[string]bool{".edf": true, ".bdf": true, ".f32": true, ".wav": true, ".mp3": true, ".csv": true}
	// The parts of a recording in a format amplink does not read: BrainVision
	// (.vhdr, .vmrk, .eeg), EEGLAB (.set, .fdt), MEG (.fif, .sqd, .con, .raw),
	// NWB (.nwb), MEF (.mefd, a folder) and CTF (.ds, a folder).
	otherExt = map[string]string{".vhdr": "BrainVision", ".vmrk": "BrainVision", ".eeg": "BrainVision", ".set": "EEGLAB", ".fdt": "EEGLAB",
		".fif": "FIF", ".sqd": "KIT", ".con": "KIT", ".raw": "raw MEG", ".nwb": "NWB", ".mefd": "MEF", ".ds": "CTF"}
	datatypes = map[string]bool{"eeg": true, "meg": true, "ieeg": true}
	// Files at the root that BIDS defines and amplink does not need to report.
	rootFiles = map[string]bool{"dataset_description.json": true, "participants.tsv": true, "participants.json": true,
		"README": true, "README.md": true, "README.txt": true, "README.rst": true, "CHANGES": true, "LICENSE": true,
		"CITATION.cff": true, ".bidsignore": true, "genetic_info.json": true, "samples.tsv": true, "samples.json": true}
	// Root folders that hold no raw data.
	otherDirs = map[string]bool{"code": true, "derivatives": true, "sourcedata": true, "stimuli": true, "phenotype": true}
)

// companion is a candidate companion table.
type companion struct {
	path  string
	dir   string // its folder
	kind  string
	name  Name
	used  bool
	depth int // number of folders below the root
}

// Find finds the recordings of the dataset whose files are listed in paths
// (slash-separated, relative to the dataset root; folders need not be
// listed) and keeps those the filter selects. It opens
// dataset_description.json and participants.tsv through open. Errors are
// for a participants.tsv that cannot be read, and for a group column that
// is absent or does not give exactly two groups; everything else that
// cannot be used is reported in Skipped or Notes.
func Find(paths []string, open Opener, f Filter) (*Study, error) {
	s := &Study{}
	var comps []*companion
	var cands []Recording          // recordings found, before the filter
	skipDir := map[string]string{} // folder → reason, reported once
	skip := func(p, reason string) { s.Skipped = append(s.Skipped, Skipped{p, reason}) }
	clean := make([]string, 0, len(paths))
	for _, p := range paths {
		p = strings.TrimPrefix(path.Clean("/"+strings.ReplaceAll(p, "\\", "/")), "/")
		if p != "" && p != "." {
			clean = append(clean, p)
		}
	}
	sort.Strings(clean)
	hasDesc, hasParticipants := false, false
	for _, p := range clean {
		parts := strings.Split(p, "/")
		base := parts[len(parts)-1]
		hidden := false
		for _, q := range parts {
			if strings.HasPrefix(q, ".") && q != ".bidsignore" {
				hidden = true
			}
		}
		if hidden {
			continue // hidden files and folders (.git, .DS_Store) are not part of the dataset
		}
		if len(parts) == 1 {
			switch {
			case base == "dataset_description.json":
				hasDesc = true
			case base == "participants.tsv":
				hasParticipants = true
			case rootFiles[base]:
			case strings.HasSuffix(base, ".json"):
				// A dataset-level sidecar (e.g. task-x_eeg.json): metadata amplink does not read.
			default:
				if n, err := ParseName(base); err == nil && kindOf(n) != "" {
					comps = append(comps, &companion{path: p, dir: "", kind: kindOf(n), name: n})
				} else {
					skip(p, "not part of a BIDS dataset's layout")
				}
			}
			continue
		}
		if otherDirs[parts[0]] {
			skipDir[parts[0]+"/"] = "holds no raw recordings (BIDS keeps code, derivatives, sourcedata, stimuli and phenotype apart)"
			continue
		}
		sub, ok := strings.CutPrefix(parts[0], "sub-")
		if !ok || !bids.IsLabel(sub) {
			skipDir[parts[0]+"/"] = "not a subject folder (sub-<label>)"
			continue
		}
		rest := parts[1:]
		ses := ""
		if len(rest) > 1 {
			if l, ok := strings.CutPrefix(rest[0], "ses-"); ok && bids.IsLabel(l) {
				ses, rest = l, rest[1:]
			}
		}
		dir := path.Dir(p)
		if strings.HasSuffix(base, ".json") {
			continue // sidecar metadata, not read
		}
		if len(rest) == 1 {
			// A subject- or session-level file: a companion, or sessions/scans tables.
			n, err := ParseName(base)
			switch {
			case err != nil:
				skip(p, "not a BIDS file name: "+err.Error())
			case kindOf(n) != "":
				comps = append(comps, &companion{path: p, dir: dir, kind: kindOf(n), name: n, depth: len(parts) - 1})
			case n.Suffix == "sessions" || n.Suffix == "scans":
			case datatypes[n.Suffix]:
				skip(p, "a recording must lie in a datatype folder ("+n.Suffix+"/) below its subject or session")
			default:
				skip(p, "not a recording or a companion amplink reads")
			}
			continue
		}
		if len(rest) > 2 {
			// Inside a folder inside the datatype folder: a CTF .ds or MEF .mefd recording.
			inner := strings.Join(parts[:len(parts)-len(rest)+2], "/")
			if kind, ok := otherExt[strings.ToLower(path.Ext(inner))]; ok {
				skipDir[inner+"/"] = kind + " is a format amplink does not read (export the recording as EDF or BDF)"
			} else {
				skipDir[path.Dir(p)+"/"] = "not a BIDS folder"
			}
			continue
		}
		dt := rest[0]
		if !datatypes[dt] {
			skipDir[dir+"/"] = "datatype " + dt + " holds no recordings amplink reads (eeg, meg, ieeg)"
			continue
		}
		n, err := ParseName(base)
		if err != nil {
			skip(p, "not a BIDS file name: "+err.Error())
			continue
		}
		if k := kindOf(n); k != "" {
			comps = append(comps, &companion{path: p, dir: dir, kind: k, name: n, depth: len(parts) - 1})
			continue
		}
		if n.Suffix != dt {
			if n.Suffix == "coordsystem" || n.Suffix == "photo" || n.Suffix == "headshape" || n.Suffix == "markers" {
				continue // spatial metadata amplink does not read
			}
			skip(p, fmt.Sprintf("suffix %s is not the recording suffix %s of the %s folder", n.Suffix, dt, dt))
			continue
		}
		if kind, ok := otherExt[n.Ext]; ok {
			if n.Ext == ".vhdr" || n.Ext == ".set" || n.Ext == ".fif" || n.Ext == ".sqd" || n.Ext == ".con" || n.Ext == ".nwb" || n.Ext == ".raw" {
				skip(p, kind+" is a format amplink does not read (export the recording as EDF or BDF)")
			}
			continue // the other parts of such a recording
		}
		if !readExt[n.Ext] {
			skip(p, fmt.Sprintf("extension %s is not a recording format amplink reads (.edf, .bdf, .f32, .wav, .mp3, .csv)", n.Ext))
			continue
		}
		if got := n.Get("sub"); got != sub {
			skip(p, fmt.Sprintf("its sub entity %q does not match its folder sub-%s", got, sub))
			continue
		}
		if got := n.Get("ses"); got != ses {
			if ses == "" {
				skip(p, fmt.Sprintf("its ses entity %q has no ses-%s folder", got, got))
			} else {
				skip(p, fmt.Sprintf("its ses entity %q does not match its folder ses-%s", got, ses))
			}
			continue
		}
		cands = append(cands, Recording{Path: p, Datatype: dt, Name: n, Sub: sub, Ses: ses,
			Task: n.Get("task"), Acq: n.Get("acq"), Run: n.Get("run")})
	}
	dirs := make([]string, 0, len(skipDir))
	for d := range skipDir {
		dirs = append(dirs, d)
	}
	sort.Strings(dirs)
	for _, d := range dirs {
		skip(d, skipDir[d])
	}

	if hasDesc {
		s.readDescription(open)
	} else {
		s.Notes = append(s.Notes, "no dataset_description.json (BIDS requires one at the root)")
	}
	var parts *bids.Participants
	if hasParticipants {
		pf, err := open.Open("participants.tsv")
		if err != nil {
			return nil, err
		}
		if parts, err = bids.ReadParticipants(pf); err != nil {
			return nil, err
		}
		s.Columns = parts.Columns
		if s.Columns == nil {
			s.Columns = []string{}
		}
	} else {
		s.Notes = append(s.Notes, "no participants.tsv: the recordings have no per-participant columns")
	}
	if f.GroupColumn != "" {
		if parts == nil {
			return nil, fmt.Errorf("study: group column %q: the dataset has no participants.tsv", f.GroupColumn)
		}
		c, ok := parts.Column(f.GroupColumn)
		if !ok {
			return nil, fmt.Errorf("study: participants.tsv has no column %q; its columns are: %s", f.GroupColumn, strings.Join(parts.Columns, ", "))
		}
		s.GroupColumn = c
	}

	want := map[string]bool{}
	for _, p := range f.Participants {
		want[strings.TrimPrefix(p, "sub-")] = true
	}
	missing := map[string]bool{}
	for _, r := range cands {
		if reason := f.reject(&r, want); reason != "" {
			skip(r.Path, "left out by the filter: "+reason)
			continue
		}
		if err := attach(&r, comps); err != nil {
			skip(r.Path, err.Error())
			continue
		}
		if parts != nil {
			if row, ok := parts.Values[r.Sub]; ok {
				r.Participant = row
			} else {
				missing[r.Sub] = true
			}
		}
		if s.GroupColumn != "" {
			g, ok := r.Participant[s.GroupColumn]
			if !ok {
				if r.Participant == nil {
					skip(r.Path, fmt.Sprintf("participant sub-%s is not in participants.tsv, so it has no %s", r.Sub, s.GroupColumn))
				} else {
					skip(r.Path, fmt.Sprintf("participant sub-%s has no value (n/a) in participants.tsv column %s", r.Sub, s.GroupColumn))
				}
				continue
			}
			r.Group = g
		}
		s.Recordings = append(s.Recordings, r)
	}
	for _, c := range comps {
		if !c.used {
			skip(c.path, "a "+c.kind+" table that applies to no recording found")
		}
	}
	if len(missing) > 0 {
		var ls []string
		for l := range missing {
			ls = append(ls, "sub-"+l)
		}
		sort.Strings(ls)
		s.Notes = append(s.Notes, "not in participants.tsv: "+strings.Join(ls, ", "))
	}
	if parts != nil {
		have := map[string]bool{}
		for _, c := range cands {
			have[c.Sub] = true
		}
		var none []string
		for _, l := range parts.Labels {
			if !have[l] && (len(want) == 0 || want[l]) {
				none = append(none, "sub-"+l)
			}
		}
		if len(none) > 0 {
			s.Notes = append(s.Notes, "in participants.tsv without a recording found: "+strings.Join(none, ", "))
		}
	}
	if s.GroupColumn != "" {
		s.Groups = s.distinct(func(r *Recording) string { return r.Group })
		if len(s.Groups) != 2 {
			q := make([]string, len(s.Groups))
			for i, g := range s.Groups {
				q[i] = strconv.Quote(g)
			}
			return nil, fmt.Errorf("study: participants.tsv column %s gives %d groups among the recordings (%s); a comparison needs exactly two", s.GroupColumn, len(s.Groups), strings.Join(q, ", "))
		}
	}
	sort.SliceStable(s.Skipped, func(i, j int) bool { return s.Skipped[i].Path < s.Skipped[j].Path })
	return s, nil
}
