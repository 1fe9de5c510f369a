package app

import (
	"fmt"
	"strings"

	goapp "github.com/maxence-charriere/go-app/v9/pkg/app"

	"amplink/app/wire"
	"amplink/core/dataset"
	"amplink/core/recipe"
)

// Render draws the page: five numbered steps, top to bottom.
func (p *Page) Render() goapp.UI {
	return goapp.Div().Class("shell").Body(
		goapp.Header().Class("masthead").Body(
			goapp.Img().Src("/web/icon.svg").Alt(""),
			goapp.Div().Body(
				goapp.H1().Text("amplink"),
				goapp.P().Class("tagline").Text("How the power of oscillations at two sites, or in two bands, rises and falls together."),
			),
		),
		goapp.Div().ID("status").DataSet("state", p.stateAttr).Class("hidden").Text(p.stateAttr),
		goapp.If(p.updateNow, goapp.Div().Class("update").Body(
			goapp.Text("A new version of amplink is ready. "),
			goapp.Button().Class("quiet").Text("Reload to use it").OnClick(p.onReload),
		)),
		goapp.Aside().Class("caution").Aria("label", "Caution").Body(
			goapp.P().Body(goapp.Strong().Text("A research tool, not a diagnostic device. "),
				goapp.Text("Do not use its results for clinical decisions.")),
			goapp.P().Text("Your data stays on this computer: files are read and analysed inside this browser and nothing is uploaded. Patient data must still be handled under your institution's rules."),
		),
		&loadView{P: p, Summary: p.summary, Loading: p.loading, Msg: p.loadMsg, Err: p.loadErr, Truth: p.showTruth, Files: len(p.roles)},
		goapp.If(p.stage >= 2, &checkView{P: p, Summary: p.summary, SVG: p.powerSVG, Err: p.powerErr, Busy: p.powerBusy,
			Channel: p.powerChan, Target: p.dragTarget, Msg: p.dragMsg, FormRev: p.form.rev, Form: p.form}),
		goapp.If(p.stage >= 3, &defineView{P: p, Form: p.form, Rev: p.form.rev, FieldKey: p.fieldKey, FieldErr: p.fieldErr,
			FormErr: p.formErr, Restored: p.restored, ShareURL: p.shareURL, Full: p.stage >= 4, Chans: p.chanCount()}),
		goapp.If(p.stage >= 5, &runView{P: p, Running: p.running, Done: p.doneUnits(), Total: p.total, Status: p.status,
			Err: p.runErr, Identity: p.identity, Wait: p.waitReason(), Phase: p.phase, Pending: p.pendingRun, Rows: p.shownRows}),
		goapp.If(p.stage >= 6, &resultsView{P: p, Rev: p.resultsRev, Rows: p.shownRows, Figs: p.shownFigs,
			SortCol: p.sortCol, SortDesc: p.sortDesc, AllCols: p.allCols, Big: p.bigFig}),
	)
}

// The five steps are components of their own: go-app redraws a component
// only when its fields change, so a progress message redraws the run step
// and not the whole form. Each carries the page (P) and copies of the
// state it shows, which is what go-app compares.

type loadView struct {
	goapp.Compo
	P       *Page
	Summary *dataset.Summary
	Loading bool
	Msg     string
	Err     string
	Truth   bool
	Files   int
}

func (v *loadView) Render() goapp.UI { return v.P.renderLoad() }

type checkView struct {
	goapp.Compo
	P       *Page
	Summary *dataset.Summary
	SVG     string
	Err     string
	Busy    bool
	Channel string
	Target  string
	Msg     string
	FormRev int
	Form    *Form
}

func (v *checkView) Render() goapp.UI { return v.P.renderCheck() }

type defineView struct {
	goapp.Compo
	P        *Page
	Form     *Form
	Rev      int
	FieldKey string
	FieldErr string
	FormErr  string
	Restored string
	ShareURL string
	Full     bool // with the analyses (a start-up stage of its own)
	Chans    int  // the recording's channels, offered by channel inputs
}

