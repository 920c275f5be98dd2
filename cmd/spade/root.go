package main

import (
	"context"
	"errors"
	"fmt"
	"io"
	"os"
	"strings"
	"syscall"

	"github.com/spade-detect/spade/classify"
	"github.com/spade-detect/spade/datasets"
	"github.com/spade-detect/spade/features"
	"github.com/spade-detect/spade/internal/cli"
	"github.com/spade-detect/spade/internal/textui"
	"github.com/spf13/cobra"
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

func versionString() string { return cli.Version(version, commit) }

// usageError marks a mistake in the command line.
type usageError = cli.UsageError

func usagef(format string, args ...any) error { return cli.Usagef(format, args...) }

var rootLong = `spade learns from your own dig history (every reading, with what actually came
out of the ground) and gives, for a new multi-frequency reading, a probability
per material and shape class instead of one number. It says whether a dig is
worth it by your own values, warns when a reading could be ordnance, and shows
which ID ranges are ambiguous on your ground with your machine.

` + textui.WrapHanging("", classify.Safety, 80, "") + `
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
	root.SetFlagErrorFunc(func(cmd *cobra.Command, err error) error { return cli.FlagError(cmd, err) })
	root.PersistentPreRunE = func(cmd *cobra.Command, _ []string) error {
		if f := cmd.Flags().Lookup("date-format"); f != nil && f.Value.String() != features.DayFirst && f.Value.String() != features.MonthFirst {
			return usagef("--date-format: want dmy or mdy, got %q", f.Value.String())
		}
		return cli.FiniteFloatFlags(cmd)
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
		c.Args = cli.ExplainArgs(c.Args)
		var scenarios []string
		for _, sc := range datasets.Scenarios {
			scenarios = append(scenarios, sc.Name)
		}
		cli.RegisterCompletions(c, scenarios)
	}
	return root
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
	fmt.Fprintln(stderr, "spade: "+cli.OneLine(err))
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
