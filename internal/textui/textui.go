// Package textui holds the small pieces of spade's terminal views: text
// wrapped to a width, share bars, percentages that never say 0% or 100%,
// and a progress bar that stays off when nobody is watching.
package textui

import (
	"fmt"
	"io"
	"math"
	"os"
	"strconv"
	"strings"

	"github.com/schollz/progressbar/v3"
	"golang.org/x/term"
)

// Wrap breaks text into lines of at most width columns, each indented;
// a line that goes on is indented two more.
func Wrap(text string, width int, indent string) string {
	return wrapWith(indent, text, width, indent+"  ")
}

// WrapHanging is Wrap with a hanging indent: the first line starts with
// lead, the others at indent.
func WrapHanging(lead, text string, width int, indent string) string {
	return wrapWith(lead, text, width, indent)
}

func wrapWith(first, text string, width int, rest string) string {
	var b strings.Builder
	line := first
	for _, word := range strings.Fields(text) {
		if len([]rune(line))+len([]rune(word))+1 > width && strings.TrimSpace(line) != "" {
			b.WriteString(strings.TrimRight(line, " ") + "\n")
			line = rest
		}
		line += word + " "
	}
	if strings.TrimSpace(line) != "" {
		b.WriteString(strings.TrimRight(line, " ") + "\n")
	}
	return b.String()
}

// Bar draws a share in [0, 1] as a bar of width cells.
func Bar(v float64, width int) string {
	n := int(math.Round(v * float64(width)))
	n = min(max(n, 0), width)
	return strings.Repeat("█", n) + strings.Repeat("·", width-n)
}

// Trunc shortens s to n runes, ending in an ellipsis when cut.
func Trunc(s string, n int) string {
	r := []rune(s)
	if len(r) <= n {
		return s
	}
	return string(r[:n-1]) + "…"
}

// Pct writes a share as a whole percentage, three wide.
func Pct(v float64) string { return fmt.Sprintf("%3.0f%%", 100*v) }

// Prob writes a probability as a percentage with the given decimals, but
// never as 0% or 100%: spade's probabilities are never exactly 0 or 1, and
// a probability is never a guarantee. Below 1% it says "<1%", above 99%
// ">99%".
func Prob(p float64, decimals int) string {
	switch {
	case p < 0.01:
		return "<1%"
	case p > 0.99:
		return ">99%"
	}
	return strconv.FormatFloat(100*p, 'f', decimals, 64) + "%"
}

// Ordinal writes 1st, 2nd, 3rd, 4th, 11th, 21st...
func Ordinal(n int) string {
	suffix := "th"
	switch {
	case n%100 >= 11 && n%100 <= 13:
	case n%10 == 1:
		suffix = "st"
	case n%10 == 2:
		suffix = "nd"
	case n%10 == 3:
		suffix = "rd"
	}
	return fmt.Sprintf("%d%s", n, suffix)
}

// IsTerminal reports whether w is a terminal.
func IsTerminal(w io.Writer) bool {
	f, ok := w.(*os.File)
	return ok && term.IsTerminal(int(f.Fd()))
}

// Progress is a bar on a terminal while long work runs, or nothing.
type Progress struct {
	bar *progressbar.ProgressBar
}

// NewProgress draws a bar of total steps into w when on is true, and is a
// no-op otherwise (stderr not a terminal, --quiet, machine output asked
// for). A total of -1 counts without an end (streams of unknown length).
func NewProgress(w io.Writer, total int, what string, on bool) *Progress {
	if !on || total == 0 {
		return &Progress{}
	}
	return &Progress{bar: progressbar.NewOptions(total,
		progressbar.OptionSetWriter(w),
		progressbar.OptionSetDescription(what),
		progressbar.OptionSetWidth(30),
		progressbar.OptionShowCount(),
		progressbar.OptionClearOnFinish(),
		progressbar.OptionThrottle(100_000_000),
	)}
}

// ReadingBar shows the bytes read from r on a bar over its size, when r
// is a file that knows it (else a count), and returns the reader to read
// through. Done clears it. When r can seek, so can the reader returned, and
// a seek back to the start (a second pass) starts the bar again, as pass 2.
func ReadingBar(w io.Writer, r io.Reader, what string, on bool) (io.Reader, *Progress) {
	total := int64(-1)
	if f, ok := r.(interface{ Stat() (os.FileInfo, error) }); ok {
		if fi, err := f.Stat(); err == nil && fi.Mode().IsRegular() {
			total = fi.Size()
		}
	}
	if !on || total == 0 {
		return r, &Progress{}
	}
	p := &Progress{bar: progressbar.NewOptions64(total,
		progressbar.OptionSetWriter(w),
		progressbar.OptionSetDescription(what),
		progressbar.OptionSetWidth(30),
		progressbar.OptionShowBytes(true),
		progressbar.OptionClearOnFinish(),
		progressbar.OptionThrottle(100_000_000),
	)}
	if s, ok := r.(io.Seeker); ok {
		return &countingSeeker{countingReader: countingReader{r: r, p: p}, s: s, what: what}, p
	}
	return &countingReader{r: r, p: p}, p
}

// countingSeeker is a countingReader that seeks; back at the start, the
// bar starts again.
type countingSeeker struct {
	countingReader
	s    io.Seeker
	what string
	read bool // anything read yet
}

func (c *countingSeeker) Read(b []byte) (int, error) {
	n, err := c.countingReader.Read(b)
	c.read = c.read || n > 0
	return n, err
}

func (c *countingSeeker) Seek(offset int64, whence int) (int64, error) {
	at, err := c.s.Seek(offset, whence)
	if err == nil && at == 0 && c.read && c.p.bar != nil {
		c.p.bar.Reset()
		c.p.bar.Describe(c.what + ", pass 2")
		c.read = false
	}
	return at, err
}

// countingReader steps a bar by the bytes read through it.
type countingReader struct {
	r io.Reader
	p *Progress
}

func (c *countingReader) Read(b []byte) (int, error) {
	n, err := c.r.Read(b)
	c.p.Step(n)
	return n, err
}

// Step advances the bar by n; safe to call from several goroutines.
func (p *Progress) Step(n int) {
	if p.bar != nil {
		p.bar.Add(n)
	}
}

// Done clears the bar.
func (p *Progress) Done() {
	if p.bar != nil {
		p.bar.Finish()
	}
}