func (v *defineView) Render() goapp.UI { return v.P.renderDefine(v.Full) }

type runView struct {
	goapp.Compo
	P        *Page
	Running  bool
	Done     int
	Total    int
	Status   string
	Err      string
	Identity string
	Wait     string // why Run cannot be pressed yet
	Phase    string
	Pending  bool
	Rows     int
}

func (v *runView) Render() goapp.UI { return v.P.renderRun() }

type resultsView struct {
	goapp.Compo
	P        *Page
	Rev      int
	Rows     int
	Figs     int
	SortCol  int
	SortDesc bool
	AllCols  bool
	Big      int
}

func (v *resultsView) Render() goapp.UI { return v.P.renderResults() }

func step(n int, title string, body ...goapp.UI) goapp.UI {
	return goapp.Section().Class("step").Aria("labelledby", fmt.Sprintf("step-%d", n)).Body(
		append([]goapp.UI{goapp.H2().ID(fmt.Sprintf("step-%d", n)).Body(
			goapp.Span().Class("num").Text(n), goapp.Text(title))}, body...)...,
	)
}

// ---- 1: open a recording ----

// capacityText says what the page can hold (a worker's memory is limited;
// see wire.MaxBytes and data.MaxSampleBytes).
var capacityText = fmt.Sprintf("The page holds recordings of up to %d MiB of samples (about 270 million, e.g. 64 channels for 70 minutes at 1 kHz) and files of up to %d MiB. For larger ones, use the command-line tool.", wire.MaxBytes>>20, wire.MaxBytes>>20)

func (p *Page) renderLoad() goapp.UI {
	first := p.summary == nil && !p.loading
	cls := "dropzone"
	if first {
		cls += " first"
	}
	demoCls := "quiet"
	if first {
		demoCls = "primary"
	}
	return step(1, "Open a recording",
		goapp.Div().Class(cls).OnDragOver(p.onDragOver).OnDrop(p.onDrop).Body(
			goapp.Div().Class("row").Body(
				goapp.Div().Class("field picker").Body(
					goapp.Label().For("file-input").Text("Your recording (EDF, BDF, CSV/TSV, float32 epochs, WAV, MP3), together with its events, channels, trials or electrodes table and a recipe .json if you have them; or drop them here"),
					goapp.Input().Type("file").ID("file-input").Multiple(true).OnChange(p.onFiles),
				),
				goapp.Span().Class("or").Text("or"),
				goapp.Button().ID("load-demo").Class(demoCls).Text("Load the demo").OnClick(p.onLoadDemo),
			),
			goapp.P().Class("hint").Text("Each file is recognised by its content, whatever its name; the summary says what each was taken as, and you can change it. A recipe .json fills in every setting."),
			goapp.P().Class("hint").ID("capacity").Text(capacityText),
		),
		goapp.If(p.loading, goapp.P().ID("load-msg").Class("busy").Text(p.loadMsg)),
		goapp.If(p.loadErr != "", goapp.P().ID("load-error").Class("error").Aria("live", "assertive").Text(p.loadErr)),
		p.renderFiles(),
		p.renderSummary(),
	)
}

// roleWords say what each role means in the file list.
var roleWords = map[string]string{
	"recording":  "the recording",
	"events":     "events table",
	"channels":   "channels table",
	"trials":     "trials table (per-trial values)",
	"electrodes": "electrode positions",
	"recipe":     "recipe (settings)",
	"sidecar":    "description beside the recording",
	"unknown":    "not recognised (not used)",
}

var roleChoices = []string{"recording", "events", "channels", "trials", "electrodes", "recipe", "sidecar", "unknown"}

