package report

import (
	"fmt"
	"hash/fnv"
	"strings"
)

// UniqueNames turns names into file names (SafeName with repl) that are
// unique, also on file systems that ignore case. Names whose safe forms
// collide although the names differ (A/B, A_B and "A B" all give A_B) each
// get "_" and eight hex digits of the FNV-1a hash of the original name, so
// a name's file does not depend on which other names are present in which
// order. Names that are identical get "_2", "_3", … in order.
func UniqueNames(names []string, repl rune) []string {
	safe := make([]string, len(names))
	distinct := map[string]map[string]bool{} // folded safe name → originals
	for i, n := range names {
		safe[i] = SafeName(n, repl)
		k := strings.ToLower(safe[i])
		if distinct[k] == nil {
			distinct[k] = map[string]bool{}
		}
		distinct[k][n] = true
	}
	out := make([]string, len(names))
	used := map[string]int{}
	for i, n := range names {
		s := safe[i]
		if len(distinct[strings.ToLower(s)]) > 1 {
			h := fnv.New32a()
			h.Write([]byte(n))
			s = fmt.Sprintf("%s%c%08x", s, repl, h.Sum32())
		}
		k := strings.ToLower(s)
		used[k]++
		if c := used[k]; c > 1 {
			s = fmt.Sprintf("%s%c%d", s, repl, c)
		}
		out[i] = s
	}
	return out
}
