package main

import (
	"context"
	"errors"
	"fmt"
	"io"
	"math"
	"os"
	"runtime/debug"
	"strconv"
	"strings"
	"syscall"

	"github.com/spade-detect/spade/datasets"
	"github.com/spade-detect/spade/features"
	"github.com/spade-detect/spade/internal/textui"
	"github.com/spf13/cobra"
	"github.com/spf13/pflag"
)

// version is the release; commit is set at build time with
// -ldflags "-X main.commit=$(git rev-parse --short HEAD)", and otherwise read
// from the build's VCS stamp when there is one.
var (
	version = "0.1.0"
	commit  = ""
)

// Exit codes, listed in the root help.
const (
	exitOK    = 0
	exitError = 1 // an error in the data or the run
	exitUsage = 2 // a usage error: unknown flag, wrong arguments
	// exitInterrupt is 128 + SIGINT, what a shell reports for a command
	// stopped by Ctrl-C, so scripts tell "stopped" from "failed".
	exitInterrupt = 130
)

// usageError marks a mistake in the command line.
type usageError struct{ err error }

func (u usageError) Error() string { return u.err.Error() }
func (u usageError) Unwrap() error { return u.err }

func usagef(format string, args ...any) error { return usageError{fmt.Errorf(format, args...)} }

// globalOptions are the flags every command shares.
type globalOptions struct {
	quiet   bool
	verbose bool
	stdin   io.Reader
	stdout  io.Writer
	stderr  io.Writer
	// isTerminal reports whether stderr is a terminal, for progress bars;
	// tests leave it false.
	isTerminal bool
	// ctx is the run's context (done on Ctrl-C), for the output writers.
	ctx context.Context
}

func versionString() string {
	c := commit
	if c == "" {
		c = "unknown"
		if info, ok := debug.ReadBuildInfo(); ok {
			for _, s := range info.Settings {
				if s.Key == "vcs.revision" && len(s.Value) >= 7 {
					c = s.Value[:12]
				}
			}
		}
	}
	return fmt.Sprintf("%s (commit %s)", version, c)
}

const rootLong = `spade learns from your own dig history (every reading, with what actually came
out of the ground) and gives, for a new multi-frequency reading, a probability
per material and shape class instead of one number. It says whether a dig is
worth it by your own values, warns when a reading could be ordnance, and shows
which ID ranges are ambiguous on your ground with your machine.

Safety: a possible-ordnance warning means do not dig: mark the spot and report
it to the authorities. Permission, local law and heritage-reporting rules come
first. A probability is never a guarantee.

Exit codes:
  0  success
  1  an error in the data or the run (the message names file, line and column)
  2  a usage error (unknown flag, missing argument)
  130  stopped by Ctrl-C (nothing half-written is left)`

func newRootCommand(g *globalOptions) *cobra.Command {
	root := &cobra.Command{
		Use:           "spade",
		Short:         "Learn your own dig history; classify new detector readings",
		Long:          rootLong,
		Version:       versionString(),
		SilenceUsage:  true,
		SilenceErrors: true,
		Example:       "  spade demo\n  spade train digs.csv -o my.spade\n  spade classify --model my.spade new.csv",
	}
	root.SetVersionTemplate("spade {{.Version}}\n")
	root.PersistentFlags().BoolVarP(&g.quiet, "quiet", "q", false, "no progress display and no notes on stderr")
	root.PersistentFlags().BoolVarP(&g.verbose, "verbose", "v", false, "more detail on stderr")
	root.SetFlagErrorFunc(func(cmd *cobra.Command, err error) error { return usageError{flagError(cmd, err)} })
	root.PersistentPreRunE = func(cmd *cobra.Command, _ []string) error {
		if f := cmd.Flags().Lookup("date-format"); f != nil && f.Value.String() != features.DayFirst && f.Value.String() != features.MonthFirst {
			return usagef("--date-format: want dmy or mdy, got %q", f.Value.String())
		}
		return finiteFloatFlags(cmd)
	}
	root.AddCommand(
		newDemoCommand(g),
		newFeaturesCommand(g),
		newSimulateCommand(g),
		newResponseCommand(g),
		newTrainCommand(g),
		newEvaluateCommand(g),
		newInspectCommand(g),
		newClassifyCommand(g),
		newOverlapCommand(g),
	)
	for _, c := range root.Commands() {
		c.Args = wrapArgs(c.Args)
		registerValueCompletions(c)
	}
	return root
}

