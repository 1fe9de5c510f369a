package recipe

import (
	"encoding/json"
	"fmt"
	"strings"
)

// Recipe is a parsed analysis recipe. Zero values are filled with the
// defaults documented on each field when the recipe is parsed.
type Recipe struct {
	Epochs   *EpochSpec `json:"epochs,omitempty"`
	Spectral Spectral   `json:"spectral"`
	Figures  Figures    `json:"figures"`
	Analyses []Analysis `json:"analyses"`
}

// Figures controls the SVG figures a run draws.
type Figures struct {
	Enabled    bool   `json:"enabled"`    // default true
	PowerScale string `json:"powerScale"` // colour scale of power maps: "log" (default) or "linear"
}

// EpochSpec cuts continuous input into epochs around events.
type EpochSpec struct {
	Event string  `json:"event"`
	Start float64 `json:"start"` // s, relative to the event
	End   float64 `json:"end"`   // s
}

// Spectral sets the time-frequency decomposition.
type Spectral struct {
	Method  string     `json:"method"`  // "wavelet" (the only one)
	Low     float64    `json:"low"`     // Hz; default 2
	High    float64    `json:"high"`    // Hz; default 40
	Steps   int        `json:"steps"`   // number of frequencies; default 30
	Spacing string     `json:"spacing"` // "log" (default) or "linear"
	Cycles  [2]float64 `json:"cycles"`  // cycles at the lowest and highest frequency; default [3, 10]
	// Tolerance is the largest relative error allowed in a trial-window
	// power when it is computed through the window's quadratic form instead
	// of by FFT convolution; 0 asks for the FFT route everywhere. Absent
	// (nil) means the default, 1e-10 (see WindowTolerance).
	Tolerance *float64 `json:"tolerance,omitempty"`
}

// DefaultTolerance is spectral.tolerance when a recipe does not give it.
const DefaultTolerance = 1e-10

// MaxTolerance is the largest spectral.tolerance a recipe may give.
const MaxTolerance = 1e-3

// WindowTolerance returns spectral.tolerance, or DefaultTolerance when the
// recipe does not give it.
func (s Spectral) WindowTolerance() float64 {
	if s.Tolerance == nil {
		return DefaultTolerance
	}
	return *s.Tolerance
}

// Window is a time-frequency window on one or more channels.
type Window struct {
	Channel []string   `json:"channel"` // names, or ["*"] for every channel
	Time    [2]float64 `json:"time"`    // s, inclusive
	Freq    [2]float64 `json:"freq"`    // Hz, inclusive
}

// Conditions splits trials by an events column and compares two levels.
type Conditions struct {
	Column  string    `json:"column"`
	Compare [2]string `json:"compare"`
}

// Orth is the envelope leakage correction: "" (none), "pairwise" or "symmetric".
// In JSON (the key "leakageCorrection") it is "none", "pairwise" or "symmetric".
type Orth string

// Leakage-correction modes: none, pairwise orthogonalisation (Hipp et al.
// 2012) or symmetric orthogonalisation (Colclough et al. 2015).
const (
	OrthNone      Orth = ""
	OrthPairwise  Orth = "pairwise"
	OrthSymmetric Orth = "symmetric"
)

// MarshalJSON writes "none", "pairwise" or "symmetric".
func (o Orth) MarshalJSON() ([]byte, error) {
	if o == OrthNone {
		return []byte(`"none"`), nil
	}
	return json.Marshal(string(o))
}

