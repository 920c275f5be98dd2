package features

import (
	"bufio"
	"bytes"
	"errors"
	"fmt"
	"hash/fnv"
	"io"
	"math"
	"strings"

	"golang.org/x/text/encoding/unicode"
	"golang.org/x/text/transform"
)

// ReadOptions says how strict a reader is and what it needs.
type ReadOptions struct {
	// SkipBad lists every bad row in Reader.Bad and goes on with the rest;
	// otherwise the first bad row is returned as the error.
	SkipBad bool
	// PhaseOffset is the phase, in degrees, that the user's instrument
	// reports for a purely magnetic target; it is subtracted from every
	// reading so that the log follows spade's convention.
	PhaseOffset float64
	// Require is the label every row must carry ("" requires none).
	Require Label
	// SkipUnlabelled skips rows without the required label, counting them
	// in Reader.Unlabelled, instead of failing.
	SkipUnlabelled bool
	// Format is "csv", "jsonl", or "" to decide by file name and content.
	Format string
	// DateOrder is DayFirst (the default) or MonthFirst, for numeric dates
	// whose day and month could be either way round.
	DateOrder string
	// DisplayIDOnly accepts a log with a display_id column and no reading
	// columns, what most instruments' logs hold: its digs have no
	// readings (Log.DisplayIDOnly), and every row needs a display ID. Only
	// what needs no phase reads such a log: the ambiguous ranges, and the
	// single-number baseline.
	DisplayIDOnly bool
	// AllowDuplicateIDs lets a dig id come twice, and keeps no set of ids:
	// for readings to classify, which are matched to nothing, so that
	// reading them takes constant memory.
	AllowDuplicateIDs bool
}

// rowSource is one file format's row parser.
type rowSource interface {
	// next returns the next row, io.EOF at the end. A *ParseError with
	// fatal false is a bad row the reader may skip.
	next() (Dig, error, bool)
}

// Reader streams digs from a dig log, one row at a time, in constant memory
// apart from a hash of each dig id (8 bytes a row) for the duplicate check.
type Reader struct {
	name string
	opts ReadOptions
	src  rowSource

	freqs       []int
	displayCol  bool
	ignored     []string
	seen        map[uint64]int
	rows        int
	kept        int
	displayGaps int

	// Bad lists the rows skipped under SkipBad.
	Bad []*ParseError
	// Unlabelled counts the rows skipped under SkipUnlabelled.
	Unlabelled int
	// BlankRows counts the empty rows skipped (",,,," at a sheet's end).
	BlankRows int
	// Notes are remarks for the user: unreadable dates (the digs are kept
	// without them), how ambiguous dates were read.
	Notes []string

	badDates, ambiguousDates int
}

// ignore keeps a column out of the model, and notes it when its name
// suggests the detector's own number under another name.
func (rd *Reader) ignore(name string) {
	rd.ignored = append(rd.ignored, name)
	switch strings.ReplaceAll(strings.ReplaceAll(name, " ", ""), "_", "") {
	case "id", "tid", "targetid", "targetnumber", "number", "reading":
		rd.Notes = append(rd.Notes, fmt.Sprintf("column %q was kept out of the model; if it is the number your detector showed, name it display_id", name))
	}
}

// date reads a date cell. An unreadable date is not fatal, since dates are
// optional: the dig is kept without it, and a note says so (for the first
// few). An ambiguous one is read by ReadOptions.DateOrder, said once.
func (rd *Reader) date(v string, line int) string {
	date, ambiguous, err := ParseDate(v, rd.opts.DateOrder)
	if err != nil {
		rd.badDates++
		if rd.badDates <= 5 {
			rd.Notes = append(rd.Notes, fmt.Sprintf("%s:%d: date: %v; the dig is kept without its date", rd.name, line, err))
		}
		return ""
	}
	if ambiguous {
		if rd.ambiguousDates == 0 {
			how, other := "day/month/year", "--date-format mdy for month/day/year"
			if rd.opts.DateOrder == MonthFirst {
				how, other = "month/day/year", "--date-format dmy for day/month/year"
			}
			rd.Notes = append(rd.Notes, fmt.Sprintf("%s:%d: dates such as %q are read as %s (%s); give %s", rd.name, line, v, how, date, other))
		}
		rd.ambiguousDates++
	}
	return date
}

