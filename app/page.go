package app

import (
	"encoding/json"
	"fmt"
	"math"
	"strconv"
	"strings"
	"time"

	goapp "github.com/maxence-charriere/go-app/v9/pkg/app"

	"amplink/app/wire"
	"amplink/core/dataset"
)

// run modes
const (
	modeMain     = "main"
	modeIdentity = "identity"
)

// Page is the whole amplink page.
type Page struct {
	goapp.Compo

	ctx  goapp.Context
	pool *pool

	// the recording: the files given together, what each was taken as
	// (all.Roles, as the worker recognised them or the user set them), and
	// the source made of them
	files   []fileRef
	roles   []string
	src     wire.Source
	demo    bool
	summary *dataset.Summary
	loadMsg string
	loadErr string
	loading bool

	// the recipe
	form     *Form
	fieldKey string // input the current error belongs to
	fieldErr string
	formErr  string
	restored string
	expanded int // the analysis open for editing

	// running
	pendingRun bool // a run was asked for before the recording was ready
	phase      string
	phaseDone  int // a counted phase other than computing (drawing n of m)
	phaseTotal int
	timings    []wire.Timing
	runErrKey  string // the field the run's error is about ("" if none)
	seq        int
	mode       string
	running    bool
	done       []int
	total      int
	unitBufs   []buffer
	unitsIn    int
	drawBufs   []buffer    // the late figure units' (or later units') results, from OpDrawn
	drawWant   int         // workers asked for late figure units (or later units)
	laterUnits []wire.Unit // the run's later units (OpUnits' Late)
	drawLater  bool        // the OpDrawn replies awaited are the later units
	started    float64
	status     string
	runErr     string
	stateAttr  string

	// results
	table     Table
	sortCol   int
	sortDesc  bool
	figures   []wire.Figure
	warnings  []string
	urls      map[string]string // download name → blob URL
	identity  string
	bigFig    int               // the figure shown large, −1 for none
	bigSVG    string            // its SVG, drawn inline (cell values on hover)
	showTruth bool              // the demo's planted effects are shown
	groups    map[string]string // analysis id → its question in words
	notes     map[string]string // analysis id → which p its rows report

	// check plot
	powerSeq   int
	powerChan  string
	powerSVG   string
	powerErr   string
	powerBusy  bool
	dragTarget string // "analyses.i.seed" or "analyses.i.target"
	dragMsg    string

	// sharing, updates
	shareURL  string
	updateNow bool

	// progressive drawing: how many steps of the page, result rows and
	// figures are drawn so far (each addition is its own short task)
	stage      int
	shownRows  int        // rows written into the table body (see RowsHTML)
	sorted     [][]string // the rows in the current sort order; nil until needed
	cols       []int      // the columns shown (Table.Visible); nil until needed
	shownFigs  int
	drawing    bool // reveal is scheduled
	allCols    bool // the table shows every column, not only the main ones
	resultsRev int
	figBufs    []buffer // the figures' SVG, made into Blobs as they are shown

	scalp scalpState // clickable scalp maps (scalp.go)
}

// Progressive drawing. The page is drawn a step at a time after start-up,
// and long result tables and figures a slice at a time, so that no single
// main-thread task grows long (the page must answer within 200 ms).
const (
	stages      = 6
	rowsPerTick = 100
	// cellsPerTick bounds the cells written into the table in one task
	cellsPerTick = 1200
	figsPerTick  = 8
	revealDelay  = 4 * time.Millisecond
)

// later runs fn on the page after the browser has had its turn: from a
// fresh JS timer task, not a Go timer (a Go timer that is already due when
// a long render ends runs at once, in the same task).
func (p *Page) later(fn func(goapp.Context)) {
	afterTask(revealDelay, func() { p.ctx.Dispatch(fn) })
}

func (p *Page) advance(ctx goapp.Context) {
	if p.stage < stages {
		p.stage++
		p.later(p.advance)
		return
	}
	p.stateAttr = "ready"
	markTime("amplink-ready")
	// a shared link's settings in a task of their own (parsing the recipe
	// the first time compiles the parser)
	p.later(func(goapp.Context) { p.restoreLink() })
}