// Analysis is one entry of the analyses list.
type Analysis struct {
	ID     string `json:"id"`
	Type   string `json:"type"`   // "trial-window", "tf-map", "envelope", "comodulogram"
	Method string `json:"method"` // "spearman" or "pearson"

	// trial-window and tf-map
	Seed   *Window `json:"seed,omitempty"`
	Target *Window `json:"target,omitempty"`

	// envelope and comodulogram
	Channels      []string    `json:"channels,omitempty"`
	Freq          *[2]float64 `json:"freq,omitempty"`
	TargetFreq    *[2]float64 `json:"targetFreq,omitempty"`
	Orthogonalize Orth        `json:"leakageCorrection,omitempty"`
	Segment       float64     `json:"segment,omitempty"`      // s; sliding segments for a time course of r
	EnvelopeRate  float64     `json:"envelopeRate,omitempty"` // Hz; low-pass and downsample envelopes
	Trials        string      `json:"trials,omitempty"`       // epoched input: "average" (default) or "concatenate"
	Surrogates    int         `json:"surrogates,omitempty"`   // time-shift (or trial-shuffle) surrogates for p
	Envelope      string      `json:"envelope,omitempty"`     // "amplitude" (the default, also "") or "log-power"
	Over          string      `json:"over,omitempty"`         // "recording" or "epochs"; default: the recording when there is one

	// inference
	Permutations int         `json:"permutations,omitempty"`
	RandomSeed   uint64      `json:"randomSeed,omitempty"`
	Correction   string      `json:"correction,omitempty"` // "none", "fdr", "bonferroni", "cluster"
	Level        float64     `json:"level,omitempty"`      // confidence level, default 0.95
	Covariates   []string    `json:"covariates,omitempty"`
	Conditions   *Conditions `json:"conditions,omitempty"`
	Threshold    float64     `json:"clusterFormingP,omitempty"` // cluster-forming p, default 0.05
	TimeStep     float64     `json:"timeStep,omitempty"`        // tf-map: s between map columns, default 0.02
}

// Analysis types.
const (
	TypeTrialWindow  = "trial-window"
	TypeTFMap        = "tf-map"
	TypeEnvelope     = "envelope"
	TypeComodulogram = "comodulogram"
)

// JSON returns the resolved recipe, with every default filled in, as
// indented JSON.
func (r *Recipe) JSON() []byte {
	b, err := json.MarshalIndent(r, "", "  ")
	if err != nil {
		panic("recipe: " + err.Error())
	}
	return append(b, '\n')
}

// Parse reads a recipe, checks every key, and fills the defaults. It does not
// check the recipe against data; NewPlan does that.
func Parse(b []byte) (*Recipe, error) {
	v, err := decodeJSON(b)
	if err != nil {
		return nil, err
	}
	top, err := asObj("", v)
	if err != nil {
		return nil, ferr("recipe", "must be a JSON object")
	}
	r := &Recipe{}
	if ev, ok := top.get("epochs"); ok {
		o, err := asObj("epochs", ev)
		if err != nil {
			return nil, err
		}
		e := &EpochSpec{}
		if err := o.str("event", &e.Event); err != nil {
			return nil, err
		}
		if e.Event == "" {
			return nil, ferr("epochs.event", "is required (the event type to cut at)")
		}
		if !o.has("start") || !o.has("end") {
			return nil, ferr("epochs", "needs start and end, in seconds around the event")
		}
		if err := o.num("start", &e.Start); err != nil {
			return nil, err
		}
		if err := o.num("end", &e.End); err != nil {
			return nil, err
		}
		if !(e.End > e.Start) {
			return nil, ferr("epochs.end", "%g s is not after start %g s", e.End, e.Start)
		}
		if err := o.done("event", "start", "end"); err != nil {
			return nil, err
		}
		r.Epochs = e
	}
	r.Spectral = Spectral{Method: "wavelet", Low: 2, High: 40, Steps: 30, Spacing: "log", Cycles: [2]float64{3, 10}}
	if sv, ok := top.get("spectral"); ok {
		if err := parseSpectral(sv, &r.Spectral); err != nil {
			return nil, err
		}
	}
	r.Figures = Figures{Enabled: true, PowerScale: "log"}
	if fv, ok := top.get("figures"); ok {
		switch t := fv.(type) {
		case bool:
			r.Figures.Enabled = t
		default:
			o, err := asObj("figures", fv)
			if err != nil {
				return nil, ferr("figures", "must be true, false or {\"enabled\", \"powerScale\"}")
			}
			if v, ok := o.get("enabled"); ok {
				b, isBool := v.(bool)
				if !isBool {
					return nil, ferr("figures.enabled", "must be true or false")
				}
				r.Figures.Enabled = b
			}
			if err := o.str("powerScale", &r.Figures.PowerScale); err != nil {
				return nil, err
			}
			if r.Figures.PowerScale != "log" && r.Figures.PowerScale != "linear" {
				return nil, ferr("figures.powerScale", "%q is not a scale; use \"log\" or \"linear\"", r.Figures.PowerScale)
			}
			if err := o.done("enabled", "powerScale"); err != nil {
				return nil, err
			}
		}
	}
	av, ok := top.get("analyses")
	if !ok {
		return nil, ferr("analyses", "is required: a list of analyses")
	}
	list, ok := av.([]any)
	if !ok || len(list) == 0 {
		return nil, ferr("analyses", "must be a non-empty list")
	}
	ids := map[string]bool{}
	for i, a := range list {
		an, err := parseAnalysis(fmt.Sprintf("analyses[%d]", i), a)
		if err != nil {
			return nil, err
		}
		if an.ID == "" {
			an.ID = fmt.Sprintf("a%d", i+1)
		}
		if ids[an.ID] {
			return nil, ferr(fmt.Sprintf("analyses[%d].id", i), "%q is used twice", an.ID)
		}
		ids[an.ID] = true
		r.Analyses = append(r.Analyses, an)
	}
	if err := top.done("epochs", "spectral", "figures", "analyses"); err != nil {
		return nil, err
	}
	return r, nil
}

