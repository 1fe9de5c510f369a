package job

import (
	"bytes"
	"context"
	"encoding/json"
	"errors"
	"fmt"
	"io"
	"path"
	"sort"
	"strings"
	"time"

	"amplink/app/wire"
	"amplink/core/data"
	"amplink/core/dataset"
	"amplink/core/demo"
	"amplink/core/format"
	"amplink/core/format/all" // every reader, and Recognise
	"amplink/core/format/csv"
	"amplink/core/pipeline"
	"amplink/core/recipe"
	"amplink/core/report"
)

// MaxBytes is the most file bytes one worker accepts; see wire.MaxBytes.
const MaxBytes = wire.MaxBytes

// Worker handles requests one at a time. Its zero value is ready to use.
type Worker struct {
	// YieldEvery is how long compute may run before Sleep is called so the
	// JS event loop can deliver messages; 0 means 50 ms.
	YieldEvery time.Duration
	// Sleep hands control back to the JS event loop; nil means time.Sleep
	// of one millisecond (the only call that yields under js/wasm).
	Sleep func()

	// kept between OpRun and OpFinish (and OpDrawUnits) of the same Seq
	plan *pipeline.Plan
	seq  int
	name string // the recording, for results.csv's recording column
	// kept between OpLate and OpDraw: the combined results without figures
	draw *pendingDraw
}

// pendingDraw is a combined run whose figures wait for their late units.
type pendingDraw struct {
	out     *report.Results
	ar, fr  []pipeline.UnitResult
	combine time.Duration
}

// Files are the files that came with a request, by file name: bytes
// transferred from the page, or readers over a picked File read in slices.
type Files map[string]format.File

// Open implements format.Siblings over the files handed to the worker.
// A picked electrodes.tsv (or coordsystem.json) whose name does not
// follow the recording's stem still serves as its "<stem>_electrodes.tsv"
// (or "<stem>_coordsystem.json") when it is the only one of its kind.
func (f Files) Open(name string) (format.File, error) {
	file, ok := f[name]
	if !ok {
		for _, kind := range []string{"electrodes.tsv", "coordsystem.json"} {
			if strings.HasSuffix(name, "_"+kind) {
				if one, ok := f.only(kind); ok {
					return one, nil
				}
			}
		}
		return format.File{}, fmt.Errorf("%s: %w", name, format.ErrNoSibling)
	}
	return file, nil
}

// need returns the file named name, or an error saying that the page sent
// no bytes for it.
func (f Files) need(name string) (format.File, error) {
	file, ok := f[name]
	if !ok {
		return format.File{}, fmt.Errorf("worker: no bytes for %q", name)
	}
	return file, nil
}

// only returns the one file whose name ends in suffix (any case).
func (f Files) only(suffix string) (format.File, bool) {
	var found []format.File
	for n, file := range f {
		if strings.HasSuffix(strings.ToLower(n), suffix) {
			found = append(found, file)
		}
	}
	if len(found) != 1 {
		return format.File{}, false
	}
	return found[0], true
}

// Handle is HandleFiles for files that came as bytes, named by names.
func (w *Worker) Handle(ctx context.Context, req wire.Request, names []string, bufs [][]byte, post func(wire.Reply, [][]byte)) {
	if len(names) != len(bufs) {
		post(wire.Reply{Op: wire.OpError, Seq: req.Seq, Error: fmt.Sprintf("worker: %d file names for %d buffers", len(names), len(bufs))}, nil)
		return
	}
	files := make([]format.File, len(names))
	for i, n := range names {
		files[i] = format.Bytes(n, bufs[i])
	}
	w.HandleFiles(ctx, req, files, post)
}