// reveal draws more of the results, then schedules itself until all are
// shown; only then is the run reported done.
func (p *Page) reveal(ctx goapp.Context) {
	switch {
	case p.shownRows < len(p.table.Rows):
		if p.sorted == nil {
			p.sorted = p.table.Sorted(p.sortCol, p.sortDesc)
		}
		if bodyRows(resultsBody) != p.shownRows {
			// the body is not what was written to it (redrawn, or a sort
			// started over): write it afresh
			setBodyHTML(resultsBody, "")
			p.shownRows = 0
		}
		// a bounded number of cells per task, so a table with every
		// column shown is written in shorter steps
		per := max(10, min(rowsPerTick, cellsPerTick/max(1, len(p.visible()))))
		end := min(len(p.sorted), p.shownRows+per)
		o := Rows{Header: p.table.Header, Cols: p.visible(), Group: p.sortCol < 0, Heads: p.groups, Notes: p.notes}
		if p.shownRows > 0 {
			if ac := p.table.Col("analysis"); ac >= 0 && ac < len(p.sorted[p.shownRows-1]) {
				o.Prev = p.sorted[p.shownRows-1][ac]
			}
		}
		appendBodyHTML(resultsBody, RowsHTML(p.sorted[p.shownRows:end], o))
		p.shownRows = end
	case p.shownFigs < len(p.figures):
		// a few figures per task: each addition redraws the list
		for end := min(len(p.figures), p.shownFigs+figsPerTick); p.shownFigs < end; p.shownFigs++ {
			if p.shownFigs < len(p.figBufs) {
				p.urls[p.figures[p.shownFigs].Name+".svg"] = bufferURL(p.figBufs[p.shownFigs], "image/svg+xml")
			}
		}
	default:
		p.drawing = false
		p.phase = ""
		p.stateAttr = "done"
		markTime("amplink-done")
		return
	}
	p.later(p.reveal)
}

// started is set once the page's first OnInit has run.
var started bool

// OnInit sets the starting state (on the server too, for pre-rendering).
func (p *Page) OnInit() {
	p.form = NewForm()
	p.sortCol = -1
	p.stage = stages // the server draws the whole page at once
	if goapp.IsClient {
		p.stage = 1 // the browser, a step at a time (see advance)
		if !started {
			// go-app's own start-up (before this) and the first drawing
			// (after) are then two tasks, not one
			started = true
			handBack()
		}
	}
	p.stateAttr = "loading"
	p.urls = map[string]string{}
}

// OnMount starts the workers and restores a shared recipe from the link.
func (p *Page) OnMount(ctx goapp.Context) {
	p.ctx = ctx
	if !goapp.IsClient {
		return
	}
	p.pool = newPool(workerCount(), p.onReply)
	p.later(p.advance)
}

// restoreLink fills the form from a shared link in the URL fragment, in
// two main-thread tasks: the recipe is decoded and parsed in this one (the
// first parse compiles the parser's code), and the form that holds it is
// drawn in the next, so that neither holds the page for long.
func (p *Page) restoreLink() {
	frag := fragment()
	if !strings.HasPrefix(strings.TrimPrefix(frag, "#"), FragmentKey) {
		return
	}
	// "&run" asks for a run once a recording is ready
	frag, run := strings.CutSuffix(frag, RunSuffix)
	b, err := DecodeFragment(frag)
	var f *Form
	if err == nil {
		if f, err = FormFromJSON(b); err == nil {
			f.Validate()
		}
	}
	p.later(func(goapp.Context) {
		if err != nil {
			p.formErr = err.Error()
		} else {
			p.form = f
			p.form.showAll = true
			p.restored = "Settings restored from the link."
			p.validate()
		}
		if run {
			if p.ready() {
				p.onRun(p.ctx, goapp.Event{})
			} else {
				p.pendingRun = true
			}
		}
	})
}

// OnAppUpdate tells the user a new version is ready.
func (p *Page) OnAppUpdate(ctx goapp.Context) {
	p.updateNow = true
}

// onReply runs on the page's event loop for every worker message.
func (p *Page) onReply(k int, rep wire.Reply, bufs []buffer) {
	p.ctx.Dispatch(func(ctx goapp.Context) { p.handleReply(k, rep, bufs) })
}

