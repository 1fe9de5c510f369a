package app

import (
	"fmt"
	"math"
	"sort"
	"strconv"
	"strings"

	goapp "github.com/maxence-charriere/go-app/v9/pkg/app"

	"amplink/app/wire"
	"amplink/core/recipe"
)

// The page's event handlers, by step: loading a recording, the power view,
// the form, running and the results.

// ---- loading ----

func (p *Page) onLoadDemo(ctx goapp.Context, e goapp.Event) {
	p.resetRecording()
	p.demo = true
	p.loading = true
	p.stateAttr = "reading"
	p.loadMsg = "Building the demo recording…"
	p.seq++
	p.pool.send(0, wire.Request{Op: wire.OpDemo, Seq: p.seq, Source: wire.Source{Demo: true}}, nil, nil)
}

func (p *Page) resetRecording() {
	if p.running {
		p.cancel()
	}
	p.files, p.roles, p.src, p.demo = nil, nil, wire.Source{}, false
	p.summary, p.loadErr, p.loadMsg = nil, "", ""
	p.powerSVG, p.powerErr, p.powerChan = "", "", ""
	p.table, p.sorted, p.cols, p.shownRows = Table{}, nil, nil, 0
	setBodyHTML(resultsBody, "")
	p.figures, p.identity = nil, ""
	p.runErr, p.runErrKey, p.status = "", "", ""
	p.resultsRev++
}

func (p *Page) onFiles(ctx goapp.Context, e goapp.Event) {
	p.takeFiles(filesOf(ctx.JSSrc().Get("files")))
}

func (p *Page) onDragOver(ctx goapp.Context, e goapp.Event) {
	e.PreventDefault()
}

func (p *Page) onDrop(ctx goapp.Context, e goapp.Event) {
	e.PreventDefault()
	p.takeFiles(filesOf(e.Get("dataTransfer").Get("files")))
}

// takeFiles hands what the user gave to a worker, which recognises each
// file by its content (a recording, its events, channels or trials table,
// a recipe) and describes the recording. A recipe alone only fills the
// form; with a recording open, it also runs it.
func (p *Page) takeFiles(fs []fileRef) {
	if len(fs) == 0 {
		return
	}
	var total int64
	for _, f := range fs {
		total += f.Size
	}
	if total > wire.MaxBytes {
		p.loadErr = fmt.Sprintf("These files hold %d MiB; the page can hold at most %d MiB per analysis worker. Use the command-line tool for larger recordings.", total>>20, wire.MaxBytes>>20)
		return
	}
	if len(fs) == 1 && strings.HasSuffix(strings.ToLower(fs[0].Name), ".json") && fs[0].Size < 1<<20 && (p.summary != nil || p.demo) {
		// a recipe for the recording already open
		f := fs[0]
		p.ctx.Async(func() {
			text, err := readText(f)
			p.ctx.Dispatch(func(ctx goapp.Context) {
				if err != nil {
					p.formErr = err.Error()
					return
				}
				if strings.Contains(text, `"analyses"`) {
					p.takeRecipe(text, true)
					return
				}
				p.describeFiles(append(append([]fileRef(nil), p.files...), f), nil)
			})
		})
		return
	}
	p.resetRecording()
	p.describeFiles(fs, nil)
}

// takeRecipe fills the form from a recipe file, and runs it when asked and
// a recording is open.
func (p *Page) takeRecipe(text string, run bool) {
	f, err := FormFromJSON([]byte(text))
	if err != nil {
		p.formErr = "Recipe file: " + err.Error()
		return
	}
	p.form = f
	p.form.showAll = true
	p.expanded = 0
	p.restored = "Settings taken from the recipe file."
	p.validate()
	if run {
		p.onRun(p.ctx, goapp.Event{})
	}
}

// describeFiles asks a worker to read the files: with roles nil it
// recognises each one by its content.
func (p *Page) describeFiles(fs []fileRef, roles []string) {
	p.files, p.roles, p.src, p.demo = fs, roles, wire.Source{}, false
	p.summary = nil
	p.loading = true
	p.stateAttr = "reading"
	names := make([]string, len(fs))
	for i, f := range fs {
		names[i] = f.Name
	}
	p.loadMsg = "Reading " + strings.Join(names, ", ") + "…"
	p.seq++
	p.post(0, wire.Request{Op: wire.OpDescribe, Seq: p.seq, Roles: roles}, fs)
}

// onRole changes what file i is taken as, and reads the files again.
func (p *Page) onRole(i int) goapp.EventHandler {
	return func(ctx goapp.Context, e goapp.Event) {
		if i >= len(p.files) || i >= len(p.roles) {
			return
		}
		roles := append([]string(nil), p.roles...)
		roles[i] = ctx.JSSrc().Get("value").String()
		files := p.files
		if p.running {
			p.cancel()
		}
		p.describeFiles(files, roles)
	}
}