// registerValueCompletions offers the values of the flags that take one of
// a few words: --format (the command's own list, from its help), --label,
// --scenario and --group.
func registerValueCompletions(c *cobra.Command) {
	words := map[string][]string{
		"label":       {"material", "shape", "both"},
		"group":       {"site", "date", "month"},
		"date-format": {"dmy", "mdy"},
	}
	for _, sc := range datasets.Scenarios {
		words["scenario"] = append(words["scenario"], sc.Name)
	}
	if f := c.Flags().Lookup("format"); f != nil {
		words["format"] = strings.Split(f.Usage, ", ")
	}
	// Flags that name files complete to files, of the kind they take.
	for name, exts := range map[string][]string{
		"model": {"spade"}, "values": {"toml"}, "plot": {"png", "svg"}, "output": nil,
	} {
		if c.Flags().Lookup(name) != nil {
			c.MarkFlagFilename(name, exts...)
		}
	}
	for name, values := range words {
		if c.Flags().Lookup(name) == nil {
			continue
		}
		c.RegisterFlagCompletionFunc(name, func(*cobra.Command, []string, string) ([]string, cobra.ShellCompDirective) {
			return values, cobra.ShellCompDirectiveNoFileComp
		})
	}
}

// finiteFloatFlags refuses NaN and ±Inf in every float flag of every command
// at once: pflag parses "nan", and a NaN --phase-offset would turn every
// feature into NaN, a NaN threshold pass every comparison unnoticed.
func finiteFloatFlags(cmd *cobra.Command) error {
	var bad error
	cmd.Flags().VisitAll(func(f *pflag.Flag) {
		if f.Value.Type() != "float64" || bad != nil {
			return
		}
		if v, err := strconv.ParseFloat(f.Value.String(), 64); err == nil && (math.IsNaN(v) || math.IsInf(v, 0)) {
			bad = usagef("--%s must be a finite number, got %s", f.Name, f.Value.String())
		}
	})
	return bad
}

// wrapArgs turns cobra's argument-count errors ("accepts 1 arg(s), received
// 0") into usage errors that say what the command takes and what it got.
func wrapArgs(check cobra.PositionalArgs) cobra.PositionalArgs {
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
				got = fmt.Sprintf("%d arguments (%s)", len(args), quotedList(args))
			}
			_, takes, _ := strings.Cut(cmd.Use, " ")
			if takes == "" {
				return usagef("%s takes no arguments; it was given %s", cmd.CommandPath(), got)
			}
			return usagef("%s takes %s; it was given %s", cmd.CommandPath(), takes, got)
		}
		return nil
	}
}

// quotedList writes strings as a person lists them: "a", "b" and "c".
func quotedList(items []string) string {
	q := make([]string, len(items))
	for i, s := range items {
		q[i] = strconv.Quote(s)
	}
	return features.ListAnd(q)
}

// flagError rewrites pflag's parse errors ("invalid argument "x" for
// "--trees" flag: strconv.ParseInt: parsing "x": invalid syntax") into what
// the flag wants, and suggests the nearest flag for an unknown one.
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
			return fmt.Errorf("%v (did you mean --%s?)", err, best)
		}
	}
	return err
}

// run executes one command line and returns the exit code; main and the
// tests both call it.
func run(ctx context.Context, args []string, stdin io.Reader, stdout, stderr io.Writer) (code int) {
	// A bug must still end in one short message, not a stack trace; set
	// SPADE_DEBUG=1 to see the trace.
	defer func() {
		if r := recover(); r != nil {
			if os.Getenv("SPADE_DEBUG") != "" {
				panic(r)
			}
			fmt.Fprintf(stderr, "spade: internal error: %v (please report it, with the command; SPADE_DEBUG=1 shows where)\n", r)
			code = exitError
		}
	}()
	g := &globalOptions{stdin: stdin, stdout: stdout, stderr: stderr, isTerminal: textui.IsTerminal(stderr), ctx: ctx}
	root := newRootCommand(g)
	root.SetArgs(args)
	root.SetIn(stdin)
	root.SetOut(stdout)
	root.SetErr(stderr)
	cmd, err := root.ExecuteContextC(ctx)
	if err == nil {
		return exitOK
	}
	if errors.Is(err, syscall.EPIPE) {
		// Whoever read the output stopped reading (| head): nothing to say.
		return exitOK
	}
	fmt.Fprintln(stderr, "spade: "+oneLine(err))
	var ue usageError
	switch {
	case errors.As(err, &ue) || strings.HasPrefix(err.Error(), "unknown command"):
		// The help of the command that was run, not the root's.
		path := "spade"
		if cmd != nil {
			path = cmd.CommandPath()
		}
		fmt.Fprintf(stderr, "Run '%s --help' for usage.\n", path)
		return exitUsage
	case errors.Is(err, context.Canceled):
		return exitInterrupt
	default:
		return exitError
	}
}

// oneLine keeps an error message to its first line.
func oneLine(err error) string {
	s := err.Error()
	if i := strings.IndexByte(s, '\n'); i >= 0 {
		s = s[:i]
	}
	if errors.Is(err, context.Canceled) {
		return "interrupted; nothing was written"
	}
	return s
}
