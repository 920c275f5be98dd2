package main

import (
	"fmt"

	"github.com/spade-detect/spade/internal/textui"
)

// note prints a remark on stderr unless --quiet.
func (g *globalOptions) note(format string, args ...any) {
	if !g.quiet {
		fmt.Fprintf(g.stderr, format+"\n", args...)
	}
}

// progress is a bar on stderr while work runs, or nothing when stderr is
// not a terminal, under --quiet, or when machine output (JSON) is asked for.
func (g *globalOptions) progress(total int, what string, machineOutput bool) *textui.Progress {
	return textui.NewProgress(g.stderr, total, what, g.isTerminal && !g.quiet && !machineOutput)
}
