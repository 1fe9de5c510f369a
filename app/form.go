package app

import (
	"encoding/json"
	"errors"
	"fmt"
	"math"
	"regexp"
	"sort"
	"strconv"
	"strings"

	"amplink/core/recipe"
)

// kind is how a form field maps to JSON.
type kind int

const (
	kNum    kind = iota // a number ("" = absent)
	kStr                // a string ("" = absent)
	kNames              // a channel name, comma-separated names, or "*"
	kList               // comma-separated strings, always a JSON list
	kChoice             // one of Choices, a string; "" = absent
	kOrth               // leakage correction: "" (shown as none; absent), "pairwise" or "symmetric"
	kBool               // "on" or ""
)

// field is one input of the recipe form. Key is the JSON path relative to
// its object, with ".0"/".1" selecting an element of a two-number range:
// "seed.time.0" is the start of the seed window.
type field struct {
	Key     string
	Kind    kind
	Label   string
	Choices []string
	Types   []string // analysis types the field applies to; nil = all
	Hint    string
	Wide    bool
	// Default is what an empty input means (shown as its placeholder, or
	// named by a choice's "(default)" option); "" when empty means absent.
	Default string
}

// Top-level fields (epochs, spectral).
var topFields = []field{
	{Key: "epochs.enabled", Kind: kBool, Label: "Cut continuous data into epochs"},
	{Key: "epochs.event", Kind: kStr, Label: "Epoch event type", Hint: "an event type of the recording"},
	{Key: "epochs.start", Kind: kNum, Label: "Epoch start (s)"},
	{Key: "epochs.end", Kind: kNum, Label: "Epoch end (s)"},
	{Key: "spectral.low", Kind: kNum, Label: "Lowest frequency (Hz)", Default: "2"},
	{Key: "spectral.high", Kind: kNum, Label: "Highest frequency (Hz)", Default: "40"},
	{Key: "spectral.steps", Kind: kNum, Label: "Frequencies", Default: "30"},
	{Key: "spectral.spacing", Kind: kChoice, Label: "Spacing", Choices: []string{"log", "linear"}, Default: "log"},
	{Key: "spectral.cycles.0", Kind: kNum, Label: "Cycles at lowest", Default: "3"},
	{Key: "spectral.cycles.1", Kind: kNum, Label: "Cycles at highest", Default: "10"},
	{Key: "spectral.tolerance", Kind: kNum, Label: "Window-power tolerance (relative; 0: FFT only)", Default: "1e-10"},
	{Key: "figures.draw", Kind: kBool, Label: "Draw figures (off is faster for large tables)"},
	{Key: "figures.powerScale", Kind: kChoice, Label: "Power colour scale", Choices: []string{"log", "linear"}, Default: "log"},
}

// Where topFields' groups start: epochs, spectral settings, figures.
const (
	topSpectral = 4
	topFigures  = 11
)

var (
	windowTypes   = []string{recipe.TypeTrialWindow, recipe.TypeTFMap}
	envelopeTypes = []string{recipe.TypeEnvelope, recipe.TypeComodulogram}
	analysisTypes = []string{recipe.TypeTrialWindow, recipe.TypeTFMap, recipe.TypeEnvelope, recipe.TypeComodulogram}
)

