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
		&loadView{P: p, Summary: p.summary, Loading: p.loading, Msg: p.loadMsg, Err: p.loadErr},
		goapp.If(p.stage >= 2, &checkView{P: p, Summary: p.summary, SVG: p.powerSVG, Err: p.powerErr, Busy: p.powerBusy,
			Channel: p.powerChan, Target: p.dragTarget, Msg: p.dragMsg, FormRev: p.form.rev, Form: p.form}),
		goapp.If(p.stage >= 3, &defineView{P: p, Form: p.form, Rev: p.form.rev, FieldKey: p.fieldKey, FieldErr: p.fieldErr,
			FormErr: p.formErr, Restored: p.restored, ShareURL: p.shareURL, Full: p.stage >= 4}),
		goapp.If(p.stage >= 5, &runView{P: p, Running: p.running, Done: p.doneUnits(), Total: p.total, Status: p.status,
			Err: p.runErr, Identity: p.identity}),
		goapp.If(p.stage >= 6, &resultsView{P: p, Rev: p.resultsRev, Rows: p.shownRows, Figs: p.shownFigs,
			SortCol: p.sortCol, SortDesc: p.sortDesc, AllCols: p.allCols}),
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
	return step(1, "Open a recording",
		goapp.Div().Class("dropzone").OnDragOver(p.onDragOver).OnDrop(p.onDrop).Body(
			goapp.Div().Class("row").Body(
				goapp.Div().Class("field").Body(
					goapp.Label().For("file-input").Text("Recording (EDF, BDF, CSV/TSV, float32 epochs, WAV, MP3), with its events.tsv, channels.tsv, electrodes.tsv or a recipe .json; or drop them here"),
					goapp.Input().Type("file").ID("file-input").Multiple(true).OnChange(p.onFiles),
				),
				goapp.Button().ID("load-demo").Class("quiet").Text("Load the demo").OnClick(p.onLoadDemo),
			),
			goapp.P().Class("hint").Text("Dropping a recipe .json fills in every setting; with a recording open, it runs the same analysis on it."),
			goapp.P().Class("hint").ID("capacity").Text(capacityText),
		),
		goapp.If(p.loading, goapp.P().Text(p.loadMsg)),
		goapp.If(p.loadErr != "", goapp.P().ID("load-error").Class("error").Aria("live", "assertive").Text(p.loadErr)),
		p.renderSummary(),
	)
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
	length := fmt.Sprintf("%.2f s continuous", s.Duration)
	if s.Trials > 0 {
		length = fmt.Sprintf("%d trials, %.3f to %.3f s", s.Trials, s.Epoch[0], s.Epoch[1])
	}
	chans := strings.Join(s.Channels, ", ")
	if len(s.Channels) > 24 {
		chans = strings.Join(s.Channels[:24], ", ") + fmt.Sprintf(" … (%d in all)", len(s.Channels))
	}
	audio := s.Format == "wav" || s.Format == "mp3" || strings.Contains(strings.ToLower(s.Format), "audio")
	return goapp.Div().ID("summary").Body(
		goapp.Dl().Class("summary").Body(
			goapp.Dt().Text("File"), goapp.Dd().Text(s.Name),
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
	)
}

// ---- 2: look at the power ----

