package main

import (
	"encoding/json"
	"io"
	"strings"

	"github.com/spade-detect/spade/classify"
	"github.com/spade-detect/spade/features"
	"github.com/spade-detect/spade/internal/cli"
	"github.com/spade-detect/spade/train"
	"github.com/spf13/cobra"
	"github.com/spf13/pflag"
)

// withFlags adds a command's options' flags to it: every command is made
// of a cobra.Command and an options struct with AddFlags.
func withFlags(cmd *cobra.Command, opts interface{ AddFlags(*pflag.FlagSet) }) *cobra.Command {
	opts.AddFlags(cmd.Flags())
	return cmd
}

// labelFlag is --label, shared by train and evaluate.
type labelFlag struct{ value string }

func (l *labelFlag) AddFlags(fs *pflag.FlagSet) {
	fs.StringVar(&l.value, "label", "both", "what to tell apart: material, shape, or both (the joint class material/shape)")
}

func (l *labelFlag) label() (features.Label, error) {
	k, ok := features.ParseLabel(l.value)
	if !ok {
		return "", usagef("--label: want material, shape or both, got %q", l.value)
	}
	return k, nil
}

// formatFlag is --format.
type formatFlag struct {
	value   string
	allowed []string
}

func (f *formatFlag) AddFlags(fs *pflag.FlagSet, allowed ...string) {
	f.allowed = allowed
	fs.StringVar(&f.value, "format", allowed[0], strings.Join(allowed, ", "))
}

func (f *formatFlag) check() error {
	for _, a := range f.allowed {
		if f.value == a {
			return nil
		}
	}
	return usagef("--format: want %s, got %q", strings.Join(f.allowed, " or "), f.value)
}

func (f *formatFlag) json() bool { return f.value == "json" }

// valuesFlags are --values FILE and --keep LIST.
type valuesFlags struct {
	file string
	keep string
}

func (v *valuesFlags) AddFlags(fs *pflag.FlagSet) {
	fs.StringVar(&v.file, "values", "", "your values file (TOML): worth per class, cost per dig, hazards")
	fs.StringVar(&v.keep, "keep", "", "keeper classes, materials or shapes, comma separated (instead of or added to --values)")
}

// load gives the values, or nil when neither flag is set.
func (v *valuesFlags) load() (*classify.Values, error) {
	var vals *classify.Values
	if v.file != "" {
		var err error
		if vals, err = classify.LoadValues(v.file); err != nil {
			return nil, err
		}
	}
	return classify.AddKeepers(vals, v.keep), nil
}

// check refuses values names that name nothing the model or log knows.
func (v *valuesFlags) check(vals *classify.Values, classes []string, label features.Label) error {
	if vals == nil {
		return nil
	}
	source := v.file
	if source == "" {
		source = "--keep"
	}
	return vals.CheckNames(source, classes, label)
}

// history is what the reporting commands (evaluate, overlap) read first:
// the labelled log, its table, and the user's values, checked against it.
type history struct {
	log  *features.Log
	kind features.Label
	spec *features.FeatureSpec // nil for a log of display IDs only
	ds   *train.Dataset
	vals *classify.Values // nil when neither --values nor --keep is given
}

// readHistory is the shared preamble of the reporting commands: the
// outputs against the inputs, the format, the command's own flag checks
// (flags, when not nil), the values file, and a log of readings or of
// display IDs only, with what its spec leaves out noted.
func (g *globalOptions) readHistory(in *labelledLogFlags, values *valuesFlags, format *formatFlag, flags func() error, outputs map[string]string, name string, inputs ...string) (*history, error) {
	if err := cli.CheckOutputs(outputs, append([]string{name, values.file}, inputs...)...); err != nil {
		return nil, err
	}
	if err := format.check(); err != nil {
		return nil, err
	}
	if flags != nil {
		if err := flags(); err != nil {
			return nil, err
		}
	}
	h := &history{}
	var err error
	if h.vals, err = values.load(); err != nil {
		return nil, err
	}
	in.displayIDOnly = true
	if h.log, h.kind, err = in.read(g, name); err != nil {
		return nil, err
	}
	if h.spec, h.ds, err = train.TableOf(h.log, h.kind); err != nil {
		return nil, err
	}
	if h.spec != nil {
		g.specNotes(h.spec)
	}
	return h, values.check(h.vals, h.ds.Classes, h.kind)
}

// specNotes says once what the log's feature spec leaves out.
func (g *globalOptions) specNotes(spec *features.FeatureSpec) {
	for _, n := range spec.Notes() {
		g.note("note: %s", n)
	}
}

// writeJSON writes v as indented JSON, the form of every --format json.
func writeJSON(w io.Writer, v any) error {
	enc := json.NewEncoder(w)
	enc.SetIndent("", "  ")
	return enc.Encode(v)
}
