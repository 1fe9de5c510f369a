package app

import (
	"fmt"
	"strings"

	goapp "github.com/maxence-charriere/go-app/v9/pkg/app"

	"amplink/app/wire"
	"amplink/core/recipe"
)

// Drawing steps 4 (run) and 5 (results) of the page; render.go draws the
// page, steps 1–3 and the views that hold them.

// ---- 4: run ----

// chanCount is the number of the recording's channels (0 with none).
func (p *Page) chanCount() int {
	if p.summary == nil {
		return 0
	}
	return len(p.summary.Channels)
}

// progressText says which phase of a run is going on, and whether the bar
// counts: only computing has a measure (units done of all); the other
// phases show a moving bar, never a full one.
func (p *Page) progressText() (label string, counted bool) {
	done := p.doneUnits()
	switch p.phase {
	case wire.PhaseReading:
		return "Reading the recording and planning the work…", false
	case wire.PhaseComputing:
		if p.total == 0 {
			return "Computing…", false
		}
		return fmt.Sprintf("Computing: %d of %d units", done, p.total), true
	case wire.PhaseCombining:
		return fmt.Sprintf("Combining the results of %d units into rows, maps and figures…", p.total), false
	case wire.PhaseDrawing:
		if p.total > 0 && p.phaseTotal > 0 {
			return fmt.Sprintf("Drawing figures: %d of %d", p.phaseDone, p.phaseTotal), true
		}
		return "Drawing figures…", false
	case wire.PhasePacking:
		return "Writing the tables and the archive…", false
	case phaseShowing:
		return fmt.Sprintf("Showing the results: %d of %d rows", p.shownRows, len(p.table.Rows)), true
	}
	if p.running {
		return "Starting…", false
	}
	return "", false
}

func (p *Page) renderRun() goapp.UI {
	wait := p.waitReason()
	label, counted := p.progressText()
	busy := p.running || p.phase != ""
	bar := goapp.Progress().ID("progress")
	switch {
	case counted && p.phase == phaseShowing:
		bar = bar.Max(max(len(p.table.Rows), 1)).Value(p.shownRows)
	case counted:
		bar = bar.Max(max(p.total, 1)).Value(p.doneUnits())
	case busy:
		// no value: the browser draws a moving bar, never a full one
	default:
		bar = bar.Max(1).Value(0)
	}
	if label == "" {
		label = "not running"
	}
	return step(4, "Run",
		goapp.Div().Class("row").Body(
			goapp.Button().ID("run-analysis").Class("primary").Text("Run the analysis").Disabled(p.running || wait != "").OnClick(p.onRun),
			goapp.Button().ID("cancel-analysis").Class("quiet").Text("Cancel").Disabled(!p.running).OnClick(p.onCancel),
			goapp.Button().ID("identity-check").Class("quiet").Text("Identity check").Disabled(p.running || wait != "").OnClick(p.onIdentity),
			goapp.If(wait != "", goapp.Span().ID("run-wait").Class("wait").Text(wait)),
		),
		goapp.If(p.pendingRun, goapp.P().ID("run-pending").Class("hint").Text("The run starts as soon as the recording is ready.")),
		goapp.Div().Class("progressline").Body(
			goapp.Label().For("progress").Text("Progress"),
			bar.Aria("valuetext", label),
			goapp.Span().ID("progress-text").DataSet("phase", p.phase).Aria("live", "polite").Text(label),
		),
		goapp.If(p.status != "", goapp.P().ID("run-status").Text(p.status)),
		goapp.If(len(p.timings) > 0, goapp.P().ID("run-timings").Class("hint").Text(timingText(p.timings))),
		goapp.If(p.runErr != "", goapp.P().ID("run-error").Class("error").Aria("live", "assertive").Body(
			goapp.Text(p.runErr+" "),
			goapp.If(p.runErrKey != "", goapp.A().ID("run-error-field").Href("#"+inputID(p.runErrKey)).Text("Go to the field").OnClick(p.onGoToField)),
		)),
		goapp.P().Class("hint").Text("The identity check runs the first trial-window analysis with the target window set equal to the seed window: r must come out as exactly 1."),
		goapp.If(p.identity != "", goapp.P().ID("identity-result").Text(p.identity)),
	)
}

// timingText says where a worker's combining time went.
func timingText(ts []wire.Timing) string {
	var parts []string
	for _, t := range ts {
		parts = append(parts, fmt.Sprintf("%s %.2f s", t.Step, t.MS/1000))
	}
	return "In the worker: " + strings.Join(parts, "; ") + "."
}