func (p *Page) handleReply(k int, rep wire.Reply, bufs []buffer) {
	switch rep.Op {
	case wire.OpFatal:
		p.runErr = rep.Error
		p.running, p.loading, p.powerBusy = false, false, false
		p.stateAttr = "error"
		return
	}
	if rep.Seq < 0 {
		if rep.Seq != p.powerSeq {
			return
		}
		p.powerBusy = false
		switch {
		case rep.Op == wire.OpError:
			p.powerErr = Human(rep.Error)
		case rep.Figure != nil:
			p.powerSVG, p.powerErr = rep.Figure.SVG, ""
			p.ctx.Defer(func(goapp.Context) { attachDrag(p.onDragged) })
		}
		return
	}
	if rep.Seq != p.seq {
		return // a reply to something since cancelled or replaced
	}
	switch rep.Op {
	case wire.OpError:
		p.fail(rep.Error)
	case wire.OpSummary:
		p.takeSummary(rep)
	case wire.OpPhase:
		p.phase = rep.Phase
		p.phaseDone, p.phaseTotal = 0, 0
		if rep.Phase != wire.PhaseComputing {
			p.phaseDone, p.phaseTotal = rep.Done, rep.Total
		}
		if rep.Phase == wire.PhaseComputing && rep.Total > 0 {
			p.total = rep.Total
		}
		if rep.Phase == wire.PhaseCombining {
			markTime("amplink-combining")
		}
	case wire.OpProgress:
		if k < len(p.done) {
			p.done[k] = rep.Done
		}
		p.total = rep.Total
	case wire.OpUnits:
		markTime("amplink-units")
		if k < len(p.unitBufs) && len(bufs) == 1 {
			p.unitBufs[k] = bufs[0]
			p.unitsIn++
		}
		p.total = rep.Total
		p.laterUnits = rep.Late
		if p.unitsIn == len(p.unitBufs) {
			names := make([]string, len(p.unitBufs))
			for i := range names {
				names[i] = fmt.Sprintf("units-%d", i)
			}
			p.phase = wire.PhaseCombining
			if len(p.laterUnits) == 0 {
				p.pool.send(0, wire.Request{Op: wire.OpFinish, Seq: p.seq}, names, p.unitBufs)
				break
			}
			// the later units (envelope surrogates) read every worker's
			// units: each worker gets a copy with its share, and worker 0
			// the originals with the later results (OpDrawn, then OpFinish)
			n := p.pool.size()
			shares := make([][]wire.Unit, n)
			for i, u := range p.laterUnits {
				shares[i%n] = append(shares[i%n], u)
			}
			p.drawBufs, p.drawWant, p.drawLater = nil, 0, true
			for k, sh := range shares {
				if len(sh) > 0 {
					cp := make([]buffer, len(p.unitBufs))
					for i, b := range p.unitBufs {
						cp[i] = copyBuffer(b)
					}
					p.pool.send(k, wire.Request{Op: wire.OpDrawUnits, Seq: p.seq, Late: sh}, names, cp)
					p.drawWant++
				}
			}
			p.phaseDone, p.phaseTotal = 0, len(p.laterUnits)
		}
	case wire.OpLate:
		// the power maps the rows chose: one share per worker, handed back
		// to worker 0 (OpDraw) when every share is in
		n := p.pool.size()
		shares := make([][]wire.Unit, n)
		for i, u := range rep.Late {
			shares[i%n] = append(shares[i%n], u)
		}
		p.drawBufs, p.drawWant = nil, 0
		for k, sh := range shares {
			if len(sh) > 0 {
				p.pool.send(k, wire.Request{Op: wire.OpDrawUnits, Seq: p.seq, Late: sh}, nil, nil)
				p.drawWant++
			}
		}
		p.phase = wire.PhaseDrawing
		p.phaseDone, p.phaseTotal = 0, len(rep.Late)
	case wire.OpDrawn:
		if len(bufs) == 1 {
			p.drawBufs = append(p.drawBufs, bufs[0])
		}
		p.phaseDone += rep.Done
		if len(p.drawBufs) == p.drawWant && p.drawLater {
			p.drawLater = false
			var names []string
			for i := range p.unitBufs {
				names = append(names, fmt.Sprintf("units-%d", i))
			}
			for i := range p.drawBufs {
				names = append(names, fmt.Sprintf("later-units-%d", i))
			}
			p.pool.send(0, wire.Request{Op: wire.OpFinish, Seq: p.seq}, names, append(append([]buffer(nil), p.unitBufs...), p.drawBufs...))
			p.drawBufs = nil
			break
		}
		if len(p.drawBufs) == p.drawWant {
			names := make([]string, len(p.drawBufs))
			for i := range names {
				names[i] = fmt.Sprintf("figure-units-%d", i)
			}
			p.pool.send(0, wire.Request{Op: wire.OpDraw, Seq: p.seq}, names, p.drawBufs)
		}
	case wire.OpResults:
		markTime("amplink-results")
		p.finishRun(rep, bufs)
		markTime("amplink-results-end")
	}
}

