package main

import (
	"bufio"
	"context"
	"errors"
	"fmt"
	"io"
	"os"
	"path/filepath"

	"github.com/spade-detect/spade/internal/atomicfile"
)

// writeOutput sends output to standard output for "-" and otherwise to a
// file written atomically, so that an interrupted run leaves no half file.
//
// write may return keepOutput: what it wrote is kept (flushed, or the file
// committed) and the error it wraps is still the run's.
func (g *globalOptions) writeOutput(name string, write func(io.Writer) error) error {
	var kept error
	buffered := func(w io.Writer) error {
		bw := bufio.NewWriter(w)
		if err := write(bw); err != nil {
			var k keepOutput
			if !errors.As(err, &k) {
				return err
			}
			kept = k.err
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

// keepOutput is an error after which the output written so far is kept.
type keepOutput struct{ err error }

func (k keepOutput) Error() string { return k.err.Error() }
func (k keepOutput) Unwrap() error { return k.err }

// checkOutputs refuses, before any work, an output that names one of the
// inputs: the same file by device and inode when the output exists, or
// the same cleaned absolute path when it does not yet ("./digs.csv" and
// "dir/../digs.csv" are digs.csv). Nothing the user owns is overwritten.
// "-" and empty names are standard streams or unset, and never clash.
func checkOutputs(outputs map[string]string, inputs ...string) error {
	for flag, out := range outputs {
		if out == "" || out == "-" {
			continue
		}
		if err := writableFolder(flag, out); err != nil {
			return err
		}
		oi, oerr := os.Stat(out)
		oabs, _ := filepath.Abs(out)
		for _, in := range inputs {
			if in == "" || in == "-" {
				continue
			}
			same := false
			if ii, err := os.Stat(in); err == nil && oerr == nil {
				same = os.SameFile(oi, ii)
			} else if iabs, err := filepath.Abs(in); err == nil {
				same = iabs == oabs
			}
			if same {
				return usagef("%s %s names the input %s: it would be overwritten; choose another output file", flag, out, in)
			}
		}
	}
	return nil
}

// writableFolder checks, before the work, that an output's folder exists
// and takes a new file: a read-only folder or a typo in the path is said at
// once, not after a whole training.
func writableFolder(flag, out string) error {
	dir := filepath.Dir(out)
	if fi, err := os.Stat(dir); err != nil || !fi.IsDir() {
		return usagef("%s %s: the folder %s does not exist; create it or choose another path", flag, out, dir)
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