// renderFiles lists the files given together and what each was taken as,
// with a chooser to correct a wrong guess.
func (p *Page) renderFiles() goapp.UI {
	if len(p.files) == 0 || len(p.roles) != len(p.files) {
		return nil
	}
	return goapp.Table().ID("file-roles").Class("roles").Body(
		goapp.Caption().Text("The files, and what each was taken as"),
		goapp.TBody().Body(
			goapp.Range(p.files).Slice(func(i int) goapp.UI {
				id := fmt.Sprintf("role-%d", i)
				return goapp.Tr().Body(
					goapp.Th().Scope("row").Body(goapp.Label().For(id).Text(p.files[i].Name)),
					goapp.Td().Body(goapp.Select().ID(id).DataSet("file", p.files[i].Name).OnChange(p.onRole(i), i).Body(
						goapp.Range(roleChoices).Slice(func(k int) goapp.UI {
							return goapp.Option().Value(roleChoices[k]).Selected(roleChoices[k] == p.roles[i]).Text(roleWords[roleChoices[k]])
						}),
					)),
				)
			}),
		),
	)
}

// demoTruth is what the demo has planted and what a correct analysis
// finds (core/demo; README, "The demo").
var demoTruth = []string{
	"Across trials, C4 beta power before the tone (15–25 Hz, −0.5 to −0.1 s) predicts Pz delta power after it (1.5–3.5 Hz, 0.3 to 0.8 s). beta-to-delta should show r ≈ 0.4 at Pz, the only target significant after FDR correction; Fz delta does not depend on it (r near 0). beta-to-delta-map should outline one significant positive cluster at Pz and none at Fz.",
	"The partial correlation (after response_time and trial) keeps the link (r ≈ 0.4); hits and misses share it, so the hit − miss difference is not significant.",
	"Over time, the O1 and O2 alpha envelopes (8–12 Hz) co-vary, and each leaks at zero lag into its neighbour (O1 into P3, O2 into P4). posterior-alpha-plain shows every pair coupled, O1–P3 and O2–P4 most strongly (r ≈ 0.7); the leakage-corrected posterior-alpha drops those two to about 0 and keeps O1–O2.",
	"A T7 low-beta envelope (14–18 Hz) co-varies with a T8 high-gamma envelope (60–80 Hz): temporal-beta-gamma should give r ≈ 0.6 for T7 → T8 and about 0 for the other three pairs.",
}

func (p *Page) renderSummary() goapp.UI {
	s := p.summary
	if s == nil {
		return nil
	}
	var events []string
	for _, e := range s.Events {
		events = append(events, fmt.Sprintf("%s × %d", e.Type, e.Count))
	}
	var length string
	switch {
	case s.Duration > 0 && s.Trials > 0:
		length = fmt.Sprintf("%.1f s continuous recording, cut into %d epochs of %.3f to %.3f s", s.Duration, s.Trials, s.Epoch[0], s.Epoch[1])
	case s.Trials > 0:
		length = fmt.Sprintf("%d trials (already epoched), %.3f to %.3f s", s.Trials, s.Epoch[0], s.Epoch[1])
	default:
		length = fmt.Sprintf("%.2f s continuous", s.Duration)
	}
	chans := strings.Join(s.Channels, ", ")
	if len(s.Channels) > 24 {
		chans = strings.Join(s.Channels[:24], ", ") + fmt.Sprintf(" … (%d in all)", len(s.Channels))
	}
	audio := s.Format == "wav" || s.Format == "mp3" || strings.Contains(strings.ToLower(s.Format), "audio")
	name := s.Name
	if p.demo {
		name = "the demo: a simulated 19-channel EEG session with 180 tones (invented data with planted effects)"
	}
	return goapp.Div().ID("summary").Body(
		goapp.Dl().Class("summary").Body(
			goapp.Dt().Text("Recording"), goapp.Dd().Text(name),
			goapp.Dt().Text("Format"), goapp.Dd().Text(s.Format),
			goapp.Dt().Text("Channels"), goapp.Dd().Text(fmt.Sprintf("%d: %s", len(s.Channels), chans)),
			goapp.Dt().Text("Sample rate"), goapp.Dd().Text(fmt.Sprintf("%g Hz", s.Rate)),
			goapp.Dt().Text("Length"), goapp.Dd().Text(length),
			goapp.If(len(events) > 0, goapp.Dt().Text("Events")),
			goapp.If(len(events) > 0, goapp.Dd().Text(strings.Join(events, ", "))),
		),
		goapp.If(audio, goapp.P().Class("note").Text("Audio file: the recording gain is unknown, so amplitudes and power are in arbitrary units. Correlations are unaffected.")),
		goapp.If(len(s.Notes) > 0, goapp.Ul().Class("warnings").Body(
			goapp.Range(s.Notes).Slice(func(i int) goapp.UI { return goapp.Li().Text(s.Notes[i]) }),
		)),
		goapp.If(p.demo && p.showTruth, goapp.Div().ID("demo-truth").Class("truth").Body(
			goapp.H3().Text("What the demo holds, and what a correct analysis finds"),
			goapp.Ul().Body(goapp.Range(demoTruth).Slice(func(i int) goapp.UI { return goapp.Li().Text(demoTruth[i]) })),
			goapp.P().Class("hint").Text("The demo's recipe is filled in below; run it and check the table against these."),
		)),
	)
}