func (p *Page) fail(msg string) {
	p.running, p.loading, p.pendingRun = false, false, false
	p.phase = ""
	p.stateAttr = "error"
	if k := p.form.KeyFor(msg); k != "" {
		p.fieldKey, p.fieldErr = k, msg
		p.form.touch(k)
		p.runErrKey = k
		p.runErr = "The recipe does not fit this recording: " + Human(msg)
		return
	}
	if p.summary == nil && !p.demo {
		p.loadErr = Human(msg)
		return
	}
	p.runErrKey = ""
	p.runErr = Human(msg)
}

// takeSummary takes what the worker found in the files: the summary of
// the recording, what each file was taken as, and a recipe among them.
func (p *Page) takeSummary(rep wire.Reply) {
	p.loading = false
	if rep.Roles != nil {
		p.roles = rep.Roles
	}
	if rep.Source != nil {
		p.src = *rep.Source
	}
	recipeText := rep.RecipeText
	if len(rep.Recipe) > 0 {
		recipeText = string(rep.Recipe)
	}
	if len(rep.Summary) > 0 {
		var s dataset.Summary
		if err := json.Unmarshal(rep.Summary, &s); err != nil {
			p.loadErr = err.Error()
			return
		}
		p.summary = &s
		p.loadErr = ""
		// messages about what was missing are gone with it
		if p.runErrKey == "" {
			p.runErr = ""
		}
		if len(s.Channels) > 0 && p.powerChan == "" {
			p.powerChan = s.Channels[0]
		}
		p.showTruth = false
	}
	// the form follows in its own task: drawing a long recipe and the
	// summary together would make one long one
	seq, fromFile := p.seq, len(rep.Recipe) == 0 && recipeText != ""
	p.later(func(ctx goapp.Context) {
		if seq != p.seq {
			return
		}
		if recipeText != "" {
			f, err := FormFromJSON([]byte(recipeText))
			switch {
			case err != nil:
				p.formErr = "Recipe file: " + err.Error()
			default:
				p.form = f
				p.expanded = 0
				p.form.showAll = true
				if fromFile {
					p.restored = "Settings taken from the recipe file."
				}
			}
		}
		if p.summary == nil {
			p.validate()
			return
		}
		// the demo's explanation in a task of its own, after the form
		if p.demo {
			p.later(func(goapp.Context) { p.showTruth = true })
		}
		p.suggestEpochs()
		p.validate()
		p.stateAttr = "loaded"
		if p.pendingRun {
			p.pendingRun = false
			p.onRun(ctx, goapp.Event{})
		}
	})
}

func (p *Page) finishRun(rep wire.Reply, bufs []buffer) {
	p.running = false
	p.phase = ""
	elapsed := nowMillis() - p.started
	t, err := ParseTable(rep.CSV)
	if err != nil {
		p.fail(err.Error())
		return
	}
	p.timings = rep.Timings
	if p.mode == modeIdentity {
		p.identity = identityText(t)
		p.status = fmt.Sprintf("Identity check done in %.1f s.", elapsed/1000)
		p.stateAttr = "identity-done"
		return
	}
	p.table, p.sorted, p.cols = t, nil, nil
	p.notes = t.PNotes()
	p.sortCol, p.sortDesc = -1, false
	p.figures = rep.Figures
	p.scalp = scalpState{} // scalp.go
	p.bigFig = -1
	p.total = max(p.total, 1)
	p.warnings = rep.Warnings
	p.status = fmt.Sprintf("Done: %d results in %.1f s.", len(t.Rows), elapsed/1000)
	p.shownRows, p.shownFigs = 0, 0
	p.resultsRev++
	p.stateAttr = "drawing"
	p.phase = phaseShowing
	// the downloads, then the rows and figures, each in later short tasks
	csv, recipeJSON := rep.CSV, rep.ResolvedRecipe
	p.later(func(ctx goapp.Context) {
		for _, u := range p.urls {
			revokeURL(u)
		}
		p.urls = map[string]string{
			"results.csv": blobURL(csv, "text/csv"),
			"recipe.json": blobURL(recipeJSON, "application/json"),
		}
		p.figBufs = nil
		if len(bufs) == 2+len(rep.Figures) {
			p.urls["results.json"] = bufferURL(bufs[0], "application/json")
			p.urls[archiveName] = bufferURL(bufs[1], "application/zip")
			p.figBufs = bufs[2:]
		}
		p.resultsRev++
		p.drawing = true
		p.later(p.reveal)
	})
}