// HandleFiles runs one request and posts its replies. files are
// req.Source's files (data first, then events, then any sidecars), or for
// OpFinish every worker's unit results. Errors are posted as OpError
// replies naming the file or recipe field; HandleFiles itself never panics
// on data.
func (w *Worker) HandleFiles(ctx context.Context, req wire.Request, list []format.File, post func(wire.Reply, [][]byte)) {
	fail := func(err error) {
		post(wire.Reply{Op: wire.OpError, Seq: req.Seq, Error: err.Error()}, nil)
	}
	files := Files{}
	for _, f := range list {
		files[f.Name] = f
	}
	if total := heldBytes(list); total > MaxBytes {
		fail(fmt.Errorf("%s: %d MiB of files is more than the %d MiB one worker can hold", req.Source.Name, total>>20, MaxBytes>>20))
		return
	}
	switch req.Op {
	case wire.OpDescribe, wire.OpDemo:
		var recognised []string
		var recipeText string
		if req.Op == wire.OpDescribe && !req.Source.Demo && (req.Source.Name == "" || len(req.Roles) > 0) {
			roles := req.Roles
			if len(roles) != len(list) {
				roles = Recognise(list)
			}
			src, rf, err := SourceFor(list, roles)
			if err != nil {
				fail(err)
				return
			}
			if rf != nil {
				b, err := io.ReadAll(io.NewSectionReader(rf.R, 0, min(rf.Size, 1<<20)))
				if err != nil {
					fail(fmt.Errorf("%s: %w", rf.Name, err))
					return
				}
				recipeText = string(b)
			}
			req.Source, recognised = src, roles
			if src.Name == "" {
				// a recipe on its own: its settings, and no recording
				post(wire.Reply{Op: wire.OpSummary, Seq: req.Seq, RecipeText: recipeText, Roles: roles, Source: &src}, nil)
				return
			}
		}
		var r *recipe.Recipe
		if len(req.Recipe) > 0 {
			var err error
			if r, err = recipe.Parse(req.Recipe); err != nil {
				fail(err)
				return
			}
		}
		ds, err := Open(r, req.Source, files)
		if err != nil {
			fail(err)
			return
		}
		sum, err := json.Marshal(dataset.Describe(ds))
		if err != nil {
			fail(err)
			return
		}
		rep := wire.Reply{Op: wire.OpSummary, Seq: req.Seq, Summary: sum, RecipeText: recipeText}
		if recognised != nil {
			src := req.Source
			rep.Roles, rep.Source = recognised, &src
		}
		if req.Source.Demo {
			rep.Recipe = demo.Recipe()
		}
		post(rep, nil)
	case wire.OpRun:
		w.plan = nil
		post(wire.Reply{Op: wire.OpPhase, Seq: req.Seq, Phase: wire.PhaseReading}, nil)
		p, err := w.planFor(req, files)
		if err != nil {
			fail(err)
			return
		}
		units := p.Units()
		post(wire.Reply{Op: wire.OpPhase, Seq: req.Seq, Phase: wire.PhaseComputing, Total: len(units)}, nil)
		mine := Assign(units, max(req.Workers, 1))
		if req.Worker < 0 || req.Worker >= len(mine) {
			fail(fmt.Errorf("worker: number %d of %d", req.Worker, len(mine)))
			return
		}
		res, err := w.compute(ctx, p, mine[req.Worker], len(units), func(done int) {
			post(wire.Reply{Op: wire.OpProgress, Seq: req.Seq, Done: done, Total: len(units)}, nil)
		})
		if err != nil {
			fail(err)
			return
		}
		w.plan, w.seq, w.name = p, req.Seq, RecordingName(req.Source)
		rep := wire.Reply{Op: wire.OpUnits, Seq: req.Seq, Total: len(units)}
		for _, u := range p.LaterUnits() {
			// every worker has the same plan: the page spreads these
			// (OpDrawUnits with every worker's units) before OpFinish
			rep.Late = append(rep.Late, wire.Unit{ID: u.ID, Kind: u.Kind, Channels: u.Channels, Cost: u.Cost})
		}
		post(rep, [][]byte{EncodeUnits(res)})
	case wire.OpFinish:
		if w.plan == nil || w.seq != req.Seq {
			fail(errors.New("worker: finish without a matching run"))
			return
		}
		all, err := decodeAll(list)
		if err != nil {
			fail(err)
			return
		}
		post(wire.Reply{Op: wire.OpPhase, Seq: req.Seq, Phase: wire.PhaseCombining}, nil)
		t0 := time.Now()
		out, ar, fr, err := w.plan.Combine(ctx, all)
		if err != nil {
			fail(err)
			return
		}
		w.draw = &pendingDraw{out: out, ar: ar, fr: fr, combine: time.Since(t0)}
		if late := w.plan.Figures.Late(out); len(late) > 0 {
			// the power maps chosen from the rows: the page spreads them
			// over its workers (OpDrawUnits) and hands them back (OpDraw)
			rep := wire.Reply{Op: wire.OpLate, Seq: req.Seq}
			for _, u := range late {
				rep.Late = append(rep.Late, wire.Unit{ID: u.ID, Kind: u.Kind, Channels: u.Channels, Cost: u.Cost})
			}
			post(rep, nil)
			return
		}
		w.drawAndReply(ctx, req, nil, post)
	case wire.OpDrawUnits:
		if w.plan == nil || w.seq != req.Seq {
			fail(errors.New("worker: figure units without a matching run"))
			return
		}
		one := func(ctx context.Context, i int) (pipeline.UnitResult, error) {
			u := req.Late[i]
			return w.plan.Figures.ComputeUnit(ctx, pipeline.Unit{ID: u.ID, Kind: u.Kind, Channels: u.Channels, Cost: u.Cost})
		}
		if len(list) > 0 {
			// later units (OpUnits' Late), from every worker's units
			all, err := decodeAll(list)
			if err != nil {
				fail(err)
				return
			}
			l, err := w.plan.Later(all)
			if err != nil {
				fail(err)
				return
			}
			one = func(ctx context.Context, i int) (pipeline.UnitResult, error) { return l.Compute(ctx, req.Late[i].ID) }
		}
		res, err := w.computeEach(ctx, len(req.Late), one, func(int) {})
		if err != nil {
			fail(err)
			return
		}
		post(wire.Reply{Op: wire.OpDrawn, Seq: req.Seq, Done: len(res)}, [][]byte{EncodeUnits(res)})
	case wire.OpDraw:
		if w.plan == nil || w.seq != req.Seq || w.draw == nil {
			fail(errors.New("worker: draw without a matching finish"))
			return
		}
		late, err := decodeAll(list)
		if err != nil {
			fail(err)
			return
		}
		w.drawAndReply(ctx, req, late, post)
	case wire.OpPower:
		fig, err := Power(req, files)
		if err != nil {
			fail(err)
			return
		}
		post(wire.Reply{Op: wire.OpPower, Seq: req.Seq, Figure: fig}, nil)
	default:
		fail(fmt.Errorf("worker: unknown operation %q", req.Op))
	}
}