// Fields of one analysis, in the order shown.
var analysisFields = []field{
	{Key: "id", Kind: kStr, Label: "Name"},
	{Key: "type", Kind: kChoice, Label: "Analysis", Choices: analysisTypes},
	{Key: "method", Kind: kChoice, Label: "Correlation", Choices: []string{"spearman", "pearson"}},

	{Key: "seed.channel", Kind: kNames, Label: "Seed channel(s)", Types: windowTypes, Hint: "name, names separated by commas, or * for all"},
	{Key: "seed.time.0", Kind: kNum, Label: "Seed from (s)", Types: windowTypes},
	{Key: "seed.time.1", Kind: kNum, Label: "Seed to (s)", Types: windowTypes},
	{Key: "seed.freq.0", Kind: kNum, Label: "Seed band low (Hz)", Types: windowTypes},
	{Key: "seed.freq.1", Kind: kNum, Label: "Seed band high (Hz)", Types: windowTypes},
	{Key: "target.channel", Kind: kNames, Label: "Target channel(s)", Types: windowTypes, Hint: "name, names separated by commas, or * for all"},
	{Key: "target.time.0", Kind: kNum, Label: "Target from (s)", Types: windowTypes},
	{Key: "target.time.1", Kind: kNum, Label: "Target to (s)", Types: windowTypes},
	{Key: "target.freq.0", Kind: kNum, Label: "Target band low (Hz)", Types: windowTypes},
	{Key: "target.freq.1", Kind: kNum, Label: "Target band high (Hz)", Types: windowTypes},
	{Key: "clusterFormingP", Kind: kNum, Label: "Cluster-forming p", Types: []string{recipe.TypeTFMap}, Default: "0.05"},
	{Key: "timeStep", Kind: kNum, Label: "Map time step (s)", Types: []string{recipe.TypeTFMap}, Default: "0.02"},

	{Key: "channels", Kind: kNames, Label: "Channels", Types: envelopeTypes, Hint: "names separated by commas, or * for all", Wide: true},
	{Key: "freq.0", Kind: kNum, Label: "Envelope band low (Hz)", Types: envelopeTypes},
	{Key: "freq.1", Kind: kNum, Label: "Envelope band high (Hz)", Types: envelopeTypes},
	{Key: "targetFreq.0", Kind: kNum, Label: "Second band low (Hz)", Types: envelopeTypes, Hint: "optional: cross-frequency"},
	{Key: "targetFreq.1", Kind: kNum, Label: "Second band high (Hz)", Types: envelopeTypes},
	{Key: "leakageCorrection", Kind: kOrth, Label: "Leakage correction", Choices: []string{"", "pairwise", "symmetric"}, Types: envelopeTypes},
	{Key: "segment", Kind: kNum, Label: "Segment length (s)", Types: envelopeTypes, Hint: "optional: r over time"},
	{Key: "envelope", Kind: kChoice, Label: "Envelope", Choices: []string{"amplitude", "log-power"}, Types: envelopeTypes, Hint: "amplitude, or log power", Default: "amplitude"},
	{Key: "envelopeRate", Kind: kNum, Label: "Envelope rate (Hz)", Types: envelopeTypes, Hint: "optional: bin the envelopes"},
	{Key: "trials", Kind: kChoice, Label: "Trials", Choices: []string{"average", "concatenate"}, Types: envelopeTypes, Default: "average"},
	{Key: "surrogates", Kind: kNum, Label: "Surrogates", Types: envelopeTypes, Default: "none"},
	{Key: "over", Kind: kChoice, Label: "Envelopes over", Choices: []string{"recording", "epochs"}, Types: envelopeTypes, Hint: "the whole recording, or the epochs", Default: "recording when continuous"},

	{Key: "permutations", Kind: kNum, Label: "Permutations", Types: windowTypes, Default: "none"},
	{Key: "randomSeed", Kind: kNum, Label: "Random seed", Default: "1"},
	{Key: "correction", Kind: kChoice, Label: "Multiple-test correction", Choices: []string{"none", "fdr", "bonferroni", "cluster"}, Default: "none"},
	{Key: "level", Kind: kNum, Label: "Confidence level", Default: "0.95"},
	{Key: "covariates", Kind: kList, Label: "Covariates", Types: []string{recipe.TypeTrialWindow}, Hint: "per-trial columns, separated by commas", Wide: true},
	{Key: "conditions.column", Kind: kStr, Label: "Condition column", Types: []string{recipe.TypeTrialWindow}, Default: "trial_type"},
	{Key: "conditions.compare.0", Kind: kStr, Label: "Compare level", Types: []string{recipe.TypeTrialWindow}},
	{Key: "conditions.compare.1", Kind: kStr, Label: "with level", Types: []string{recipe.TypeTrialWindow}},
}

// Form is the recipe as the page's inputs hold it: text by input key.
// Top-level keys are as in topFields; analysis i's keys are prefixed
// "analyses.i.".
type Form struct {
	Values   map[string]string
	Analyses int

	rev int // counts changes, so the page knows when to redraw the form

	// which inputs the user has typed in: the others are not marked
	// invalid until Run (or a loaded recipe) sets showAll
	touched map[string]bool
	showAll bool
}

