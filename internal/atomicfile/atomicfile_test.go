package atomicfile

import (
	"context"
	"errors"
	"io"
	"os"
	"path/filepath"
	"slices"
	"syscall"
	"testing"
	"time"
)

func TestAtomicWriteModes(t *testing.T) {
	// Issue 14: a new file gets 0666 less the umask, as the shell's own
	// files do; a replaced file keeps its mode.
	dir := t.TempDir()
	old := syscall.Umask(0o027)
	defer syscall.Umask(old)
	fresh := filepath.Join(dir, "new.csv")
	if err := Write(fresh, func(w io.Writer) error { _, err := io.WriteString(w, "a\n"); return err }); err != nil {
		t.Fatal(err)
	}
	if fi, _ := os.Stat(fresh); fi.Mode().Perm() != 0o640 {
		t.Errorf("new file mode %v, want 0640 under umask 027", fi.Mode().Perm())
	}
	kept := filepath.Join(dir, "kept.csv")
	os.WriteFile(kept, []byte("old\n"), 0o600)
	os.Chmod(kept, 0o604)
	if err := Write(kept, func(w io.Writer) error { _, err := io.WriteString(w, "new\n"); return err }); err != nil {
		t.Fatal(err)
	}
	if fi, _ := os.Stat(kept); fi.Mode().Perm() != 0o604 {
		t.Errorf("replaced file mode %v, want its own 0604", fi.Mode().Perm())
	}
}

func TestAtomicWriteStaleTempsAndInterrupt(t *testing.T) {
	dir := t.TempDir()
	path := filepath.Join(dir, "m.spade")
	os.WriteFile(path, []byte("the old model"), 0o644)
	// A temporary file of spade's from a run killed two days ago, and one
	// of another output in the same folder; one of a writer running now;
	// and an old file of another program's that looks a little alike.
	stale := filepath.Join(dir, ".m.spade.spade-tmp-killed")
	staleOther := filepath.Join(dir, ".out.csv.spade-tmp-killed")
	live := filepath.Join(dir, ".m.spade.spade-tmp-running")
	other := filepath.Join(dir, ".other.spade.tmp-killed")
	for _, f := range []string{stale, staleOther, live, other} {
		os.WriteFile(f, []byte("x"), 0o600)
	}
	long := time.Now().Add(-2 * StaleTemp)
	os.Chtimes(stale, long, long)
	os.Chtimes(staleOther, long, long)
	os.Chtimes(other, long, long)
	// Ctrl-C during the write: it stops at the next write, the old file
	// stays, and its temporary file goes.
	ctx, cancel := context.WithCancel(context.Background())
	err := WriteContext(ctx, path, func(w io.Writer) error {
		if _, err := io.WriteString(w, "half a "); err != nil {
			return err
		}
		cancel()
		_, err := io.WriteString(w, "model")
		return err
	})
	if !errors.Is(err, context.Canceled) {
		t.Errorf("interrupted write: %v", err)
	}
	if b, _ := os.ReadFile(path); string(b) != "the old model" {
		t.Errorf("old file now %q", b)
	}
	left, _ := filepath.Glob(filepath.Join(dir, ".*"))
	want := []string{live, other}
	slices.Sort(left)
	slices.Sort(want)
	if !slices.Equal(left, want) {
		t.Errorf("left %v, want %v (spade's stale ones removed, the live one and the other program's kept)", left, want)
	}
}

func TestAtomicWriteToDevicesAndLinks(t *testing.T) {
	// -o /dev/null once renamed a regular file over the device (as root).
	// A device is written in place; a symbolic link keeps pointing at the
	// file, which is replaced; a folder is refused.
	if err := Write(os.DevNull, func(w io.Writer) error { _, err := io.WriteString(w, "gone\n"); return err }); err != nil {
		t.Fatal(err)
	}
	if fi, err := os.Stat(os.DevNull); err != nil || fi.Mode()&os.ModeDevice == 0 {
		t.Fatalf("%s is no longer a device: %v %v", os.DevNull, fi.Mode(), err)
	}
	dir := t.TempDir()
	target := filepath.Join(dir, "real.csv")
	link := filepath.Join(dir, "link.csv")
	os.WriteFile(target, []byte("old\n"), 0o644)
	if err := os.Symlink(target, link); err != nil {
		t.Skip("no symbolic links here")
	}
	if err := Write(link, func(w io.Writer) error { _, err := io.WriteString(w, "new\n"); return err }); err != nil {
		t.Fatal(err)
	}
	if fi, _ := os.Lstat(link); fi.Mode()&os.ModeSymlink == 0 {
		t.Error("the link was replaced by a file")
	}
	if b, _ := os.ReadFile(target); string(b) != "new\n" {
		t.Errorf("the link's file holds %q", b)
	}
	if err := Write(dir, func(io.Writer) error { return nil }); err == nil {
		t.Error("a folder as output was accepted")
	}
}
