package main

import (
	"bufio"
	"context"
	"errors"
	"fmt"
	"io"

	"github.com/spade-detect/spade/classify"
	"github.com/spade-detect/spade/internal/atomicfile"
	"github.com/spade-detect/spade/internal/cli"
	"github.com/spade-detect/spade/internal/textui"
)

// writeOutput sends output to standard output for "-" and otherwise to a
// file written atomically, so that an interrupted run leaves no half file.
//
// write may return cli.KeepOutput: what it wrote is kept (flushed, or the file
// committed) and the error it wraps is still the run's.
func (g *globalOptions) writeOutput(name string, write func(io.Writer) error) error {
	var kept error
	buffered := func(w io.Writer) error {
		bw := bufio.NewWriter(w)
		if err := write(bw); err != nil {
			var k cli.KeepOutput
			if !errors.As(err, &k) {
				return err
			}
			kept = k.Err
		}
		return bw.Flush()
	}
	if name == "-" || name == "" {
		if err := buffered(g.stdout); err != nil {
			return err
		}
		return kept
	}
	ctx := g.ctx
	if ctx == nil {
		ctx = context.Background()
	}
	if err := atomicfile.WriteContext(ctx, name, buffered); err != nil {
		return err
	}
	return kept
}

// newResultWriter writes results in the view asked for; warnings about
// the model as a whole (above all, that it cannot warn of ordnance) head
// the table and the CSV, and every JSON result carries its hazard check.
func newResultWriter(w io.Writer, format string, classes []string, top int, warnings []string) classify.ResultWriter {
	switch format {
	case "json":
		return classify.NewJSONWriter(w)
	case "csv":
		return classify.NewCSVWriter(w, classes, warnings)
	}
	return classify.NewTableWriter(w, top, warnings)
}

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
