package all

// One blank import per format sub-package. A new format adds its own line
// here.
import (
	_ "amplink/core/format/csv"
	_ "amplink/core/format/edf"
	_ "amplink/core/format/f32"
	_ "amplink/core/format/mp3"
	_ "amplink/core/format/wav"
)