// heldBytes is how many bytes of the files the worker may come to hold: a
// recording in a format that streams (format.Format.Open: EDF, BDF) stays
// in its file and is read in slices, so only its epochs or an envelope
// analysis's chunks are held, and those are checked against the sample
// budget (data.CheckSamples) where they are made.
func heldBytes(list []format.File) int64 {
	var total int64
	for _, f := range list {
		head := make([]byte, min(f.Size, format.HeadLen))
		if _, err := f.R.ReadAt(head, 0); err == nil || errors.Is(err, io.EOF) {
			if ft, ok := format.Detect(head, f.Name); ok && ft.Open != nil && f.Size > 0 {
				continue
			}
		}
		total += f.Size
	}
	return total
}

// headLen is how much of each file Recognise looks at.
const headLen = 64 << 10

// Recognise says what each file is from its first bytes (all.Recognise).
func Recognise(files []format.File) []string {
	out := make([]string, len(files))
	for i, f := range files {
		head := make([]byte, min(f.Size, headLen))
		n, err := f.R.ReadAt(head, 0)
		if err != nil && err != io.EOF {
			out[i] = string(all.Unknown)
			continue
		}
		out[i] = string(all.Recognise(head[:n], f.Name))
	}
	return out
}

// SourceFor makes the source from files and what each is: the recording
// with its events, channels and trials tables (the other files stay
// available as siblings, such as a float32 epochs' sidecar), and the
// recipe file if there is one. Exactly one file must be a recording.
func SourceFor(files []format.File, roles []string) (wire.Source, *format.File, error) {
	var src wire.Source
	var rf *format.File
	var recs []string
	for i, f := range files {
		switch all.Role(roles[i]) {
		case all.Recording:
			recs = append(recs, f.Name)
		case all.Events:
			src.EventsName = f.Name
		case all.Channels:
			src.ChannelsName = f.Name
		case all.Trials:
			src.TrialsName = f.Name
		case all.Electrodes:
			src.ElectrodesName = f.Name
		case all.Recipe:
			rf = &files[i]
		}
	}
	switch {
	case len(recs) == 1:
		src.Name = recs[0]
	case len(recs) == 0 && rf != nil:
		return src, rf, nil // a recipe alone: settings, no recording
	case len(recs) == 0:
		var names []string
		for i, f := range files {
			names = append(names, fmt.Sprintf("%s (%s)", f.Name, roles[i]))
		}
		return src, nil, fmt.Errorf("none of these files is a recording: %s", strings.Join(names, ", "))
	default:
		return src, nil, fmt.Errorf("%s are all recordings; the page analyses one at a time (amplink run takes several)", strings.Join(recs, ", "))
	}
	return src, rf, nil
}

func ms(d time.Duration) float64 { return float64(d.Microseconds()) / 1000 }

// RecordingName is the recording column's value for a source: the file's
// base name, as `amplink run` writes it, or "demo".
func RecordingName(src wire.Source) string {
	if src.Demo {
		return "demo"
	}
	return path.Base(strings.ReplaceAll(src.Name, "\\", "/"))
}