// ---- 2: look at the power ----

func (p *Page) renderCheck() goapp.UI {
	var chans []string
	if p.summary != nil {
		chans = p.summary.Channels
	}
	targets := p.windowTargets()
	ready := p.ready()
	return step(2, "Look at the power",
		goapp.P().Class("hint").Text("Trial-averaged time-frequency power of one channel, with the frequency settings of step 3 (their defaults when empty). It needs no analysis yet: look at it to find the windows, then drag a rectangle on it to set a seed or target window, or type the window in step 3."),
		goapp.If(!ready, goapp.P().ID("check-wait").Class("wait").Text("Waits for a recording (step 1).")),
		goapp.Div().Class("row").Body(
			goapp.Div().Class("field").Body(
				goapp.Label().For("power-channel").Text("Channel"),
				goapp.Select().ID("power-channel").Disabled(!ready).OnChange(p.onPowerChannel).Body(
					goapp.Range(chans).Slice(func(i int) goapp.UI {
						return goapp.Option().Value(chans[i]).Selected(chans[i] == p.powerChan).Text(chans[i])
					}),
				),
			),
			goapp.Button().ID("show-power").Class("quiet").Disabled(!ready || p.powerBusy).Text("Show power").OnClick(p.onShowPower),
			goapp.Div().Class("field").Body(
				goapp.Label().For("drag-target").Text("A dragged rectangle sets"),
				goapp.Select().ID("drag-target").OnChange(p.onDragTarget).Body(
					goapp.Range(targets).Slice(func(i int) goapp.UI {
						return goapp.Option().Value(targets[i][0]).Selected(targets[i][0] == p.dragTarget).Text(targets[i][1])
					}),
				),
			),
		),
		goapp.If(p.powerBusy, goapp.P().Class("busy").Text("Computing the power map…")),
		goapp.If(p.powerErr != "", goapp.P().ID("power-error").Class("error").Text(p.powerErr)),
		goapp.If(p.powerSVG != "",
			goapp.Div().Class("tfrow").Body(
				goapp.Div().ID("tf-box").Class("tfbox").
					Body(
						goapp.Raw(svgOnly(p.powerSVG)),
						goapp.Div().ID("tf-sel").Class("sel hidden"),
					),
				goapp.Div().Class("tfside").Body(
					goapp.If(p.dragMsg != "", goapp.P().ID("drag-msg").Class("okay").Aria("live", "polite").Text(p.dragMsg)),
					goapp.If(p.dragMsg == "", goapp.P().Class("hint").Text("Drag across the map to set the window chosen above.")),
				),
			),
		),
	)
}

// windowTargets lists the seed and target windows of the window analyses.
func (p *Page) windowTargets() [][2]string {
	var out [][2]string
	for i := 0; i < p.form.Analyses; i++ {
		t := p.form.get(fmt.Sprintf("analyses.%d.type", i))
		if t != recipe.TypeTrialWindow && t != recipe.TypeTFMap {
			continue
		}
		name := p.form.get(fmt.Sprintf("analyses.%d.id", i))
		if name == "" {
			name = fmt.Sprintf("analysis %d", i+1)
		}
		out = append(out,
			[2]string{fmt.Sprintf("analyses.%d.seed", i), name + ": seed window"},
			[2]string{fmt.Sprintf("analyses.%d.target", i), name + ": target window"})
	}
	return out
}