func (p *Page) renderCheck() goapp.UI {
	var chans []string
	if p.summary != nil {
		chans = p.summary.Channels
	}
	targets := p.windowTargets()
	return step(2, "Look at the power",
		goapp.P().Class("hint").Text("Trial-averaged time-frequency power of one channel, with the spectral settings of step 3. Drag a rectangle on it to set a seed or target window, or type the window in below."),
		goapp.Div().Class("row").Body(
			goapp.Div().Class("field").Body(
				goapp.Label().For("power-channel").Text("Channel"),
				goapp.Select().ID("power-channel").OnChange(p.onPowerChannel).Body(
					goapp.Range(chans).Slice(func(i int) goapp.UI {
						return goapp.Option().Value(chans[i]).Selected(chans[i] == p.powerChan).Text(chans[i])
					}),
				),
			),
			goapp.Button().ID("show-power").Class("quiet").Disabled(p.summary == nil || p.powerBusy).Text("Show power").OnClick(p.onShowPower),
			goapp.Div().Class("field").Body(
				goapp.Label().For("drag-target").Text("A dragged rectangle sets"),
				goapp.Select().ID("drag-target").OnChange(p.onDragTarget).Body(
					goapp.Range(targets).Slice(func(i int) goapp.UI {
						return goapp.Option().Value(targets[i][0]).Selected(targets[i][0] == p.dragTarget).Text(targets[i][1])
					}),
				),
			),
		),
		goapp.If(p.powerBusy, goapp.P().Text("Computing the power map…")),
		goapp.If(p.powerErr != "", goapp.P().Class("error").Text(p.powerErr)),
		goapp.If(p.powerSVG != "",
			goapp.Div().ID("tf-box").Class("tfbox").
				Body(
					goapp.Raw(svgOnly(p.powerSVG)),
					goapp.Div().ID("tf-sel").Class("sel hidden"),
				),
		),
		goapp.If(p.dragMsg != "", goapp.P().ID("drag-msg").Class("okay").Text(p.dragMsg)),
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
		var input goapp.UI
		switch fd.Kind {
		case kChoice, kOrth:
			opts := fd.Choices
			if fd.Kind == kChoice && fd.Key != "type" {
				opts = append([]string{""}, opts...)
			}
			input = goapp.Select().ID(id).OnChange(p.onField(key), key).Aria("invalid", invalid).Body(
				goapp.Range(opts).Slice(func(i int) goapp.UI {
					label := opts[i]
					if label == "" && fd.Kind == kOrth {
						label = "none"
					} else if label == "" {
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
			if fd.Wide {
				in = in.Class("wide")
			}
			if fd.Hint != "" {
				in = in.Title(fd.Hint).Placeholder("%s", fd.Hint)
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
		out = append(out, goapp.Div().Class(cls).Body(
			goapp.Label().For(id).Text(fd.Label),
			input,
			note,
			goapp.If(invalid, goapp.Span().Class("why").Aria("live", "polite").Text(p.fieldErr)),
		))
	}
	return out
}

// ---- 4: run ----

func (p *Page) renderRun() goapp.UI {
	done := p.doneUnits()
	total := max(p.total, 1)
	label := "idle"
	if p.running {
		label = fmt.Sprintf("%d / %d units", done, p.total)
	}
	return step(4, "Run",
		goapp.Div().Class("row").Body(
			goapp.Button().ID("run-analysis").Text("Run the analysis").Disabled(p.running).OnClick(p.onRun),
			goapp.Button().ID("cancel-analysis").Class("quiet").Text("Cancel").Disabled(!p.running).OnClick(p.onCancel),
			goapp.Button().ID("identity-check").Class("quiet").Text("Identity check").Disabled(p.running).OnClick(p.onIdentity),
		),
		goapp.Div().Class("progressline").Body(
			goapp.Label().For("progress").Text("Progress"),
			goapp.Progress().ID("progress").Max(total).Value(done).Aria("valuetext", label),
			goapp.Span().ID("progress-text").Aria("live", "polite").Text(label),
		),
		goapp.If(p.status != "", goapp.P().ID("run-status").Text(p.status)),
		goapp.If(p.runErr != "", goapp.P().ID("run-error").Class("error").Aria("live", "assertive").Text(p.runErr)),
		goapp.P().Class("hint").Text("The identity check runs the first trial-window analysis with the target window set equal to the seed window: r must come out as exactly 1."),
		goapp.If(p.identity != "", goapp.P().ID("identity-result").Text(p.identity)),
	)
}

// ---- 5: results ----

func (p *Page) renderResults() goapp.UI {
	t := p.table
	cols := p.visible()
	figs := p.figures
	if len(figs) > p.shownFigs {
		figs = figs[:p.shownFigs]
	}
	downloads := p.sortedDownloads()
	return step(5, "Results",
		goapp.If(len(t.Header) == 0, goapp.P().Class("hint").Text("Results appear here after a run.")),
		goapp.If(len(t.Header) > 0, goapp.Div().Class("field check").Body(
			goapp.Input().Type("checkbox").ID("all-columns").Checked(p.allCols).OnChange(p.onAllColumns),
			goapp.Label().For("all-columns").Text(fmt.Sprintf("Show every column (%d; the main %d are shown, and results.csv has them all)", len(t.Header), len(cols))),
		)),
		goapp.Div().Class("tablewrap").Body(
			goapp.Table().ID("results").Class("results").Body(
				goapp.THead().Body(goapp.Tr().Body(
					goapp.Range(cols).Slice(func(k int) goapp.UI {
						i := cols[k]
						sortState := "none"
						if i == p.sortCol {
							sortState = "ascending"
							if p.sortDesc {
								sortState = "descending"
							}
						}
						return goapp.Th().Scope("col").Aria("sort", sortState).TabIndex(0).
							OnClick(p.onSort(i), i).
							OnKeyDown(p.onSortKey(i), i).
							Text(t.Header[i])
					}),
				)),
				// the rows are written as HTML text, a chunk per task
				// (Page.reveal, RowsHTML): the browser parses a chunk far
				// faster than components for each cell are drawn
				goapp.TBody().ID(resultsBody),
			),
		),
		goapp.If(len(p.warnings) > 0, goapp.Ul().Class("warnings").Body(
			goapp.Range(p.warnings).Slice(func(i int) goapp.UI { return goapp.Li().Text(p.warnings[i]) }),
		)),
		goapp.If(len(figs) > 0, goapp.P().Class("hint").Text("Figures: open one to draw it.")),
		goapp.If(len(downloads) > 0 && len(t.Header) > 0, goapp.Div().Class("downloads").Body(
			goapp.Range(downloads).Slice(func(i int) goapp.UI {
				return goapp.A().Class("button quiet").Href(p.urls[downloads[i]]).Download(downloads[i]).Text("Download " + downloads[i])
			}),
		)),
		goapp.Range(figs).Slice(func(i int) goapp.UI {
			if v, ok := p.scalpFigure(i); ok { // scalp.go: clickable electrodes
				return v
			}
			f := figs[i]
			// an <img> of the figure's Blob: the SVG never passes through
			// the page's Go code, and the browser decodes it off the script
			// Each figure opens on request: a time-frequency map is thousands
			// of cells, and drawing dozens at once would hold up the page.
			return goapp.Details().Class("figure").Body(
				goapp.Summary().Text(f.Title),
				goapp.Img().Class("svgimg").Src(p.urls[f.Name+".svg"]).Alt(f.Title).Attr("decoding", "async").Attr("loading", "lazy"),
			)
		}),
	)
}

func (p *Page) onSortKey(col int) goapp.EventHandler {
	return func(ctx goapp.Context, e goapp.Event) {
		switch e.Get("key").String() {
		case "Enter", " ":
			e.PreventDefault()
			p.onSort(col)(ctx, e)
		default:
			ctx.PreventUpdate()
		}
	}
}

// svgOnly cuts anything before the <svg> root (an XML declaration, a
// comment), since the page inserts the figure as one element.
func svgOnly(s string) string {
	if i := strings.Index(s, "<svg"); i > 0 {
		return s[i:]
	}
	return s
}

// analysisLine is the one-line description of a closed analysis.
func (p *Page) analysisLine(i int) string {
	pre := fmt.Sprintf("analyses.%d.", i)
	g := p.form.get
	switch t := g(pre + "type"); t {
	case recipe.TypeTrialWindow, recipe.TypeTFMap:
		return fmt.Sprintf("%s: seed %s %s–%s s, %s–%s Hz → target %s %s–%s s, %s–%s Hz", t,
			g(pre+"seed.channel"), g(pre+"seed.time.0"), g(pre+"seed.time.1"), g(pre+"seed.freq.0"), g(pre+"seed.freq.1"),
			g(pre+"target.channel"), g(pre+"target.time.0"), g(pre+"target.time.1"), g(pre+"target.freq.0"), g(pre+"target.freq.1"))
	default:
		line := fmt.Sprintf("%s: %s, %s–%s Hz", t, g(pre+"channels"), g(pre+"freq.0"), g(pre+"freq.1"))
		if g(pre+"targetFreq.0") != "" {
			line += fmt.Sprintf(" with %s–%s Hz", g(pre+"targetFreq.0"), g(pre+"targetFreq.1"))
		}
		return line
	}
}

func (p *Page) onExpand(i int) goapp.EventHandler {
	return func(ctx goapp.Context, e goapp.Event) {
		p.expanded = i
		p.form.rev++
	}
}
