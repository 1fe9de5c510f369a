package main

import (
	"fmt"
	"io"
	"os"
	"runtime"
	"strings"
)

func defaultWorkers() int { return runtime.GOMAXPROCS(0) }

// progressBar draws done/total on a terminal; on anything else it is silent.
type progressBar struct {
	w     io.Writer
	label string
	on    bool
	last  int
}

func newProgress(w io.Writer, label string) *progressBar {
	on := false
	if f, ok := w.(*os.File); ok {
		if st, err := f.Stat(); err == nil && st.Mode()&os.ModeCharDevice != 0 {
			on = true
		}
	}
	return &progressBar{w: w, label: label, on: on, last: -1}
}

func (p *progressBar) update(done, total int) {
	if !p.on || total == 0 {
		return
	}
	pct := 100 * done / total
	if pct == p.last {
		return
	}
	p.last = pct
	n := 30 * done / total
	fmt.Fprintf(p.w, "\r%s [%s%s] %3d%% (%d/%d)", p.label, strings.Repeat("#", n), strings.Repeat(".", 30-n), pct, done, total)
}

func (p *progressBar) done() {
	if p.on && p.last >= 0 {
		fmt.Fprintln(p.w)
	}
}
