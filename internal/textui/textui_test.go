package textui

import (
	"bytes"
	"io"
	"os"
	"path/filepath"
	"strings"
	"testing"
)

func TestProbNeverSaysCertain(t *testing.T) {
	// spade's probabilities are never shown as 0% or 100% (issue 10): a
	// probability is never a guarantee.
	for _, c := range []struct {
		p    float64
		want string
	}{{0, "<1%"}, {0.0099, "<1%"}, {0.01, "1.0%"}, {0.5, "50.0%"}, {0.99, "99.0%"}, {0.995, ">99%"}, {1, ">99%"}} {
		if got := Prob(c.p, 1); got != c.want {
			t.Errorf("Prob(%g) = %q, want %q", c.p, got, c.want)
		}
	}
}

func TestOrdinal(t *testing.T) {
	// English ordinal suffixes (common practice, no source).
	for n, want := range map[int]string{1: "1st", 2: "2nd", 3: "3rd", 4: "4th", 11: "11th", 12: "12th", 13: "13th", 21: "21st", 99: "99th", 101: "101st", 111: "111th"} {
		if got := Ordinal(n); got != want {
			t.Errorf("Ordinal(%d) = %q, want %q", n, got, want)
		}
	}
}

func TestWrapKeepsWidth(t *testing.T) {
	text := strings.Repeat("ferrous conductive phase amplitude ", 12)
	for _, out := range []string{Wrap(text, 40, "  "), WrapHanging("A1  ", text, 40, "    ")} {
		lines := strings.Split(strings.TrimSuffix(out, "\n"), "\n")
		if len(lines) < 5 {
			t.Fatalf("%d lines, want the text broken into several:\n%s", len(lines), out)
		}
		for _, l := range lines {
			if n := len([]rune(l)); n > 40 {
				t.Errorf("line of %d columns > 40: %q", n, l)
			}
		}
		if got := strings.Join(strings.Fields(out), " "); got != strings.TrimSpace(text) && !strings.HasPrefix(got, "A1 ") {
			t.Errorf("words lost or reordered")
		}
	}
	if got := Wrap("", 40, "  "); got != "" {
		t.Errorf("Wrap of nothing = %q, want nothing", got)
	}
}

func TestBarAndTrunc(t *testing.T) {
	if got := Bar(0.5, 10); got != "█████·····" {
		t.Errorf("Bar(0.5, 10) = %q", got)
	}
	if got := Bar(1.7, 4); got != "████" {
		t.Errorf("Bar clamps above 1: %q", got)
	}
	if got := Trunc("aluminium/ring-pull", 8); got != "alumini…" || len([]rune(got)) != 8 {
		t.Errorf("Trunc = %q, want 8 runes ending in …", got)
	}
}

// TestReadingBarPassesBytesThrough: the reader behind the bar gives the
// very bytes of the file, and the bar is drawn only when asked, over the
// file's size.
func TestReadingBarPassesBytesThrough(t *testing.T) {
	path := filepath.Join(t.TempDir(), "log.csv")
	data := []byte(strings.Repeat("dig,material,shape\n", 5000))
	if err := os.WriteFile(path, data, 0o644); err != nil {
		t.Fatal(err)
	}
	for _, on := range []bool{false, true} {
		f, err := os.Open(path)
		if err != nil {
			t.Fatal(err)
		}
		var screen bytes.Buffer
		r, bar := ReadingBar(&screen, f, "reading log.csv", on)
		got, err := io.ReadAll(r)
		bar.Done()
		f.Close()
		if err != nil || !bytes.Equal(got, data) {
			t.Errorf("on=%v: read %d bytes (%v), want %d", on, len(got), err, len(data))
		}
		if drawn := screen.Len() > 0; drawn != on {
			t.Errorf("on=%v: bar drawn %v", on, drawn)
		}
		if !on && r != io.Reader(f) {
			t.Error("off, the file is not read directly")
		}
	}
}

// TestReadingBarSeeks: over a file, the reader behind the bar seeks, so
// that a two-pass reader (spade features) still streams; a seek back to
// the start after reading starts the bar again as the second pass (not
// the seek that asks where it is first), and the second pass gives the
// same bytes.
func TestReadingBarSeeks(t *testing.T) {
	path := filepath.Join(t.TempDir(), "log.csv")
	data := []byte(strings.Repeat("dig,material,shape\n", 5000))
	if err := os.WriteFile(path, data, 0o644); err != nil {
		t.Fatal(err)
	}
	f, err := os.Open(path)
	if err != nil {
		t.Fatal(err)
	}
	defer f.Close()
	var screen bytes.Buffer
	r, bar := ReadingBar(&screen, f, "reading log.csv", true)
	s, ok := r.(io.ReadSeeker)
	if !ok {
		t.Fatal("the reader behind the bar does not seek")
	}
	if at, err := s.Seek(0, io.SeekCurrent); err != nil || at != 0 {
		t.Fatalf("seek before reading: %d, %v", at, err)
	}
	first, _ := io.ReadAll(s)
	if st := bar.bar.State(); st.CurrentNum != int64(len(data)) || strings.Contains(st.Description, "pass 2") {
		t.Errorf("after the first pass: %+v", st)
	}
	if _, err := s.Seek(0, io.SeekStart); err != nil {
		t.Fatal(err)
	}
	if st := bar.bar.State(); st.CurrentNum != 0 || !strings.Contains(st.Description, "pass 2") {
		t.Errorf("back at the start: %+v", st)
	}
	second, _ := io.ReadAll(s)
	if st := bar.bar.State(); st.CurrentNum != int64(len(data)) {
		t.Errorf("after the second pass: %+v", st)
	}
	bar.Done()
	if !bytes.Equal(first, data) || !bytes.Equal(second, data) {
		t.Errorf("passes of %d and %d bytes, want %d", len(first), len(second), len(data))
	}
}