// ---- 3: describe the analysis ----

func (p *Page) renderDefine(full bool) goapp.UI {
	var body []goapp.UI
	body = append(body,
		goapp.If(p.restored != "", goapp.P().Class("okay").Text(p.restored)),
		goapp.If(p.formErr != "", goapp.P().Class("error").Text(p.formErr)),
		goapp.H3().Text("Epochs, frequencies and figures"),
		goapp.Div().Class("row").Body(p.inputs("", topFields[:topSpectral], "")...),
		goapp.Div().Class("row").Body(p.inputs("", topFields[topSpectral:topFigures], "")...),
		goapp.Div().Class("row").Body(p.inputs("", topFields[topFigures:], "")...),
	)
	for i := 0; full && i < p.form.Analyses; i++ {
		body = append(body, p.renderAnalysis(i))
	}
	body = append(body,
		goapp.Div().Class("row").Body(
			goapp.Button().ID("add-window").Class("quiet").Text("Add a trial-window analysis").OnClick(p.onAddAnalysis(recipe.TypeTrialWindow), "tw"),
			goapp.Button().ID("add-envelope").Class("quiet").Text("Add an envelope analysis").OnClick(p.onAddAnalysis(recipe.TypeEnvelope), "env"),
			goapp.Button().ID("copy-link").Class("quiet").Text("Copy link to these settings").OnClick(p.onCopyLink),
		),
		goapp.If(p.shareURL != "", goapp.Div().Class("field").Body(
			goapp.Label().For("share-url").Text("Link (it holds the settings, never the data)"),
			goapp.Input().ID("share-url").Class("wide").ReadOnly(true).Value(p.shareURL),
		)),
	)
	var chans []string
	if p.summary != nil {
		chans = append([]string{"*"}, p.summary.Channels...)
	}
	body = append(body, goapp.DataList().ID(chanList).Body(
		goapp.Range(chans).Slice(func(i int) goapp.UI { return goapp.Option().Value(chans[i]) }),
	))
	if p.summary == nil {
		body = append([]goapp.UI{goapp.P().Class("wait").Text("You can fill these in now; channel names are offered once a recording is open (step 1).")}, body...)
	}
	return step(3, "Describe the analysis", body...)
}

func (p *Page) renderAnalysis(i int) goapp.UI {
	pre := fmt.Sprintf("analyses.%d.", i)
	t := p.form.get(pre + "type")
	var groups [][]field
	var cur []field
	group := func() {
		if len(cur) > 0 {
			groups = append(groups, cur)
			cur = nil
		}
	}
	for _, fd := range analysisFields {
		if !fd.applies(t) {
			continue
		}
		switch fd.Key {
		case "seed.channel", "target.channel", "channels", "permutations", "covariates", "leakageCorrection":
			group()
		}
		cur = append(cur, fd)
	}
	group()
	title := fmt.Sprintf("Analysis %d", i+1)
	if id := p.form.get(pre + "id"); id != "" {
		title += ": " + id
	}
	// One analysis is open for editing at a time; the others show one line
	// (fewer inputs on the page keeps every redraw short). An analysis
	// holding the current error opens by itself.
	if i != p.expanded && !strings.HasPrefix(p.fieldKey, pre) {
		return goapp.Div().Class("analysis").Body(
			goapp.H3().Text(title),
			goapp.P().Class("hint").Text(p.analysisLine(i)),
			goapp.Button().ID(fmt.Sprintf("edit-analysis-%d", i)).Class("quiet").Text(fmt.Sprintf("Edit analysis %d", i+1)).OnClick(p.onExpand(i), i),
		)
	}
	body := []goapp.UI{
		goapp.H3().Text(title),
	}
	for _, g := range groups {
		body = append(body, goapp.Div().Class("row").Body(p.inputs(pre, g, t)...))
	}
	if p.form.Analyses > 1 {
		body = append(body, goapp.Button().Class("quiet").Text(fmt.Sprintf("Remove analysis %d", i+1)).OnClick(p.onRemoveAnalysis(i), i))
	}
	return goapp.Div().Class("analysis").Body(body...)
}

