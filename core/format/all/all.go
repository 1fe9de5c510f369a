package all

// One blank import per format sub-package. A new format adds its own line
// here (edf, f32, wav, mp3, ...).
import (
	_ "amplink/core/format/csv"
)