// ---- check plot ----

func (p *Page) onPowerChannel(ctx goapp.Context, e goapp.Event) {
	p.powerChan = ctx.JSSrc().Get("value").String()
}

func (p *Page) onShowPower(ctx goapp.Context, e goapp.Event) {
	p.requestPower()
}

// requestPower asks a worker for the power map of the chosen channel. It
// needs only the channel and the spectral settings (their defaults when
// empty), not a complete analysis.
func (p *Page) requestPower() {
	if !p.ready() {
		return
	}
	src, files := p.sources()
	p.powerSeq-- // negative: apart from the run sequence numbers
	p.powerBusy, p.powerErr = true, ""
	p.post(0, wire.Request{Op: wire.OpPower, Seq: p.powerSeq, Source: src, Recipe: p.form.JSON(), Channel: p.powerChan}, files)
}

func (p *Page) onDragTarget(ctx goapp.Context, e goapp.Event) {
	p.dragTarget = ctx.JSSrc().Get("value").String()
}

// onDragged takes a finished drag over the power map (client
// coordinates); the pointer events themselves are handled outside go-app
// (see attachDrag), so dragging costs no page updates.
func (p *Page) onDragged(x0, y0, x1, y1 float64) {
	p.ctx.Dispatch(func(ctx goapp.Context) {
		g, box, ok := plotGeometry()
		if !ok {
			p.dragMsg = "The figure has no plot-area geometry to map the selection through."
			return
		}
		t0, f0 := g.toData(x0, y0, box)
		t1, f1 := g.toData(x1, y1, box)
		p.applyWindow(math.Min(t0, t1), math.Max(t0, t1), math.Min(f0, f1), math.Max(f0, f1))
	})
}

// applyWindow sets the chosen seed or target window from a selection.
func (p *Page) applyWindow(t0, t1, f0, f1 float64) {
	target := p.dragTarget
	if target == "" {
		target = "analyses.0.seed"
	}
	round := func(v float64, digits int) string { return strconv.FormatFloat(v, 'f', digits, 64) }
	p.form.set(target+".time.0", round(t0, 3))
	p.form.set(target+".time.1", round(t1, 3))
	p.form.set(target+".freq.0", round(f0, 1))
	p.form.set(target+".freq.1", round(f1, 1))
	if p.form.get(target+".channel") == "" && p.powerChan != "" {
		p.form.set(target+".channel", p.powerChan)
	}
	var n int
	var which string
	fmt.Sscanf(strings.ReplaceAll(target, ".", " "), "analyses %d %s", &n, &which)
	p.dragMsg = fmt.Sprintf("Set the %s window of analysis %d to %s–%s s, %s–%s Hz.", which, n+1, round(t0, 3), round(t1, 3), round(f0, 1), round(f1, 1))
	p.form.touch(target + ".time.0")
	p.validate()
	// the map again, with the windows outlined where they now are (the
	// dragged rectangle stays drawn meanwhile)
	p.requestPower()
}

// ---- the form ----

func (p *Page) onField(key string) goapp.EventHandler {
	return func(ctx goapp.Context, e goapp.Event) {
		v := ctx.JSSrc().Get("value").String()
		if ctx.JSSrc().Get("type").String() == "checkbox" {
			v = ""
			if ctx.JSSrc().Get("checked").Bool() {
				v = "on"
			}
		}
		p.form.set(key, v)
		p.form.touch(key)
		if strings.HasSuffix(key, ".type") {
			// a switched type marks only what is typed from now on
			p.form.showAll = false
		}
		p.validate()
	}
}

func (p *Page) onAddAnalysis(t string) goapp.EventHandler {
	return func(ctx goapp.Context, e goapp.Event) {
		p.form.AddAnalysis(t)
		p.form.showAll = false // the new analysis is marked only as it is typed in
		p.expanded = p.form.Analyses - 1
		p.validate()
	}
}

func (p *Page) onRemoveAnalysis(i int) goapp.EventHandler {
	return func(ctx goapp.Context, e goapp.Event) {
		p.form.RemoveAnalysis(i)
		p.expanded = 0
		p.validate()
	}
}

func (p *Page) onCopyLink(ctx goapp.Context, e goapp.Event) {
	p.shareURL = setFragment(EncodeFragment(p.form.JSON()))
	copyText(p.shareURL)
}

// ---- running ----

func (p *Page) onRun(ctx goapp.Context, e goapp.Event) {
	if !p.ready() {
		// asked for before the recording is ready: it starts once it is
		p.pendingRun = p.loading
		if !p.loading {
			p.runErr = p.waitReason()
		}
		return
	}
	p.form.showAll = true
	if !p.validate() {
		p.runErr = "Fix the marked field first: " + Human(p.fieldErr+p.formErr)
		p.runErrKey = p.fieldKey
		p.form.rev++
		return
	}
	p.startRun(modeMain, p.form.JSON())
}