func parseSpectral(v any, s *Spectral) error {
	o, err := asObj("spectral", v)
	if err != nil {
		return err
	}
	if err := o.str("method", &s.Method); err != nil {
		return err
	}
	if s.Method != "wavelet" {
		return ferr("spectral.method", "%q is not a method; use \"wavelet\"", s.Method)
	}
	if err := o.num("low", &s.Low); err != nil {
		return err
	}
	if err := o.num("high", &s.High); err != nil {
		return err
	}
	if err := o.integer("steps", &s.Steps, 1, 400); err != nil {
		return err
	}
	if err := o.str("spacing", &s.Spacing); err != nil {
		return err
	}
	if s.Spacing != "log" && s.Spacing != "linear" {
		return ferr("spectral.spacing", "%q is not a spacing; use \"log\" or \"linear\"", s.Spacing)
	}
	if s.Low <= 0 {
		return ferr("spectral.low", "must be above 0 Hz, not %g", s.Low)
	}
	if s.High < s.Low {
		return ferr("spectral.high", "%g Hz is below low %g Hz", s.High, s.Low)
	}
	if v, ok := o.get("cycles"); ok {
		switch t := v.(type) {
		case []any:
			if len(t) != 2 {
				return ferr("spectral.cycles", "must be [cycles at low, cycles at high] or one number")
			}
			for i := range 2 {
				f, err := number(fmt.Sprintf("spectral.cycles[%d]", i), t[i])
				if err != nil {
					return err
				}
				s.Cycles[i] = f
			}
		default:
			f, err := number("spectral.cycles", v)
			if err != nil {
				return err
			}
			s.Cycles = [2]float64{f, f}
		}
		for i := range 2 {
			if s.Cycles[i] < 1 || s.Cycles[i] > 100 {
				return ferr(fmt.Sprintf("spectral.cycles[%d]", i), "%g cycles is outside 1–100", s.Cycles[i])
			}
		}
	}
	if v, ok := o.get("tolerance"); ok {
		f, err := number("spectral.tolerance", v)
		if err != nil {
			return err
		}
		if f < 0 || f > MaxTolerance {
			return ferr("spectral.tolerance", "%g is outside 0–%g (a relative error; 0 computes every window power by FFT)", f, MaxTolerance)
		}
		s.Tolerance = &f
	}
	return o.done("method", "low", "high", "steps", "spacing", "cycles", "tolerance")
}

func parseWindow(path string, v any) (*Window, error) {
	o, err := asObj(path, v)
	if err != nil {
		return nil, err
	}
	w := &Window{}
	if err := o.names("channel", &w.Channel); err != nil {
		return nil, err
	}
	if w.Channel == nil {
		return nil, ferr(path+".channel", "is required: a name, a list of names, or \"*\"")
	}
	var tset, fset bool
	if err := o.pair("time", &w.Time, &tset); err != nil {
		return nil, err
	}
	if err := o.pair("freq", &w.Freq, &fset); err != nil {
		return nil, err
	}
	if !tset {
		return nil, ferr(path+".time", "is required: [start, end] in seconds")
	}
	if !fset {
		return nil, ferr(path+".freq", "is required: [low, high] in Hz")
	}
	return w, o.done("channel", "time", "freq")
}

