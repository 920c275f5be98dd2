package main

import (
	"fmt"
	"io"
	"os"

	"github.com/schollz/progressbar/v3"
	"golang.org/x/term"
)

// stderrIsTerminal reports whether w is a terminal (stderr or stdout).
func stderrIsTerminal(w io.Writer) bool {
	f, ok := w.(*os.File)
	return ok && term.IsTerminal(int(f.Fd()))
}

// note prints a remark on stderr unless --quiet.
func (g *globalOptions) note(format string, args ...any) {
	if !g.quiet {
		fmt.Fprintf(g.stderr, format+"\n", args...)
	}
}

// progress is a bar on stderr while work runs, or nothing when stderr is
// not a terminal, under --quiet, or when machine output (JSON) is asked for.
type progress struct {
	bar *progressbar.ProgressBar
}

// A total of -1 counts without an end (streams of unknown length).
func (g *globalOptions) progress(total int, what string, machineOutput bool) *progress {
	if !g.isTerminal || g.quiet || machineOutput || total == 0 {
		return &progress{}
	}
	return &progress{bar: progressbar.NewOptions(total,
		progressbar.OptionSetWriter(g.stderr),
		progressbar.OptionSetDescription(what),
		progressbar.OptionSetWidth(30),
		progressbar.OptionShowCount(),
		progressbar.OptionClearOnFinish(),
		progressbar.OptionThrottle(100_000_000),
	)}
}

// step advances the bar by n; safe to call from several goroutines.
func (p *progress) step(n int) {
	if p.bar != nil {
		p.bar.Add(n)
	}
}

func (p *progress) done() {
	if p.bar != nil {
		p.bar.Finish()
	}
}
