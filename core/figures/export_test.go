package figures

// What the external tests (package figures_test, which runs whole plans
// through core/pipeline) read of the package's internals.
var (
	ParseLabels  = parseLabels
	FigFrame     = figFrame
	FigPowerStep = figPowerStep
	Significant  = significant
)