// NewReader starts reading a dig log from r; name is used in errors.
func NewReader(r io.Reader, name string, opts ReadOptions) (*Reader, error) {
	br := bufio.NewReaderSize(r, 64<<10)
	// What is not text spade reads is named, with the fix, before anything
	// else is said about it; UTF-16 without its mark is decoded.
	head, _ := br.Peek(64 << 10)
	order, err := sniffEncoding(name, head)
	if err != nil {
		return nil, err
	}
	if order != 0 {
		e := unicode.LittleEndian
		if order == utf16BE {
			e = unicode.BigEndian
		}
		br = bufio.NewReaderSize(transform.NewReader(br, unicode.UTF16(e, unicode.IgnoreBOM).NewDecoder()), 64<<10)
	}
	// UTF-16 with a byte-order mark (as some spreadsheets save "Unicode
	// text") is decoded to UTF-8.
	if b, err := br.Peek(2); err == nil && (bytes.Equal(b, []byte{0xFF, 0xFE}) || bytes.Equal(b, []byte{0xFE, 0xFF})) {
		br = bufio.NewReaderSize(transform.NewReader(br, unicode.BOMOverride(unicode.UTF8.NewDecoder())), 64<<10)
	}
	// Line ends of a lone CR (old spreadsheets on some systems): when the
	// first 64 KB hold a CR and no LF, every CR is read as LF.
	if b, _ := br.Peek(64 << 10); bytes.IndexByte(b, '\r') >= 0 && bytes.IndexByte(b, '\n') < 0 {
		br = bufio.NewReaderSize(crToLF{br}, 64<<10)
	}
	// A spreadsheet's UTF-8 byte-order mark is not part of the first cell.
	if b, err := br.Peek(3); err == nil && bytes.Equal(b, []byte{0xEF, 0xBB, 0xBF}) {
		br.Discard(3)
	}
	format := strings.ToLower(opts.Format)
	if format == "" {
		format = sniffFormat(name, br)
	}
	rd := &Reader{name: name, opts: opts, seen: map[uint64]int{}}
	switch format {
	case "jsonl", "json", "ndjson":
		rd.src = newJSONLSource(br, rd)
	case "csv":
		src, err := newCSVSource(br, rd)
		if err != nil {
			return nil, err
		}
		rd.src = src
	default:
		return nil, fmt.Errorf("unknown log format %q (want csv or jsonl)", opts.Format)
	}
	return rd, nil
}

// sniffFormat decides by extension, then by the first non-blank byte.
func sniffFormat(name string, br *bufio.Reader) string {
	lower := strings.ToLower(name)
	for _, ext := range []string{".jsonl", ".ndjson", ".json"} {
		if strings.HasSuffix(lower, ext) {
			return "jsonl"
		}
	}
	if strings.HasSuffix(lower, ".csv") {
		return "csv"
	}
	b, _ := br.Peek(512)
	if t := bytes.TrimLeft(b, " \t\r\n"); len(t) > 0 && t[0] == '{' {
		return "jsonl"
	}
	return "csv"
}

// Freqs is the log's frequency set, ascending; for JSON Lines it is known
// after the first row.
func (r *Reader) Freqs() []int { return r.freqs }

// HasDisplayID reports whether the log has a display_id column and every row
// kept so far has a value in it.
func (r *Reader) HasDisplayID() bool { return r.displayCol && r.displayGaps == 0 }

// Ignored lists the columns kept out of the model.
func (r *Reader) Ignored() []string { return r.ignored }

// Next returns the next usable dig, or io.EOF after the last. A log with no
// rows at all gives ErrNoDigs instead of io.EOF.
func (r *Reader) Next() (Dig, error) {
	for {
		d, err, fatal := r.src.next()
		if err == io.EOF {
			if r.rows == 0 {
				return Dig{}, &ParseError{File: r.name, Err: fmt.Errorf("%w: the log has no rows", ErrNoDigs)}
			}
			return Dig{}, io.EOF
		}
		r.rows++
		if err == nil {
			err = r.check(&d)
		}
		if err != nil {
			var pe *ParseError
			if errors.As(err, &pe) && !fatal {
				if errors.Is(err, ErrUnlabelled) && r.opts.SkipUnlabelled {
					r.Unlabelled++
					continue
				}
				if r.opts.SkipBad {
					r.Bad = append(r.Bad, pe)
					continue
				}
			}
			return Dig{}, err
		}
		r.kept++
		return d, nil
	}
}