// touch records that the user has typed in input k.
func (f *Form) touch(k string) {
	if f.touched == nil {
		f.touched = map[string]bool{}
	}
	f.touched[k] = true
}

// NewForm returns an empty form with one trial-window analysis.
func NewForm() *Form {
	return &Form{Values: map[string]string{"analyses.0.type": recipe.TypeTrialWindow, "figures.draw": "on"}, Analyses: 1}
}

func (f *Form) get(k string) string { return f.Values[k] }

func (f *Form) set(k, v string) {
	f.rev++
	if v == "" {
		delete(f.Values, k)
		return
	}
	f.Values[k] = v
}

// applies reports whether fd is shown for analysis type t.
func (fd field) applies(t string) bool {
	if fd.Types == nil {
		return true
	}
	for _, x := range fd.Types {
		if x == t {
			return true
		}
	}
	return false
}

// RecipePath is the field path recipe errors use for an input key:
// "analyses.0.seed.time.1" → "analyses[0].seed.time[1]".
func RecipePath(key string) string {
	parts := strings.Split(key, ".")
	var b strings.Builder
	for i, p := range parts {
		if _, err := strconv.Atoi(p); err == nil && i > 0 {
			b.WriteString("[" + p + "]")
			continue
		}
		if i > 0 {
			b.WriteByte('.')
		}
		b.WriteString(p)
	}
	return b.String()
}

// JSON builds the recipe JSON from the form. Numbers that do not parse are
// passed on as strings, so that recipe.Parse names the field.
func (f *Form) JSON() []byte {
	top := map[string]any{}
	if f.get("epochs.enabled") != "" {
		ep := map[string]any{}
		for _, fd := range topFields {
			if k, ok := strings.CutPrefix(fd.Key, "epochs."); ok && fd.Kind != kBool {
				putField(ep, k, fd.Kind, f.get(fd.Key))
			}
		}
		top["epochs"] = ep
	}
	sp := map[string]any{"method": "wavelet"}
	for _, fd := range topFields {
		if strings.HasPrefix(fd.Key, "spectral.") {
			putField(sp, strings.TrimPrefix(fd.Key, "spectral."), fd.Kind, f.get(fd.Key))
		}
	}
	top["spectral"] = sp
	switch scale := f.get("figures.powerScale"); {
	case f.get("figures.draw") == "":
		top["figures"] = false
	case scale != "":
		top["figures"] = map[string]any{"powerScale": scale}
	}
	list := make([]any, 0, f.Analyses)
	for i := 0; i < f.Analyses; i++ {
		pre := fmt.Sprintf("analyses.%d.", i)
		t := f.get(pre + "type")
		a := map[string]any{}
		for _, fd := range analysisFields {
			if !fd.applies(t) {
				continue
			}
			putField(a, fd.Key, fd.Kind, f.get(pre+fd.Key))
		}
		list = append(list, a)
	}
	top["analyses"] = list
	b, err := json.Marshal(top)
	if err != nil {
		panic("app: " + err.Error())
	}
	return b
}

// jsonValue converts one input's text; ok is false when the input is empty.
func jsonValue(k kind, s string) (any, bool) {
	s = strings.TrimSpace(s)
	if s == "" {
		return nil, false
	}
	switch k {
	case kNum:
		if jsonNumber.MatchString(s) {
			return json.Number(s), true // as typed, so "2.0" comes back as "2.0"
		}
		if v, err := strconv.ParseFloat(s, 64); err == nil && !math.IsInf(v, 0) && !math.IsNaN(v) {
			return json.Number(strconv.FormatFloat(v, 'g', -1, 64)), true
		}
		return s, true
	case kNames:
		parts := splitList(s)
		if len(parts) == 1 {
			return parts[0], true
		}
		out := make([]any, len(parts))
		for i, p := range parts {
			out[i] = p
		}
		return out, true
	case kList:
		parts := splitList(s)
		out := make([]any, len(parts))
		for i, p := range parts {
			out[i] = p
		}
		return out, true
	case kOrth:
		if s == "pairwise" || s == "symmetric" {
			return s, true
		}
		return nil, false
	case kBool:
		return true, true
	}
	return s, true
}