// onIdentity runs the first window analysis with its target set to its
// seed: the correlation of a quantity with itself must be exactly 1.
func (p *Page) onIdentity(ctx goapp.Context, e goapp.Event) {
	f := p.form.Clone()
	idx := -1
	for i := 0; i < f.Analyses; i++ {
		if f.get(fmt.Sprintf("analyses.%d.type", i)) == recipe.TypeTrialWindow {
			idx = i
			break
		}
	}
	if idx < 0 {
		p.identity = "The identity check needs a trial-window analysis in the recipe."
		return
	}
	g := &Form{Values: map[string]string{}, Analyses: 1}
	for k, v := range f.Values {
		if !strings.HasPrefix(k, "analyses.") {
			g.Values[k] = v
		}
	}
	src := fmt.Sprintf("analyses.%d.", idx)
	for _, k := range []string{"type", "method", "seed.channel", "seed.time.0", "seed.time.1", "seed.freq.0", "seed.freq.1"} {
		g.set("analyses.0."+k, f.get(src+k))
	}
	g.set("analyses.0.id", "identity")
	for _, k := range []string{"channel", "time.0", "time.1", "freq.0", "freq.1"} {
		g.set("analyses.0.target."+k, f.get(src+"seed."+k))
	}
	if _, _, err := g.Validate(); err != nil {
		p.identity = "The identity check could not be set up: " + err.Error()
		return
	}
	p.identity = "Running…"
	p.startRun(modeIdentity, g.JSON())
}

func (p *Page) startRun(mode string, recipeJSON []byte) {
	src, files := p.sources()
	if !src.Demo && src.Name == "" {
		p.runErr = "Open a recording or load the demo first."
		return
	}
	if p.running {
		p.cancel()
	}
	p.seq++
	p.mode = mode
	p.running = true
	p.runErr, p.runErrKey, p.status = "", "", ""
	p.phase, p.timings = wire.PhaseReading, nil
	if mode == modeMain {
		p.groups = Questions(recipeJSON)
	}
	n := p.pool.size()
	p.done = make([]int, n)
	p.unitBufs = make([]buffer, n)
	p.unitsIn = 0
	p.laterUnits, p.drawLater = nil, false
	p.total = 0
	p.started = nowMillis()
	markTime("amplink-run")
	p.stateAttr = "running"
	for k := 0; k < n; k++ {
		p.post(k, wire.Request{Op: wire.OpRun, Seq: p.seq, Source: src, Recipe: recipeJSON, Worker: k, Workers: n}, files)
	}
}

func (p *Page) onCancel(ctx goapp.Context, e goapp.Event) {
	p.cancel()
}

func (p *Page) cancel() {
	if !p.running {
		return
	}
	p.pool.restart()
	p.seq++
	p.running, p.powerBusy = false, false
	p.phase = ""
	p.status = "Analysis cancelled."
	p.stateAttr = "cancelled"
	if p.mode == modeIdentity {
		p.identity = "Cancelled."
	}
}

func (p *Page) doneUnits() int {
	s := 0
	for _, d := range p.done {
		s += d
	}
	return s
}

// ---- results ----

func (p *Page) onSort(col int) goapp.EventHandler {
	return func(ctx goapp.Context, e goapp.Event) {
		if p.sortCol == col {
			p.sortDesc = !p.sortDesc
		} else {
			p.sortCol, p.sortDesc = col, false
		}
		p.redrawRows()
	}
}

// redrawRows rewrites the table body (new order or columns), a chunk per
// task.
func (p *Page) redrawRows() {
	p.sorted, p.shownRows = nil, -1
	if !p.drawing {
		p.drawing = true
		p.stateAttr = "drawing"
		p.later(p.reveal)
	}
}

// onAllColumns shows every column of the results, or the main ones.
func (p *Page) onAllColumns(ctx goapp.Context, e goapp.Event) {
	p.allCols, p.cols = ctx.JSSrc().Get("checked").Bool(), nil
	p.redrawRows()
}

// visible lists the columns shown, worked out once per table and setting.
func (p *Page) visible() []int {
	if p.cols == nil {
		p.cols = p.table.Visible(p.allCols)
	}
	return p.cols
}

func (p *Page) onReload(ctx goapp.Context, e goapp.Event) {
	ctx.Reload()
}

// sortedDownloads lists the download names in a fixed order.
func (p *Page) sortedDownloads() []string {
	var names []string
	for n := range p.urls {
		if n != "results.csv" && n != "results.json" && n != "recipe.json" && n != archiveName {
			names = append(names, n)
		}
	}
	sort.Strings(names)
	var out []string
	for _, n := range []string{"results.csv", "results.json", "recipe.json"} {
		if p.urls[n] != "" {
			out = append(out, n)
		}
	}
	return append(out, names...)
}