// AddRecording gives every row the recording column, as `amplink run`
// does, so that `amplink merge` takes the page's results.csv.
func AddRecording(res *report.Results, name string) {
	for i := range res.Rows {
		res.Rows[i].Extra = append(res.Rows[i].Extra, report.Field{Name: "recording", Value: name})
	}
}

func (w *Worker) planFor(req wire.Request, files Files) (*pipeline.Plan, error) {
	r, err := recipe.Parse(req.Recipe)
	if err != nil {
		return nil, err
	}
	ds, err := Open(r, req.Source, files)
	if err != nil {
		return nil, err
	}
	return pipeline.NewPlan(r, ds)
}

// compute runs the listed units in order, reporting the count done after
// each, and yields to the event loop at least every YieldEvery.
func (w *Worker) compute(ctx context.Context, p *pipeline.Plan, ids []int, total int, progress func(done int)) ([]pipeline.UnitResult, error) {
	return w.computeEach(ctx, len(ids), func(ctx context.Context, i int) (pipeline.UnitResult, error) { return p.Compute(ctx, ids[i]) }, progress)
}

// computeEach runs one(ctx, i) for i = 0 … n−1 in order, reporting the
// count done after each, and yields to the event loop at least every
// YieldEvery.
func (w *Worker) computeEach(ctx context.Context, n int, one func(ctx context.Context, i int) (pipeline.UnitResult, error), progress func(done int)) ([]pipeline.UnitResult, error) {
	every := w.YieldEvery
	if every <= 0 {
		every = 50 * time.Millisecond
	}
	sleep := w.Sleep
	if sleep == nil {
		sleep = func() { time.Sleep(time.Millisecond) }
	}
	last := time.Now()
	out := make([]pipeline.UnitResult, 0, n)
	for i := range n {
		if err := ctx.Err(); err != nil {
			return nil, err
		}
		r, err := one(ctx, i)
		if err != nil {
			return nil, err
		}
		out = append(out, r)
		progress(i + 1)
		if time.Since(last) >= every {
			sleep()
			last = time.Now()
		}
	}
	return out, nil
}

// Open decodes the source into a dataset: the demo recording, or the named
// data file with its events file and sidecars.
func Open(r *recipe.Recipe, src wire.Source, files Files) (*dataset.Dataset, error) {
	if src.Demo {
		return demoDataset(r)
	}
	f, err := files.need(src.Name)
	if err != nil {
		return nil, err
	}
	var ev *format.File
	if src.EventsName != "" {
		e, err := files.need(src.EventsName)
		if err != nil {
			return nil, err
		}
		ev = &e
	}
	// companions recognised by their content are seen under the names the
	// core looks for beside the recording (<stem>_channels.tsv,
	// <stem>_electrodes.tsv); a trials
	// table is attached as `amplink run --trials` attaches one
	sib := Files{}
	for k, v := range files {
		sib[k] = v
	}
	stem := dataset.Stem(src.Name)
	if src.ChannelsName != "" {
		c, err := files.need(src.ChannelsName)
		if err != nil {
			return nil, err
		}
		delete(sib, src.ChannelsName)
		sib[stem+"_channels.tsv"] = c
	}
	if src.ElectrodesName != "" {
		el, err := files.need(src.ElectrodesName)
		if err != nil {
			return nil, err
		}
		delete(sib, src.ElectrodesName)
		sib[stem+"_electrodes.tsv"] = el
	}
	var trials *format.File
	if src.TrialsName != "" {
		t, err := files.need(src.TrialsName)
		if err != nil {
			return nil, err
		}
		trials = &t
		delete(sib, src.TrialsName)
		delete(sib, stem+"_trials.csv")
		delete(sib, stem+".trials.csv")
	}
	ds, err := dataset.Open(r, f, ev, sib)
	if errors.Is(err, data.ErrTooLarge) {
		err = fmt.Errorf("%w. The page's workers hold at most %d MiB of samples each; the command-line tool (amplink run) holds as much as its --max-memory flag allows", err, data.MaxSampleBytes>>20)
	}
	if err != nil || trials == nil {
		return ds, err
	}
	if ds.Epochs == nil {
		if r == nil {
			// described before any recipe: it is used once epochs are cut
			ds.Notes = append(ds.Notes, trials.Name+": a trials table, used once the recording is cut into epochs")
		} else {
			ds.Notes = append(ds.Notes, trials.Name+" (trials table) is not used: the recording is not cut into epochs")
		}
		return ds, nil
	}
	t, err := csv.DecodeTrials(*trials)
	if err != nil {
		return nil, err
	}
	if err := ds.AttachTrials(t, trials.Name); err != nil {
		return nil, err
	}
	return ds, nil
}