func splitList(s string) []string {
	var out []string
	for _, p := range strings.Split(s, ",") {
		if p = strings.TrimSpace(p); p != "" {
			out = append(out, p)
		}
	}
	return out
}

// putField stores one input's value in obj at key ("a.b", "a.b.0").
func putField(obj map[string]any, key string, k kind, s string) {
	v, ok := jsonValue(k, s)
	if !ok {
		return
	}
	parts := strings.Split(key, ".")
	idx := -1
	if n, err := strconv.Atoi(parts[len(parts)-1]); err == nil {
		idx = n
		parts = parts[:len(parts)-1]
	}
	m := obj
	for _, p := range parts[:len(parts)-1] {
		next, ok := m[p].(map[string]any)
		if !ok {
			next = map[string]any{}
			m[p] = next
		}
		m = next
	}
	last := parts[len(parts)-1]
	if idx < 0 {
		m[last] = v
		return
	}
	pair, ok := m[last].([]any)
	if !ok {
		pair = []any{nil, nil}
		m[last] = pair
	}
	pair[idx] = v
}

// ErrNotRecipe says dropped JSON is not a recipe.
var ErrNotRecipe = errors.New("not a recipe: it has no \"analyses\" list")

// FormFromJSON fills a form from recipe JSON (a dropped file, a shared
// link, the demo). It does not validate; recipe.Parse does.
func FormFromJSON(b []byte) (*Form, error) {
	var top map[string]any
	dec := json.NewDecoder(strings.NewReader(string(b)))
	dec.UseNumber()
	if err := dec.Decode(&top); err != nil {
		return nil, fmt.Errorf("recipe JSON: %w", err)
	}
	list, ok := top["analyses"].([]any)
	if !ok {
		return nil, ErrNotRecipe
	}
	f := &Form{Values: map[string]string{}, Analyses: len(list)}
	// figures: absent or true draws them, false or {"enabled": false} not
	switch fg := top["figures"].(type) {
	case bool:
		if fg {
			f.set("figures.draw", "on")
		}
	case map[string]any:
		if en, ok := fg["enabled"].(bool); !ok || en {
			f.set("figures.draw", "on")
		}
		if sc, ok := fg["powerScale"].(string); ok {
			f.set("figures.powerScale", sc)
		}
	default:
		f.set("figures.draw", "on")
	}
	if ep, ok := top["epochs"].(map[string]any); ok {
		f.set("epochs.enabled", "on")
		for _, k := range []string{"event", "start", "end"} {
			f.set("epochs."+k, textValue(ep[k], kNum))
		}
	}
	if sp, ok := top["spectral"].(map[string]any); ok {
		for _, fd := range topFields {
			if strings.HasPrefix(fd.Key, "spectral.") {
				f.set(fd.Key, lookup(sp, strings.TrimPrefix(fd.Key, "spectral."), fd.Kind))
			}
		}
		// one number for cycles means the same at both ends
		if c, ok := sp["cycles"].(json.Number); ok {
			f.set("spectral.cycles.0", c.String())
			f.set("spectral.cycles.1", c.String())
		}
	}
	for i, av := range list {
		a, ok := av.(map[string]any)
		if !ok {
			continue
		}
		if err := recipe.CheckRenamed(fmt.Sprintf("analyses[%d]", i), func(k string) bool { _, ok := a[k]; return ok }); err != nil {
			return nil, err
		}
		pre := fmt.Sprintf("analyses.%d.", i)
		for _, fd := range analysisFields {
			f.set(pre+fd.Key, lookup(a, fd.Key, fd.Kind))
		}
	}
	return f, nil
}

func lookup(obj map[string]any, key string, k kind) string {
	parts := strings.Split(key, ".")
	var cur any = obj
	for _, p := range parts {
		switch t := cur.(type) {
		case map[string]any:
			cur = t[p]
		case []any:
			n, err := strconv.Atoi(p)
			if err != nil || n >= len(t) {
				return ""
			}
			cur = t[n]
		default:
			return ""
		}
	}
	return textValue(cur, k)
}

