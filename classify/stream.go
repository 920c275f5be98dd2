package classify

import (
	"context"
	"errors"
	"fmt"
	"io"
	"runtime"
	"runtime/debug"
	"sync"

	"github.com/spade-detect/spade/features"
	"github.com/spade-detect/spade/train"
)

// StreamBatch is how many readings are read before they are classified
// in parallel: enough to keep every core busy, few enough that memory stays
// constant whatever the file's size.
const StreamBatch = 512

// Stream classifies readings in batches on every core and hands the
// results to emit in input order. next gives the readings, io.EOF after the
// last; name is the source's name for errors. A reading that cannot be
// classified stops the stream with a *features.ParseError at its line, and
// a reading that next refuses stops it after every reading before it has
// been emitted. A panic in a worker becomes that reading's error.
func Stream(ctx context.Context, c *Classifier, next func() (features.Dig, error), name string, emit func(*Result) error) error {
	workers := runtime.GOMAXPROCS(0)
	clones := []*Classifier{c}
	for len(clones) < workers {
		clones = append(clones, c.Clone())
	}
	batch := make([]features.Dig, 0, StreamBatch)
	results := make([]*Result, StreamBatch)
	errs := make([]error, StreamBatch)
	for done := false; !done; {
		if err := ctx.Err(); err != nil {
			return err
		}
		batch = batch[:0]
		var readErr error
		for len(batch) < StreamBatch {
			d, err := next()
			if errors.Is(err, io.EOF) {
				done = true
				break
			}
			if err != nil {
				// The readings before a bad row are classified and handed
				// on first; then the row's error.
				readErr, done = err, true
				break
			}
			batch = append(batch, d)
		}
		var wg sync.WaitGroup
		for wi, cl := range clones {
			wg.Add(1)
			go func() {
				defer wg.Done()
				i := wi
				// A fault reading a mapped model (a file cut short under
				// it) is a panic here rather than the end of the process.
				defer debug.SetPanicOnFault(debug.SetPanicOnFault(true))
				// A panic in a worker is turned into this reading's error,
				// reported with its line like any other: never a stack trace.
				defer func() {
					if r := recover(); r != nil && i < len(batch) {
						errs[i] = panicError(r)
					}
				}()
				for ; i < len(batch); i += len(clones) {
					results[i], errs[i] = cl.Classify(&batch[i])
				}
			}()
		}
		wg.Wait()
		// A model mapped where it lies and written to meanwhile: these
		// results may be of bytes no load checked.
		if c.bundle.Changed() {
			return ErrModelChanged
		}
		for i := range batch {
			if errs[i] != nil {
				var pe *features.ParseError
				if errors.As(errs[i], &pe) {
					return errs[i]
				}
				return features.DigError(name, &batch[i], errs[i])
			}
			if err := emit(results[i]); err != nil {
				return err
			}
		}
		if readErr != nil {
			return readErr
		}
	}
	return nil
}

// ErrModelChanged is a model read where it lies (train.LoadOptions.Mapped)
// whose file was cut short or written to during the run: a fault reading
// it, or train.Bundle.Changed after a batch.
var ErrModelChanged = errors.New("the model file was changed or cut short while classify read it; run again, and replace a model by writing the new one beside it and renaming it over the old (as spade train -o does), never by copying into it")

// panicError is a worker's panic as this reading's error.
func panicError(r any) error {
	if e, ok := r.(interface{ Addr() uintptr }); ok && train.InMappedModel(e.Addr()) {
		return ErrModelChanged
	}
	return fmt.Errorf("internal error classifying this reading: %v (please report it)", r)
}

// StreamTo classifies readings as Stream does into out, and finishes it;
// each, when not nil, is called after every result written. It returns
// how many results were written. After a bad row (a *features.ParseError)
// that follows good readings, out says where it stopped (Stop) and is
// closed, so that every result before the row is kept, and the row's
// error is returned with n > 0. Any other error, or a bad first row,
// leaves out unfinished, for the caller to discard.
func StreamTo(ctx context.Context, c *Classifier, next func() (features.Dig, error), name string, out ResultWriter, each func()) (n int, err error) {
	err = Stream(ctx, c, next, name, func(r *Result) error {
		if err := out.Write(r); err != nil {
			return err
		}
		n++
		if each != nil {
			each()
		}
		return nil
	})
	var pe *features.ParseError
	if err != nil && (n == 0 || !errors.As(err, &pe)) {
		return n, err
	}
	if err != nil {
		out.Stop(err)
	}
	if cerr := out.Close(); cerr != nil {
		return n, cerr
	}
	return n, err
}