// check applies the rules that hold for every format.
func (r *Reader) check(d *Dig) error {
	if d.ID == "" {
		d.ID = fmt.Sprint(r.rows)
	}
	h := fnv.New64a()
	h.Write([]byte(d.ID))
	key := h.Sum64()
	if line, dup := r.seen[key]; dup && !r.opts.AllowDuplicateIDs {
		return &ParseError{File: r.name, Line: d.Line, Column: "dig", Err: cause(ErrDuplicateDig, "%q was used on line %d", d.ID, line)}
	}
	for _, f := range []struct{ name, v string }{{"dig", d.ID}, {"site", d.Site}, {"date", d.Date}, {"material", d.Material}, {"shape", d.Shape}} {
		if strings.IndexByte(f.v, 0) >= 0 {
			return &ParseError{File: r.name, Line: d.Line, Column: f.name, Err: fmt.Errorf("%w: a NUL character in the text: binary data, not a log; %s", ErrEncoding, fixUTF8)}
		}
	}
	if len(d.Readings) == 0 && math.IsNaN(d.DisplayID) {
		return &ParseError{File: r.name, Line: d.Line, Column: "display_id", Err: fmt.Errorf("%w: display_id is empty, and a log of display IDs only needs one on every row", ErrMissingValue)}
	}
	if r.opts.Require != "" && !d.Labelled(r.opts.Require) {
		return &ParseError{File: r.name, Line: d.Line, Column: labelColumn(d, r.opts.Require),
			Err: fmt.Errorf("%w: training needs the %s of every dig (or --skip-unlabelled)", ErrUnlabelled, labelWords(r.opts.Require))}
	}
	if !r.opts.AllowDuplicateIDs {
		r.seen[key] = d.Line
	}
	if r.opts.PhaseOffset != 0 {
		for i := range d.Readings {
			d.Readings[i] = d.Readings[i].Rotate(r.opts.PhaseOffset)
		}
		for i := range d.Ground {
			d.Ground[i] = d.Ground[i].Rotate(r.opts.PhaseOffset)
		}
	}
	if r.displayCol && math.IsNaN(d.DisplayID) {
		r.displayGaps++
	}
	return nil
}

func labelColumn(d *Dig, kind Label) string {
	if kind == LabelShape || (kind == LabelBoth && d.Material != "") {
		return "shape"
	}
	return "material"
}

func labelWords(kind Label) string {
	if kind == LabelBoth {
		return "material and shape"
	}
	return string(kind)
}

// ReadLog reads a whole dig log into memory.
func ReadLog(r io.Reader, name string, opts ReadOptions) (*Log, error) {
	log, _, err := readAll(r, name, opts, true)
	return log, err
}

// Survey reads a whole log as ReadLog does, refusing what it refuses, but
// keeps no dig: what it learns (frequencies, whether every dig has a
// display ID and a ground reading, the bad rows, ignored columns and
// notes) comes in a Log without Digs, with the count of digs it holds. Its
// memory is the set of dig ids (for duplicates), not the digs: a second
// pass over the same file can then stream.
func Survey(r io.Reader, name string, opts ReadOptions) (*Log, int, error) {
	return readAll(r, name, opts, false)
}

func readAll(r io.Reader, name string, opts ReadOptions, keep bool) (*Log, int, error) {
	rd, err := NewReader(r, name, opts)
	if err != nil {
		return nil, 0, err
	}
	log := &Log{Name: name}
	n := 0
	for {
		d, err := rd.Next()
		if err == io.EOF {
			break
		}
		if err != nil {
			return nil, 0, err
		}
		n++
		log.HasGround = log.HasGround || d.Ground != nil
		if keep {
			log.Digs = append(log.Digs, d)
		}
	}
	log.Freqs, log.Ignored, log.Bad, log.Unlabelled, log.Notes = rd.freqs, rd.ignored, rd.Bad, rd.Unlabelled, rd.Notes
	log.BlankRows = rd.BlankRows
	log.HasDisplayID = rd.HasDisplayID()
	log.DisplayIDOnly = len(rd.freqs) == 0
	if n == 0 {
		return nil, 0, &ParseError{File: name, Err: fmt.Errorf("%w: %d bad and %d unlabelled rows, none left", ErrNoDigs, len(rd.Bad), rd.Unlabelled)}
	}
	return log, n, nil
}

// readingFrom turns one frequency's two values into a Reading, checking them.
// polar says the pair is (phase, amp); otherwise it is (x, r).
func readingFrom(hz int, polar bool, a, b float64) (Reading, int, error) {
	if polar {
		if b <= 0 {
			return Reading{}, 1, cause(ErrNotPositive, "got %g", b)
		}
		return FromPolar(hz, a, b), 0, nil
	}
	if a == 0 && b == 0 {
		return Reading{}, 1, cause(ErrNotPositive, "x and r are both 0, so the amplitude is 0")
	}
	return Reading{Hz: hz, X: a, R: b}, 0, nil
}

// crToLF reads CR as LF.
type crToLF struct{ r io.Reader }

func (c crToLF) Read(p []byte) (int, error) {
	n, err := c.r.Read(p)
	for i := range n {
		if p[i] == '\r' {
			p[i] = '\n'
		}
	}
	return n, err
}