func textValue(v any, k kind) string {
	switch t := v.(type) {
	case nil:
		return ""
	case string:
		if k == kOrth && t == "none" {
			return ""
		}
		return t
	case json.Number:
		return t.String()
	case bool:
		if t {
			return "on"
		}
		return ""
	case []any:
		var parts []string
		for _, e := range t {
			parts = append(parts, textValue(e, kStr))
		}
		return strings.Join(parts, ", ")
	}
	return fmt.Sprint(v)
}

// Validate parses the form's recipe. On a field error it returns the
// input key the message belongs to ("" when no input matches).
func (f *Form) Validate() (*recipe.Recipe, string, error) {
	r, err := recipe.Parse(f.JSON())
	if err == nil {
		return r, "", nil
	}
	return nil, f.KeyFor(err.Error()), err
}

// jsonNumber is the JSON number grammar (RFC 8259 §6).
var jsonNumber = regexp.MustCompile(`^-?(?:0|[1-9][0-9]*)(?:\.[0-9]+)?(?:[eE][+-]?[0-9]+)?$`)

var fieldPrefix = regexp.MustCompile(`^((?:epochs|spectral|analyses)[A-Za-z0-9_.\[\]]*): `)

// KeyFor finds the input an error message names ("analyses[0].seed.freq:
// …" → "analyses.0.seed.freq.0"): the input whose recipe path equals the
// field, else the first input inside the field, else the longest input
// path that contains the field. It returns "" when none does.
func (f *Form) KeyFor(msg string) string {
	m := fieldPrefix.FindStringSubmatch(msg)
	if m == nil {
		return ""
	}
	want := m[1]
	keys := f.Keys()
	for _, k := range keys {
		if RecipePath(k) == want {
			return k
		}
	}
	for _, k := range keys {
		p := RecipePath(k)
		if strings.HasPrefix(p, want+".") || strings.HasPrefix(p, want+"[") {
			return k
		}
	}
	best := ""
	for _, k := range keys {
		p := RecipePath(k)
		if strings.HasPrefix(want, p) && len(p) > len(RecipePath(best)) {
			best = k
		}
	}
	return best
}

// Keys lists the input keys shown, in display order.
func (f *Form) Keys() []string {
	var out []string
	for _, fd := range topFields {
		out = append(out, fd.Key)
	}
	for i := 0; i < f.Analyses; i++ {
		pre := fmt.Sprintf("analyses.%d.", i)
		t := f.get(pre + "type")
		for _, fd := range analysisFields {
			if fd.applies(t) {
				out = append(out, pre+fd.Key)
			}
		}
	}
	return out
}

// AddAnalysis appends an analysis of type t.
func (f *Form) AddAnalysis(t string) {
	f.rev++
	f.set(fmt.Sprintf("analyses.%d.type", f.Analyses), t)
	f.Analyses++
}

// RemoveAnalysis deletes analysis i, renumbering the ones after it.
func (f *Form) RemoveAnalysis(i int) {
	if i < 0 || i >= f.Analyses || f.Analyses == 1 {
		return
	}
	next := map[string]string{}
	for k, v := range f.Values {
		var n int
		var rest string
		if _, err := fmt.Sscanf(k, "analyses.%d.", &n); err != nil || !strings.HasPrefix(k, "analyses.") {
			next[k] = v
			continue
		}
		rest = strings.TrimPrefix(k, fmt.Sprintf("analyses.%d.", n))
		switch {
		case n < i:
			next[k] = v
		case n > i:
			next[fmt.Sprintf("analyses.%d.%s", n-1, rest)] = v
		}
	}
	f.Values = next
	f.Analyses--
	f.rev++
}

// Clone copies the form.
func (f *Form) Clone() *Form {
	g := &Form{Values: make(map[string]string, len(f.Values)), Analyses: f.Analyses}
	for k, v := range f.Values {
		g.Values[k] = v
	}
	return g
}

// sortedKeys is for stable debug output and tests.
func (f *Form) sortedKeys() []string {
	ks := make([]string, 0, len(f.Values))
	for k := range f.Values {
		ks = append(ks, k)
	}
	sort.Strings(ks)
	return ks
}