// Assign splits units over n workers: longest first onto the least loaded
// worker (ties to the lower number), so the split depends only on the plan.
// Each worker's list is in increasing unit ID.
func Assign(units []pipeline.Unit, n int) [][]int {
	if n < 1 {
		panic("job: Assign needs at least one worker")
	}
	order := make([]int, len(units))
	for i := range order {
		order[i] = i
	}
	sort.SliceStable(order, func(a, b int) bool {
		ua, ub := units[order[a]], units[order[b]]
		if ua.Cost != ub.Cost {
			return ua.Cost > ub.Cost
		}
		return ua.ID < ub.ID
	})
	load := make([]float64, n)
	out := make([][]int, n)
	for _, i := range order {
		k := 0
		for j := 1; j < n; j++ {
			if load[j] < load[k] {
				k = j
			}
		}
		load[k] += units[i].Cost
		out[k] = append(out[k], units[i].ID)
	}
	for _, l := range out {
		sort.Ints(l)
	}
	return out
}

// ResultsReply turns results into the OpResults reply. The reply holds
// results.csv (the page shows it as the table), the figure names and
// titles, and the warnings; the bulky parts travel as buffers beside it,
// never through JSON: bufs[0] is results.json and bufs[1+i] the SVG of
// figure i. The page makes them Blobs without copying them through Go.
func ResultsReply(res *report.Results) (wire.Reply, [][]byte, error) {
	files, err := report.Outputs(res)
	if err != nil {
		return wire.Reply{}, nil, err
	}
	var csvText, jsonBytes []byte
	for _, f := range files {
		switch f.Name {
		case "results.csv":
			csvText = f.Data
		case "results.json":
			jsonBytes = f.Data
		}
	}
	var z bytes.Buffer
	if err := report.WriteZip(&z, files); err != nil {
		return wire.Reply{}, nil, err
	}
	rep := wire.Reply{Op: wire.OpResults, CSV: string(csvText), Warnings: res.Warnings, ResolvedRecipe: string(res.Recipe)}
	bufs := [][]byte{jsonBytes, z.Bytes()}
	for _, f := range res.Figures {
		rep.Figures = append(rep.Figures, wire.Figure{Name: f.Name, Title: f.Title})
		bufs = append(bufs, []byte(f.SVG))
	}
	return rep, bufs, nil
}

// decodeAll decodes every worker's unit buffer.
func decodeAll(list []format.File) ([]pipeline.UnitResult, error) {
	var all []pipeline.UnitResult
	for i, f := range list {
		b, err := io.ReadAll(io.NewSectionReader(f.R, 0, f.Size))
		if err != nil {
			return nil, fmt.Errorf("worker: units from worker %d: %w", i, err)
		}
		u, err := DecodeUnits(b)
		if err != nil {
			return nil, fmt.Errorf("worker: units from worker %d: %w", i, err)
		}
		all = append(all, u...)
	}
	return all, nil
}

// drawAndReply draws the figures of the combined run (with the late units'
// results computed elsewhere; Draw computes any missing) and posts
// OpResults.
func (w *Worker) drawAndReply(ctx context.Context, req wire.Request, late []pipeline.UnitResult, post func(wire.Reply, [][]byte)) {
	d := w.draw
	w.draw = nil
	fail := func(err error) { post(wire.Reply{Op: wire.OpError, Seq: req.Seq, Error: err.Error()}, nil) }
	post(wire.Reply{Op: wire.OpPhase, Seq: req.Seq, Phase: wire.PhaseDrawing}, nil)
	t0 := time.Now()
	if err := w.plan.Figures.Draw(ctx, d.ar, append(d.fr, late...), d.out); err != nil {
		fail(err)
		return
	}
	res := d.out
	AddRecording(res, w.name)
	draw := time.Since(t0)
	post(wire.Reply{Op: wire.OpPhase, Seq: req.Seq, Phase: wire.PhasePacking}, nil)
	t1 := time.Now()
	rep, out, err := ResultsReply(res)
	if err != nil {
		fail(err)
		return
	}
	rep.Seq = req.Seq
	rep.Timings = []wire.Timing{
		{Step: "combine (rows, maps)", MS: ms(d.combine)},
		{Step: "draw (figures)", MS: ms(draw)},
		{Step: "pack (csv, json, archive)", MS: ms(time.Since(t1))},
	}
	post(rep, out)
}
