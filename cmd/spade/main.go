// Command spade learns a detectorist's own dig history and gives, for a new
// multi-frequency reading, a probability per material and shape class.
package main

import (
	"context"
	"os"
	"os/signal"
	"syscall"
)

func main() {
	// A closed output pipe (spade demo | head) is a write error, not a
	// SIGPIPE that kills the process mid-way: the demo still finishes the
	// files it writes into its folder, and run ends other commands quietly.
	signal.Ignore(syscall.SIGPIPE)
	ctx, stop := signal.NotifyContext(context.Background(), os.Interrupt, syscall.SIGTERM)
	code := run(ctx, os.Args[1:], os.Stdin, os.Stdout, os.Stderr)
	stop()
	os.Exit(code)
}