func parseAnalysis(path string, v any) (Analysis, error) {
	var a Analysis
	o, err := asObj(path, v)
	if err != nil {
		return a, err
	}
	if err := o.str("id", &a.ID); err != nil {
		return a, err
	}
	if strings.ContainsAny(a.ID, "/\\ \t\n") {
		return a, ferr(path+".id", "%q may not contain spaces or slashes (it names output files)", a.ID)
	}
	if err := o.str("type", &a.Type); err != nil {
		return a, err
	}
	if err := CheckRenamed(path, o.has); err != nil {
		return a, err
	}
	keys := []string{"id", "type", "method", "permutations", "randomSeed", "correction", "level", "covariates", "conditions"}
	switch a.Type {
	case TypeTrialWindow, TypeTFMap:
		a.Method = "spearman"
		keys = append(keys, "seed", "target")
		if a.Type == TypeTFMap {
			keys = append(keys, "clusterFormingP", "timeStep")
		}
	case TypeEnvelope, TypeComodulogram:
		a.Method = "pearson"
		keys = append(keys, "channels", "freq", "targetFreq", "leakageCorrection", "segment", "envelopeRate", "trials", "surrogates", "over", "envelope")
	case "":
		return a, ferr(path+".type", "is required: one of %s", typeList)
	default:
		return a, ferr(path+".type", "%q is not an analysis type; use one of %s", a.Type, typeList)
	}
	if err := o.str("method", &a.Method); err != nil {
		return a, err
	}
	if a.Method != "spearman" && a.Method != "pearson" {
		return a, ferr(path+".method", "%q is not a method; use \"spearman\" or \"pearson\"", a.Method)
	}
	if err := o.integer("permutations", &a.Permutations, 0, 1000000); err != nil {
		return a, err
	}
	var seed float64
	if o.has("randomSeed") {
		if err := o.num("randomSeed", &seed); err != nil {
			return a, err
		}
		if seed < 0 || seed != float64(uint64(seed)) || seed > 1<<53 {
			return a, ferr(path+".randomSeed", "must be a whole number from 0 to 2^53")
		}
		a.RandomSeed = uint64(seed)
	} else {
		a.RandomSeed = 1
	}
	a.Correction = "none"
	if err := o.str("correction", &a.Correction); err != nil {
		return a, err
	}
	switch a.Correction {
	case "none", "fdr", "bonferroni":
	case "cluster":
		if a.Type != TypeTFMap {
			return a, ferr(path+".correction", "\"cluster\" applies to tf-map analyses only")
		}
	default:
		return a, ferr(path+".correction", "%q is not a correction; use \"none\", \"fdr\", \"bonferroni\" or \"cluster\" (tf-map)", a.Correction)
	}
	a.Level = 0.95
	if err := o.num("level", &a.Level); err != nil {
		return a, err
	}
	if !(a.Level > 0 && a.Level < 1) {
		return a, ferr(path+".level", "confidence level must lie between 0 and 1, not %g", a.Level)
	}
	if err := o.strs("covariates", &a.Covariates); err != nil {
		return a, err
	}
	if cv, ok := o.get("conditions"); ok {
		co, err := asObj(path+".conditions", cv)
		if err != nil {
			return a, err
		}
		c := &Conditions{}
		if err := co.str("column", &c.Column); err != nil {
			return a, err
		}
		if c.Column == "" {
			c.Column = "trial_type"
		}
		var cmp []string
		if err := co.strs("compare", &cmp); err != nil {
			return a, err
		}
		if len(cmp) != 2 || cmp[0] == cmp[1] {
			return a, ferr(path+".conditions.compare", "must name two different levels, e.g. [\"hit\", \"miss\"]")
		}
		c.Compare = [2]string{cmp[0], cmp[1]}
		if err := co.done("column", "compare"); err != nil {
			return a, err
		}
		a.Conditions = c
	}
	switch a.Type {
	case TypeTrialWindow, TypeTFMap:
		sv, ok := o.get("seed")
		if !ok {
			return a, ferr(path+".seed", "is required")
		}
		if a.Seed, err = parseWindow(path+".seed", sv); err != nil {
			return a, err
		}
		tv, ok := o.get("target")
		if !ok {
			return a, ferr(path+".target", "is required")
		}
		if a.Target, err = parseWindow(path+".target", tv); err != nil {
			return a, err
		}
		if a.Type == TypeTFMap {
			a.Threshold = 0.05
			if err := o.num("clusterFormingP", &a.Threshold); err != nil {
				return a, err
			}
			if !(a.Threshold > 0 && a.Threshold < 1) {
				return a, ferr(path+".clusterFormingP", "must be a p-value between 0 and 1")
			}
			a.TimeStep = 0.02
			if err := o.num("timeStep", &a.TimeStep); err != nil {
				return a, err
			}
			if !(a.TimeStep > 0) {
				return a, ferr(path+".timeStep", "must be a positive time in seconds")
			}
		}
	case TypeEnvelope, TypeComodulogram:
		if err := o.names("channels", &a.Channels); err != nil {
			return a, err
		}
		if a.Channels == nil {
			return a, ferr(path+".channels", "is required: a list of names, or \"*\"")
		}
		var f, tf [2]float64
		var fset, tfset bool
		if err := o.pair("freq", &f, &fset); err != nil {
			return a, err
		}
		if err := o.pair("targetFreq", &tf, &tfset); err != nil {
			return a, err
		}
		if fset {
			a.Freq = &f
		}
		if tfset {
			a.TargetFreq = &tf
		}
		if a.Type == TypeEnvelope && !fset {
			return a, ferr(path+".freq", "is required: [low, high] in Hz")
		}
		lc := "none"
		if err := o.str("leakageCorrection", &lc); err != nil {
			return a, ferr(path+".leakageCorrection", "must be \"none\", \"pairwise\" or \"symmetric\"")
		}
		switch lc {
		case "none":
		case "pairwise":
			a.Orthogonalize = OrthPairwise
		case "symmetric":
			a.Orthogonalize = OrthSymmetric
		default:
			return a, ferr(path+".leakageCorrection", "%q is not a correction; use \"none\", \"pairwise\" or \"symmetric\"", lc)
		}
		if err := o.num("segment", &a.Segment); err != nil {
			return a, err
		}
		if a.Segment < 0 {
			return a, ferr(path+".segment", "must be a positive length in seconds")
		}
		if err := o.num("envelopeRate", &a.EnvelopeRate); err != nil {
			return a, err
		}
		if a.EnvelopeRate < 0 {
			return a, ferr(path+".envelopeRate", "must be a positive rate in Hz")
		}
		a.Trials = "average"
		if err := o.str("trials", &a.Trials); err != nil {
			return a, err
		}
		if a.Trials != "average" && a.Trials != "concatenate" {
			return a, ferr(path+".trials", "%q is not a mode; use \"average\" or \"concatenate\"", a.Trials)
		}
		if err := o.integer("surrogates", &a.Surrogates, 0, 100000); err != nil {
			return a, err
		}
		if err := o.str("envelope", &a.Envelope); err != nil {
			return a, err
		}
		if a.Envelope != "" && a.Envelope != "amplitude" && a.Envelope != "log-power" {
			return a, ferr(path+".envelope", "%q is not a kind; use \"amplitude\" or \"log-power\"", a.Envelope)
		}
		if err := o.str("over", &a.Over); err != nil {
			return a, err
		}
		if a.Over != "" && a.Over != "recording" && a.Over != "epochs" {
			return a, ferr(path+".over", "%q is not a choice; use \"recording\" or \"epochs\"", a.Over)
		}
		if a.TargetFreq != nil && a.Orthogonalize != OrthNone && a.Type == TypeEnvelope {
			return a, ferr(path+".leakageCorrection", "applies to envelopes in the same band; across bands (targetFreq) the zero-lag leakage it removes is not defined")
		}
		if a.Type == TypeComodulogram && (len(a.Channels) > 2 || (len(a.Channels) == 1 && a.Channels[0] == "*")) {
			return a, ferr(path+".channels", "a comodulogram takes one channel or a pair")
		}
		if a.Type == TypeComodulogram && a.Orthogonalize != OrthNone {
			return a, ferr(path+".leakageCorrection", "is not available for comodulograms")
		}
	}
	return a, o.done(keys...)
}

const typeList = `"trial-window", "tf-map", "envelope", "comodulogram"`

// renamedKeys are analysis keys an older recipe may still use; each gets an
// error that names its new key, never a silent default.
var renamedKeys = []struct{ old, new, use string }{
	{"orthogonalize", "leakageCorrection", `"none", "pairwise" (was true) or "symmetric"`},
	{"clusterThreshold", "clusterFormingP", "the cluster-forming p-value, default 0.05"},
}

// CheckRenamed returns an error naming the new key when the analysis at
// path (for example "analyses[1]") still uses a renamed key; has reports
// whether the analysis has a key.
func CheckRenamed(path string, has func(key string) bool) error {
	for _, rk := range renamedKeys {
		if has(rk.old) {
			return ferr(path+"."+rk.old, "this key is now %q: %s", rk.new, rk.use)
		}
	}
	return nil
}
