// Package all registers every format of amplink/core/format. Import it for
// its side effect:
//
//	import _ "amplink/core/format/all"
package all
