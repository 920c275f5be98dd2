// Package atomicfile writes files so that a reader, or an interrupted run,
// sees the old file or the new one and never half of one: spade's models,
// reports and plots go through it, so that nothing the user owns is lost.
package atomicfile

import (
	"context"
	"errors"
	"fmt"
	"io"
	"io/fs"
	"math/rand/v2"
	"os"
	"path/filepath"
	"strconv"
	"time"
)

// StaleTemp is how old a temporary file of Write's must be before
// a later write into the same folder removes it: such a file is left only
// by a run killed outright (kill -9, a power cut), and a day is far longer
// than any write takes, so a concurrent writer's file is never touched.
const StaleTemp = 24 * time.Hour

// tempMarker names spade's temporary files (".m.spade.spade-tmp-1x2y3z"),
// so that the clean-up removes its own and nothing of anyone else's.
const tempMarker = ".spade-tmp-"

// Write writes a file through a temporary file in the same folder,
// synced and then renamed over path, so that a reader (or an interrupted
// run) sees the old file or the new one and never half of one. write gets the
// temporary file; when it fails, the old file is left as it was.
func Write(path string, write func(io.Writer) error) error {
	return WriteContext(context.Background(), path, write)
}

// WriteContext is Write that stops when ctx is done
// (Ctrl-C): the write fails with ctx's error at its next write call, the
// temporary file is removed and the old file stays as it was.
//
// The new file takes the mode of the file it replaces; a new path gets
// 0666 less the umask, as any file the user's shell creates. Temporary
// files of spade's in the folder older than StaleTemp are removed first.
func WriteContext(ctx context.Context, path string, write func(io.Writer) error) (err error) {
	var mode fs.FileMode
	keepMode := false
	if fi, err := os.Stat(path); err == nil {
		switch {
		case fi.IsDir():
			return fmt.Errorf("cannot write %s: it is a folder", path)
		case !fi.Mode().IsRegular():
			// A device or a pipe (/dev/null, /dev/stdout, a FIFO): written
			// in place, as renaming over it would replace the device.
			return writeInPlace(ctx, path, write)
		}
		mode, keepMode = fi.Mode().Perm(), true
		// Through a symbolic link, the file it points to is replaced and
		// the link kept.
		if real, err := filepath.EvalSymlinks(path); err == nil {
			path = real
		}
	}
	dir, base := filepath.Split(path)
	if dir == "" {
		dir = "."
	}
	prefix := "." + base + tempMarker
	removeStale(dir)
	// OpenFile with 0666 lets the kernel apply the umask.
	var tmp *os.File
	for range 100 {
		name := filepath.Join(dir, prefix+strconv.FormatUint(rand.Uint64(), 36))
		tmp, err = os.OpenFile(name, os.O_RDWR|os.O_CREATE|os.O_EXCL, 0o666)
		if !errors.Is(err, fs.ErrExist) {
			break
		}
	}
	if err != nil {
		return fmt.Errorf("cannot write %s: %w", path, pathCause(err))
	}
	defer func() {
		if err != nil {
			tmp.Close()
			os.Remove(tmp.Name())
		}
	}()
	if err = write(ctxWriter{ctx, tmp}); err != nil {
		return err
	}
	if err = ctx.Err(); err != nil {
		return err
	}
	if err = tmp.Sync(); err != nil {
		return fmt.Errorf("cannot write %s: %w", path, pathCause(err))
	}
	if err = tmp.Close(); err != nil {
		return fmt.Errorf("cannot write %s: %w", path, pathCause(err))
	}
	if keepMode {
		if err = os.Chmod(tmp.Name(), mode); err != nil {
			return fmt.Errorf("cannot write %s: %w", path, pathCause(err))
		}
	}
	if err = os.Rename(tmp.Name(), path); err != nil {
		return fmt.Errorf("cannot write %s: %w", path, pathCause(err))
	}
	return nil
}

// writeInPlace writes to a device or a pipe that exists, without a
// temporary file.
func writeInPlace(ctx context.Context, path string, write func(io.Writer) error) error {
	f, err := os.OpenFile(path, os.O_WRONLY, 0)
	if err != nil {
		return fmt.Errorf("cannot write %s: %w", path, pathCause(err))
	}
	if err := write(ctxWriter{ctx, f}); err != nil {
		f.Close()
		return err
	}
	if err := f.Close(); err != nil {
		return fmt.Errorf("cannot write %s: %w", path, pathCause(err))
	}
	return nil
}

// ctxWriter fails every write once ctx is done.
type ctxWriter struct {
	ctx context.Context
	w   io.Writer
}

func (c ctxWriter) Write(p []byte) (int, error) {
	if err := c.ctx.Err(); err != nil {
		return 0, err
	}
	return c.w.Write(p)
}

// removeStale removes spade's temporary files in dir left by a killed run.
func removeStale(dir string) {
	matches, _ := filepath.Glob(filepath.Join(globEscape(dir), ".*"+tempMarker+"*"))
	for _, m := range matches {
		if fi, err := os.Lstat(m); err == nil && fi.Mode().IsRegular() && time.Since(fi.ModTime()) > StaleTemp {
			os.Remove(m)
		}
	}
}

// globEscape quotes the pattern characters of a file name.
func globEscape(s string) string {
	out := make([]byte, 0, len(s))
	for i := 0; i < len(s); i++ {
		switch s[i] {
		case '*', '?', '[', '\\':
			out = append(out, '\\')
		}
		out = append(out, s[i])
	}
	return string(out)
}

// pathCause drops the operation and path an *fs.PathError repeats, so that
// a message names its file once, and never the temporary file's name.
func pathCause(err error) error {
	var pe *fs.PathError
	if errors.As(err, &pe) {
		return pe.Err
	}
	return err
}