// onGoToField scrolls the field a message is about into view and focuses it.
func (p *Page) onGoToField(ctx goapp.Context, e goapp.Event) {
	e.PreventDefault()
	focusField(inputID(p.runErrKey))
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
	var big *wire.Figure
	if p.bigFig >= 0 && p.bigFig < len(figs) {
		big = &figs[p.bigFig]
	}
	return step(5, "Results",
		goapp.If(len(t.Header) == 0, goapp.P().Class("hint").Text("Results appear here after a run.")),
		goapp.If(len(t.Header) > 0 && p.urls[archiveName] != "", goapp.Div().Class("row").Body(
			goapp.A().ID("download-all").Class("button primary").Href(p.urls[archiveName]).Download(archiveName).
				Text("Download everything (.zip)"),
			goapp.Span().Class("hint").Text("results.csv, results.json, recipe.json, figures/ and maps/, laid out as amplink run --out writes them; amplink merge takes its results.csv."),
		)),
		goapp.If(len(t.Header) > 0, goapp.Div().Class("field check").Body(
			goapp.Input().Type("checkbox").ID("all-columns").Checked(p.allCols).OnChange(p.onAllColumns),
			goapp.Label().For("all-columns").Text(fmt.Sprintf("Show every column (%d; the %d that hold values are shown, and results.csv has them all)", len(t.Header), len(cols))),
		)),
		goapp.If(len(t.Header) > 0, goapp.P().Class("hint").Text("r to 3 decimals, p and q to 3 significant digits (hover a cell for the full value). ✱ and bold mark a row whose q (or, without a correction, its p) lies below the level the recipe used.")),
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
			goapp.Range(p.warnings).Slice(func(i int) goapp.UI { return goapp.Li().Text(Human(p.warnings[i])) }),
		)),
		p.renderBig(big),
		goapp.If(len(figs) > 0, goapp.P().Class("hint").Text(fmt.Sprintf("%d figures: select one to see it at full width, where pointing at a cell shows its value. In envelope figures, \"B ⊥ A\" is B's band signal orthogonalised to A's: the part of B that leakage from A cannot explain.", len(p.figures)))),
		goapp.Div().ID("figures").Class("thumbs").Body(
			goapp.Range(figs).Slice(func(i int) goapp.UI {
				f := figs[i]
				// an <img> of the figure's Blob: the SVG never passes
				// through the page's Go code, and the browser decodes it
				// off the script
				return goapp.Button().Class("thumb").Title(f.Title).OnClick(p.onFigure(i), i).Body(
					goapp.Img().Class("svgimg").Src(p.urls[f.Name+".svg"]).Alt(f.Title).Attr("decoding", "async").Attr("loading", "lazy"),
					goapp.Span().Text(f.Title),
				)
			}),
		),
		goapp.If(len(downloads) > 0 && len(t.Header) > 0, goapp.Details().Class("downloads").Body(
			goapp.Summary().Text(fmt.Sprintf("Single files (%d)", len(downloads))),
			goapp.Range(downloads).Slice(func(i int) goapp.UI {
				return goapp.A().Class("button quiet").Href(p.urls[downloads[i]]).Download(downloads[i]).Text(downloads[i])
			}),
		)),
	)
}

// renderBig is the figure shown at full width, or nothing.
func (p *Page) renderBig(f *wire.Figure) goapp.UI {
	if f == nil {
		return nil
	}
	return goapp.Figure().ID("figure-large").Class("large").Body(
		goapp.Div().Class("row").Body(
			goapp.Button().ID("figure-close").Class("quiet").Text("Back to the thumbnails").OnClick(p.onFigure(-1)),
			goapp.A().Class("button quiet").Href(p.urls[f.Name+".svg"]).Download(f.Name+".svg").Text("Download this figure (SVG)"),
		),
		// drawn inline, so a cell's title (its value) shows on hover, and a
		// scalp map's electrodes can be clicked (scalp.go)
		goapp.If(p.bigSVG != "" && isScalp(*f), p.scalpLarge(*f)),
		goapp.If(p.bigSVG != "" && !isScalp(*f), goapp.Div().Class("svglarge").Body(goapp.Raw(svgOnly(p.bigSVG)))),
		goapp.If(p.bigSVG == "", goapp.Img().Class("svglarge").Src(p.urls[f.Name+".svg"]).Alt(f.Title)),
		goapp.FigCaption().Text(f.Title),
	)
}

// onFigure shows figure i large (−1: the thumbnails only).
func (p *Page) onFigure(i int) goapp.EventHandler {
	return func(ctx goapp.Context, e goapp.Event) {
		p.bigFig, p.bigSVG = i, ""
		if i >= 0 && i < len(p.figBufs) {
			p.bigSVG = bufferText(p.figBufs[i])
		}
		if i >= 0 {
			ctx.Defer(func(goapp.Context) { focusField("figure-close") })
		}
	}
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