// archiveName is the download of every output in one file.
const archiveName = "amplink-results.zip"

// phaseShowing is the page's own last phase: rows and figures drawn into
// the page.
const phaseShowing = "showing"

// identityText summarises the identity check: every r should be 1.
func identityText(t Table) string {
	rc := t.Col("r")
	if rc < 0 || len(t.Rows) == 0 {
		return "The check gave no results."
	}
	worst := 0.0
	var rs []string
	for _, row := range t.Rows {
		v, err := strconv.ParseFloat(row[rc], 64)
		if err != nil {
			return "The check gave an undefined r: " + row[rc]
		}
		worst = math.Max(worst, math.Abs(v-1))
		if len(rs) < 4 {
			rs = append(rs, row[rc])
		}
	}
	verdict := "passed"
	if worst > 1e-9 {
		verdict = "FAILED"
	}
	return fmt.Sprintf("Seed window = target window gives r = %s (%d tests; largest |r − 1| = %.1e): %s.", strings.Join(rs, ", "), len(t.Rows), worst, verdict)
}

// suggestEpochs fills the epoch event for continuous data when empty.
func (p *Page) suggestEpochs() {
	s := p.summary
	if s == nil || s.Trials > 0 || len(s.Events) == 0 || p.form.get("epochs.event") != "" {
		return
	}
	p.form.set("epochs.enabled", "on")
	p.form.set("epochs.event", s.Events[0].Type)
	if p.form.get("epochs.start") == "" {
		p.form.set("epochs.start", "-1")
		p.form.set("epochs.end", "1.5")
	}
}

// validate parses the form and records the message for the field it names.
func (p *Page) validate() bool {
	p.fieldKey, p.fieldErr, p.formErr = "", "", ""
	// an unknown channel is caught while typing, before the rest of the
	// analysis is complete
	var key string
	err := p.checkChannels()
	if err != nil {
		key = p.form.KeyFor(err.Error())
	} else {
		_, key, err = p.form.Validate()
	}
	if err == nil {
		if p.runErrKey != "" {
			p.runErr, p.runErrKey = "", ""
		}
		return true
	}
	// a field the user has not typed in yet is not marked (a new analysis,
	// a switched type) until Run or a loaded recipe asks for every field
	if key != "" && !p.form.showAll && !p.form.touched[key] {
		return false
	}
	if key != "" {
		p.fieldKey, p.fieldErr = key, err.Error()
	} else {
		p.formErr = Human(err.Error())
	}
	return false
}

// sources lists the files a worker needs, data first.
func (p *Page) sources() (wire.Source, []fileRef) {
	if p.demo {
		return wire.Source{Demo: true}, nil
	}
	if p.src.Name == "" {
		return wire.Source{}, nil
	}
	return p.src, p.files
}

// ready reports whether a recording is loaded and can be analysed.
func (p *Page) ready() bool {
	return p.summary != nil && !p.loading
}

// waitReason says why Run cannot be pressed yet ("" when it can).
func (p *Page) waitReason() string {
	switch {
	case p.running:
		return ""
	case p.loading && p.demo:
		return "Waiting for the demo recording to be built…"
	case p.loading:
		return "Waiting for the recording to be read…"
	case p.summary == nil:
		return "Open a recording or load the demo first (step 1)."
	}
	return ""
}

// post sends req to worker k with the files themselves: a File is only a
// handle (posting one copies no bytes), and the worker reads it in slices.
func (p *Page) post(k int, req wire.Request, files []fileRef) {
	names := make([]string, len(files))
	handles := make([]handle, len(files))
	for i, f := range files {
		names[i], handles[i] = f.Name, f.h
	}
	p.pool.send(k, req, names, handles)
}
