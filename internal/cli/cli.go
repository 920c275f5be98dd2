// Package cli is spade's command-line plumbing that knows nothing of
// detecting: usage errors that say what a flag or a command wants, checks
// that an output never names an input, and one-line messages. The
// commands in cmd/spade wire flags to the library through it.
package cli

import (
	"context"
	"errors"
	"fmt"
	"maps"
	"math"
	"os"
	"path/filepath"
	"slices"
	"strconv"
	"strings"

	"github.com/spade-detect/spade/features"
	"github.com/spf13/cobra"
	"github.com/spf13/pflag"
)

// UsageError marks a mistake in the command line (exit code 2).
type UsageError struct{ Err error }

func (u UsageError) Error() string { return u.Err.Error() }
func (u UsageError) Unwrap() error { return u.Err }

// Usagef is a UsageError with a message.
func Usagef(format string, args ...any) error { return UsageError{fmt.Errorf(format, args...)} }

// FiniteFloatFlags refuses NaN and ±Inf in every float flag of every command
// at once: pflag parses "nan", and a NaN --phase-offset would turn every
// feature into NaN, a NaN threshold pass every comparison unnoticed.
func FiniteFloatFlags(cmd *cobra.Command) error {
	var bad error
	cmd.Flags().VisitAll(func(f *pflag.Flag) {
		if f.Value.Type() != "float64" || bad != nil {
			return
		}
		if v, err := strconv.ParseFloat(f.Value.String(), 64); err == nil && (math.IsNaN(v) || math.IsInf(v, 0)) {
			bad = Usagef("--%s must be a finite number, got %s", f.Name, f.Value.String())
		}
	})
	return bad
}

// ExplainArgs turns cobra's argument-count errors ("accepts 1 arg(s), received
// 0") into usage errors that say what the command takes and what it got.
func ExplainArgs(check cobra.PositionalArgs) cobra.PositionalArgs {
	if check == nil {
		return nil
	}
	return func(cmd *cobra.Command, args []string) error {
		if err := check(cmd, args); err != nil {
			got := "nothing"
			switch len(args) {
			case 0:
			case 1:
				got = fmt.Sprintf("%q", args[0])
			default:
				got = fmt.Sprintf("%d arguments (%s)", len(args), QuotedList(args))
			}
			_, takes, _ := strings.Cut(cmd.Use, " ")
			if takes == "" {
				return Usagef("%s takes no arguments; it was given %s", cmd.CommandPath(), got)
			}
			return Usagef("%s takes %s; it was given %s", cmd.CommandPath(), takes, got)
		}
		return nil
	}
}

// QuotedList writes strings as a person lists them: "a", "b" and "c".
func QuotedList(items []string) string {
	q := make([]string, len(items))
	for i, s := range items {
		q[i] = strconv.Quote(s)
	}
	return features.ListAnd(q)
}

// FlagError rewrites pflag's parse errors ("invalid argument "x" for
// "--trees" flag: strconv.ParseInt: parsing "x": invalid syntax") into what
// the flag wants, and suggests the nearest flag for an unknown one.
func FlagError(cmd *cobra.Command, err error) error { return UsageError{flagError(cmd, err)} }

func flagError(cmd *cobra.Command, err error) error {
	var invalid *pflag.InvalidValueError
	if errors.As(err, &invalid) {
		f := invalid.GetFlag()
		want := map[string]string{
			"int": "a whole number", "int64": "a whole number", "uint": "a whole number",
			"float64": "a number", "bool": "true or false", "duration": "a duration like 30s",
		}[f.Value.Type()]
		if want == "" {
			return err
		}
		return fmt.Errorf("--%s wants %s, got %q", f.Name, want, invalid.GetValue())
	}
	var missing *pflag.NotExistError
	if errors.As(err, &missing) {
		name := strings.TrimLeft(missing.GetSpecifiedName(), "-")
		best, bestD := "", 3
		cmd.Flags().VisitAll(func(f *pflag.Flag) {
			if d := features.EditDistance(name, f.Name); d < bestD && !f.Hidden {
				best, bestD = f.Name, d
			}
		})
		if best != "" && len(name) > 1 {
			return fmt.Errorf("%w (did you mean --%s?)", err, best)
		}
	}
	return err
}

// OneLine keeps an error message to its first line.
func OneLine(err error) string {
	s := err.Error()
	if i := strings.IndexByte(s, '\n'); i >= 0 {
		s = s[:i]
	}
	if errors.Is(err, context.Canceled) {
		return "interrupted; nothing was written"
	}
	return s
}

// CheckOutputs refuses, before any work, an output that names one of the
// inputs: the same file by device and inode when the output exists, or
// the same cleaned absolute path when it does not yet ("./digs.csv" and
// "dir/../digs.csv" are digs.csv). Nothing the user owns is overwritten.
// "-" and empty names are standard streams or unset, and never clash. Two
// outputs that name one file are refused too: one would overwrite the
// other.
func CheckOutputs(outputs map[string]string, inputs ...string) error {
	flags := slices.Sorted(maps.Keys(outputs))
	for i, a := range flags {
		for _, b := range flags[i+1:] {
			if sameFile(outputs[a], outputs[b]) {
				return Usagef("%s %s and %s %s name the same file: one would overwrite the other; choose another for one of them", a, outputs[a], b, outputs[b])
			}
		}
	}
	for flag, out := range outputs {
		if out == "" || out == "-" {
			continue
		}
		if err := writableFolder(flag, out); err != nil {
			return err
		}
		for _, in := range inputs {
			if sameFile(out, in) {
				return Usagef("%s %s names the input %s: it would be overwritten; choose another output file", flag, out, in)
			}
		}
	}
	return nil
}

// sameFile is whether a and b name one file: by device and inode when
// both exist, else by cleaned absolute path. "-" and "" name none.
func sameFile(a, b string) bool {
	if a == "" || a == "-" || b == "" || b == "-" {
		return false
	}
	ai, aerr := os.Stat(a)
	bi, berr := os.Stat(b)
	if aerr == nil && berr == nil {
		return os.SameFile(ai, bi)
	}
	aabs, err1 := filepath.Abs(a)
	babs, err2 := filepath.Abs(b)
	return err1 == nil && err2 == nil && aabs == babs
}

// writableFolder checks, before the work, that an output's folder exists
// and takes a new file: a read-only folder or a typo in the path is said at
// once, not after a whole training.
func writableFolder(flag, out string) error {
	dir := filepath.Dir(out)
	if fi, err := os.Stat(dir); err != nil || !fi.IsDir() {
		return Usagef("%s %s: the folder %s does not exist; create it or choose another path", flag, out, dir)
	}
	f, err := os.CreateTemp(dir, ".spade-check-*")
	if err != nil {
		return fmt.Errorf("%s %s: cannot write in the folder %s: %w", flag, out, dir, err)
	}
	name := f.Name()
	f.Close()
	os.Remove(name)
	return nil
}

// KeepOutput is an error after which the output written so far is kept.
type KeepOutput struct{ Err error }

func (k KeepOutput) Error() string { return k.Err.Error() }
func (k KeepOutput) Unwrap() error { return k.Err }