// inputID is the element id of an input key.
func inputID(key string) string {
	return "f-" + strings.ReplaceAll(key, ".", "-")
}

// chanList is the id of the datalist of the recording's channels, which
// channel inputs suggest from.
const chanList = "channel-list"

// defaultText is what an empty input means, for its placeholder or its
// "(default)" option.
func defaultText(fd field, typ string) string {
	if fd.Key == "method" {
		if typ == recipe.TypeEnvelope || typ == recipe.TypeComodulogram {
			return "pearson"
		}
		return "spearman"
	}
	return fd.Default
}

func (p *Page) inputs(pre string, fields []field, typ string) []goapp.UI {
	out := make([]goapp.UI, 0, len(fields))
	for _, fd := range fields {
		key := pre + fd.Key
		id := inputID(key)
		val := p.form.get(key)
		invalid := key == p.fieldKey
		cls := "field"
		if invalid {
			cls += " invalid"
		}
		def := defaultText(fd, typ)
		var input goapp.UI
		switch fd.Kind {
		case kChoice, kOrth:
			opts := fd.Choices
			if fd.Key == "correction" && typ != recipe.TypeTFMap {
				// clusters exist only on time-frequency maps
				opts = []string{"none", "fdr", "bonferroni"}
				if val == "cluster" {
					opts = fd.Choices
				}
			}
			if fd.Kind == kChoice && fd.Key != "type" {
				opts = append([]string{""}, opts...)
			}
			input = goapp.Select().ID(id).OnChange(p.onField(key), key).Aria("invalid", invalid).Body(
				goapp.Range(opts).Slice(func(i int) goapp.UI {
					label := opts[i]
					switch {
					case label == "" && fd.Kind == kOrth:
						label = "none"
					case label == "" && def != "":
						label = "(default: " + def + ")"
					case label == "":
						label = "(default)"
					}
					return goapp.Option().Value(opts[i]).Selected(opts[i] == val || (val == "" && i == 0)).Text(label)
				}),
			)
		case kBool:
			cls += " check"
			input = goapp.Input().Type("checkbox").ID(id).Checked(val != "").OnChange(p.onField(key), key)
		default:
			in := goapp.Input().ID(id).Value(val).OnChange(p.onField(key), key).Aria("invalid", invalid)
			if fd.Kind == kNum {
				in = in.Type("text").Attr("inputmode", "decimal").Class("num")
			} else {
				in = in.Type("text")
			}
			if fd.Kind == kNames {
				in = in.List(chanList).Attr("autocomplete", "off")
			}
			if fd.Wide {
				in = in.Class("wide")
			}
			hint := fd.Hint
			if def != "" {
				hint = "default " + def
				if fd.Hint != "" {
					hint = fd.Hint + "; default " + def
				}
			}
			if hint != "" {
				// wide enough to show the whole placeholder
				in = in.Title(hint).Placeholder("%s", hint).Size(max(6, len([]rune(hint))+1))
			}
			input = in
		}
		var note goapp.UI
		if fd.Key == "leakageCorrection" {
			note = goapp.Span().Class("note").Text("Removes the zero-lag part that volume conduction or field spread adds — and with it any genuine zero-lag coupling.")
		}
		if fd.Kind == kBool {
			out = append(out, goapp.Div().Class(cls).Body(input, goapp.Label().For(id).Text(fd.Label)))
			continue
		}
		var why goapp.UI
		if invalid {
			words, path := Words(p.fieldErr)
			why = goapp.Span().ID("why-"+id).Class("why").Aria("live", "polite").Body(
				goapp.Text(words),
				goapp.If(path != "", goapp.Small().Class("path").Text(path)),
			)
		}
		out = append(out, goapp.Div().Class(cls).Body(
			goapp.Label().For(id).Text(fd.Label),
			input,
			note,
			why,
		))
	}
	return out
}
