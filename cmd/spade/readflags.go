package main

import (
	"fmt"
	"io"
	"os"
	"strings"

	"github.com/spade-detect/spade/features"
	"github.com/spade-detect/spade/internal/textui"
	"github.com/spf13/pflag"
)

// logOptions are the flags of every command that reads a dig log.
type logOptions struct {
	skipBad     bool
	phaseOffset float64
	format      string
	dateOrder   string
}

func (o *logOptions) AddFlags(fs *pflag.FlagSet) {
	fs.BoolVar(&o.skipBad, "skip-bad", false, "list bad rows and go on with the rest")
	fs.Float64Var(&o.phaseOffset, "phase-offset", 0, "the phase `DEG` your instrument reports for ferrite; subtracted from every reading")
	fs.StringVar(&o.format, "input-format", "", "csv or jsonl (default: by file name and content)")
	fs.StringVar(&o.dateOrder, "date-format", "dmy", "how to read a date such as 03/05/2025: dmy (3 May) or mdy (5 March)")
}

func (o *logOptions) readOptions() features.ReadOptions {
	return features.ReadOptions{SkipBad: o.skipBad, PhaseOffset: o.phaseOffset, Format: o.format, DateOrder: o.dateOrder}
}

// readLog reads a whole log (a file name, or - for standard input) and
// reports what it skipped or ignored.
func (g *globalOptions) readLog(name string, opts features.ReadOptions) (*features.Log, error) {
	f, err := openLog(g, name)
	if err != nil {
		return nil, err
	}
	defer f.Close()
	in, bar := textui.ReadingBar(g.stderr, f, "reading "+name, g.isTerminal && !g.quiet)
	log, err := features.ReadLog(in, name, opts)
	bar.Done()
	if err != nil {
		return nil, err
	}
	g.reportLog(log)
	return log, nil
}

// reportLog says what reading a log skipped, ignored and noted.
func (g *globalOptions) reportLog(log *features.Log) {
	g.reportRead(log.Bad, log.Ignored, log.Notes)
	if log.BlankRows > 0 && g.verbose {
		g.note("skipped %d empty row(s)", log.BlankRows)
	}
	if log.Unlabelled > 0 {
		g.note("skipped %d unlabelled row(s)", log.Unlabelled)
	}
}

// reportRead says once which rows were skipped and which columns ignored,
// and the reader's notes.
func (g *globalOptions) reportRead(bad []*features.ParseError, ignored, notes []string) {
	for _, b := range bad {
		g.note("skipped: %v", b)
	}
	if len(bad) > 0 {
		g.note("skipped %d bad row(s)", len(bad))
	}
	if len(ignored) > 0 && g.verbose {
		g.note("columns kept out of the model: %s", strings.Join(ignored, ", "))
	}
	for _, n := range notes {
		g.note("note: %s", n)
	}
}

// labelledLogFlags are the flags of the commands that learn from a
// labelled log (train, evaluate, overlap): the log flags, --label and
// --skip-unlabelled.
type labelledLogFlags struct {
	log            logOptions
	label          labelFlag
	skipUnlabelled bool
	// displayIDOnly is set by the commands that can read a log of display
	// IDs only (evaluate, overlap); it is not a flag.
	displayIDOnly bool
}

func (o *labelledLogFlags) AddFlags(fs *pflag.FlagSet) {
	o.log.AddFlags(fs)
	o.label.AddFlags(fs)
	fs.BoolVar(&o.skipUnlabelled, "skip-unlabelled", false, "skip rows without the label asked for, counting them")
}

// read reads a log in which every kept dig has the label asked for.
func (o *labelledLogFlags) read(g *globalOptions, name string) (*features.Log, features.Label, error) {
	kind, err := o.label.label()
	if err != nil {
		return nil, "", err
	}
	ro := o.log.readOptions()
	ro.Require, ro.SkipUnlabelled, ro.DisplayIDOnly = kind, o.skipUnlabelled, o.displayIDOnly
	log, err := g.readLog(name, ro)
	return log, kind, err
}

// openLog opens a log by name; "-" is the command's standard input.
func openLog(g *globalOptions, name string) (io.ReadCloser, error) {
	if name == "-" {
		return io.NopCloser(g.stdin), nil
	}
	f, err := os.Open(name)
	if err != nil {
		return nil, fmt.Errorf("cannot read %s: %w", name, features.PathCause(err))
	}
	return f, nil
}
