package wire

import "encoding/json"

// MaxBytes is the most file bytes one worker accepts (1 GiB): wasm32 memory
// ends at 4 GiB and running out is fatal to the worker, and decoding needs
// room beside the raw bytes (DESIGN.md, "Memory"). The page refuses larger
// files before reading them.
const MaxBytes = 1 << 30

// Operations a worker accepts.
const (
	OpDescribe = "describe" // decode the data (and events) bytes; reply OpSummary
	OpDemo     = "demo"     // build the demo recording; reply OpSummary with Recipe set
	OpRun      = "run"      // plan, compute this worker's share; reply OpProgress…, OpUnits
	OpFinish   = "finish"   // combine every worker's units (after OpRun); reply OpResults
	OpPower    = "power"    // trial-averaged time-frequency power of one channel; reply OpPower

	// When the figures need power maps that only the rows can choose,
	// OpFinish replies OpLate instead of OpResults; the page spreads those
	// units over its workers (OpDrawUnits, each replying OpDrawn with their
	// results as a buffer) and hands every result back to the worker that
	// combined (OpDraw), which draws the figures and replies OpResults.
	// The same request carries a run's later units (the surrogates of
	// envelope rows, listed in every OpUnits reply's Late): then with every
	// worker's OpUnits buffer, and before OpFinish, which gets their
	// OpDrawn buffers after the units'.
	OpDrawUnits = "drawunits" // compute Late figure units, or later units with every OpUnits buffer (after OpRun); reply OpDrawn
	OpDraw      = "draw"      // draw the figures from every OpDrawn buffer (after OpLate); reply OpResults
)

// Replies a worker sends.
const (
	OpSummary  = "summary"
	OpProgress = "progress"
	OpUnits    = "units"
	OpPhase    = "phase"   // which stage of a run the worker is in (Phase, Done, Total)
	OpResults  = "results" // bufs: results.json, the archive of every output, then each figure's SVG
	OpError    = "error"
	OpFatal    = "fatal" // the worker could not start
	OpLate     = "late"  // combined; these figure units remain (Late)
	OpDrawn    = "drawn" // bufs: the OpDrawUnits results (Done: how many)
)

// Unit is a unit of work as the page sees it: an id, its kind, the
// channels it reads, and its relative cost.
type Unit struct {
	ID       int      `json:"id"`
	Kind     string   `json:"kind"`
	Channels []string `json:"channels"`
	Cost     float64  `json:"cost"`
}

// Source says where a worker finds the recording.
type Source struct {
	Demo       bool   `json:"demo,omitempty"`       // build the demo data; no bytes
	Name       string `json:"name,omitempty"`       // file name of the data bytes
	EventsName string `json:"eventsName,omitempty"` // file name of the events bytes, if any
	// the companions the page recognised by their content, whatever their
	// names: a trials table (trial,<name>...), a channels table and an
	// electrodes table
	TrialsName     string `json:"trialsName,omitempty"`
	ChannelsName   string `json:"channelsName,omitempty"`
	ElectrodesName string `json:"electrodesName,omitempty"` // a BIDS electrodes table
}

// Phases of a run, as OpPhase replies report them.
const (
	PhaseReading   = "reading"   // decoding the recording and planning
	PhaseComputing = "computing" // the units (OpProgress counts them)
	PhaseCombining = "combining" // rows, maps from every worker's units
	PhaseDrawing   = "drawing"   // figures (Done of Total when counted)
	PhasePacking   = "packing"   // the tables, the archive
)

// Request goes from the page to a worker.
type Request struct {
	Op     string          `json:"op"`
	Seq    int             `json:"seq"` // echoed in every reply, so stale replies can be dropped
	Source Source          `json:"source"`
	Recipe json.RawMessage `json:"recipe,omitempty"`

	// OpRun: this worker is number Worker of Workers.
	Worker  int `json:"worker,omitempty"`
	Workers int `json:"workers,omitempty"`

	// OpFinish: every unit result, as JSON lists from the OpUnits replies.
	Units []json.RawMessage `json:"units,omitempty"`

	// OpPower: the channel to show.
	Channel string `json:"channel,omitempty"`

	// OpDrawUnits: the figure units, or later units, this worker computes.
	Late []Unit `json:"late,omitempty"`

	// OpDescribe: what each file is (see all.Roles), in the order of the
	// files sent. Empty with an empty Source.Name: the worker recognises
	// each file by its content and replies with Roles and the Source.
	Roles []string `json:"roles,omitempty"`
}

// Figure is one SVG figure.
type Figure struct {
	Name  string `json:"name"`
	Title string `json:"title"`
	SVG   string `json:"svg"`
}

// Reply goes from a worker to the page.
type Reply struct {
	Op    string `json:"op"`
	Seq   int    `json:"seq"`
	Error string `json:"error,omitempty"`

	// OpSummary: the dataset summary (dataset.Summary as JSON); for the demo
	// also the demo recipe.
	Summary json.RawMessage `json:"summary,omitempty"`
	Recipe  json.RawMessage `json:"recipe,omitempty"`
	// and, for files sent with OpDescribe: what each was taken as, the
	// source made of them, and the text of a recipe among them
	Roles      []string `json:"roles,omitempty"`
	Source     *Source  `json:"source,omitempty"`
	RecipeText string   `json:"recipeText,omitempty"`

	// OpLate: the figure units that remain to be computed; OpUnits: the
	// run's later units (none when the run has none).
	Late []Unit `json:"late,omitempty"`

	// OpPhase: the phase; with Done and Total when it counts.
	Phase string `json:"phase,omitempty"`

	// OpProgress: units this worker has finished, and the units of the whole
	// run (every worker).
	Done  int `json:"done,omitempty"`
	Total int `json:"total,omitempty"`

	// OpUnits: this worker's unit results ([]pipeline.UnitResult as JSON).
	Units json.RawMessage `json:"units,omitempty"`

	// OpResults: results.csv text, the figures' names and titles (their SVG
	// travels as buffers: results.json first, then the .zip archive of every
	// output as `amplink run --out` lays them out, then one per figure), the
	// warnings, the resolved recipe (ResolvedRecipe)
	// and how long each step of combining took (Timings, ms).
	CSV      string   `json:"csv,omitempty"`
	Figures  []Figure `json:"figures,omitempty"`
	Warnings []string `json:"warnings,omitempty"`
	Timings  []Timing `json:"timings,omitempty"`
	// ResolvedRecipe is recipe.json byte for byte as the CLI writes it.
	ResolvedRecipe string `json:"resolvedRecipe,omitempty"`

	// OpPower: the figure.
	Figure *Figure `json:"figure,omitempty"`
}

// Timing is how long one step of a worker's work took.
type Timing struct {
	Step string  `json:"step"`
	MS   float64 `json:"ms"`
}
