package features

import (
	"bufio"
	"bytes"
	"encoding/csv"
	"errors"
	"fmt"
	"io"
	"math"
	"strconv"
	"strings"
	"unicode/utf8"
)

// csvSource parses RFC 4180 CSV with a header row.
type csvSource struct {
	rd     *Reader
	cr     *csv.Reader
	s      *schema
	header int // line of the header row
	// decimalComma is set for a semicolon-separated file, as spreadsheets
	// write CSV where the comma is the decimal mark: "0,5" is 0.5.
	decimalComma bool
	capped       *recordCap
	lastLine     int // the line the last record started on
}

func newCSVSource(r io.Reader, rd *Reader) (*csvSource, error) {
	comma := ','
	if br, ok := r.(*bufio.Reader); ok {
		head, _ := br.Peek(4096)
		if i := bytes.IndexByte(head, '\n'); i >= 0 {
			head = head[:i]
		}
		// A header with no commas: the separator is the one it has. A
		// spreadsheet saving with semicolons or tabs is one whose locale
		// writes the decimal comma, so "0,5" is read as 0.5 there.
		if bytes.IndexByte(head, ',') < 0 {
			switch {
			case bytes.IndexByte(head, ';') >= 0:
				comma = ';'
			case bytes.IndexByte(head, '\t') >= 0:
				comma = '\t'
			case bytes.Count(head, []byte{'|'}) >= 2:
				return nil, &ParseError{File: rd.name, Line: 1, Err: fmt.Errorf("%w: the header is separated by \"|\"; spade reads commas, semicolons or tabs: export the file again as CSV", ErrEncoding)}
			}
		}
	}
	capped := &recordCap{r: r}
	cr := csv.NewReader(capped)
	cr.Comma = comma
	cr.Comment = '#'
	cr.FieldsPerRecord = -1
	cr.ReuseRecord = true
	src := &csvSource{rd: rd, cr: cr, capped: capped, decimalComma: comma != ','}
	rec, err := cr.Read()
	if err == io.EOF {
		return nil, &ParseError{File: rd.name, Err: fmt.Errorf("%w: the file is empty", ErrNoDigs)}
	}
	if err != nil {
		return nil, csvSyntax(rd.name, err)
	}
	src.header, _ = cr.FieldPos(0)
	s, err := parseHeader(rd.name, src.header, rec, rd.opts.DisplayIDOnly)
	if err != nil {
		return nil, err
	}
	src.s = s
	rd.freqs = s.freqs
	for _, name := range s.ignored {
		rd.ignore(name)
	}
	_, rd.displayCol = s.index[colDisplayID]
	return src, nil
}

func csvSyntax(file string, err error) error {
	var ce *csv.ParseError
	if errors.As(err, &ce) {
		// A quote left open runs to the end of the file: the error is where
		// the field began (StartLine), not where the reader gave up.
		if errors.Is(ce.Err, csv.ErrQuote) || errors.Is(ce.Err, csv.ErrBareQuote) {
			return &ParseError{File: file, Line: ce.StartLine, Column: fmt.Sprintf("column %d", ce.Column), Err: fmt.Errorf("%w CSV: a quoted field that starts here is not closed (%v); close the quote or remove it", ErrSyntax, ce.Err)}
		}
		return &ParseError{File: file, Line: ce.Line, Column: fmt.Sprintf("column %d", ce.Column), Err: fmt.Errorf("%w CSV: %v", ErrSyntax, ce.Err)}
	}
	return &ParseError{File: file, Err: fmt.Errorf("%w CSV: %w", ErrSyntax, err)}
}

func (c *csvSource) next() (Dig, error, bool) {
	for {
		rec, err := c.cr.Read()
		if err == io.EOF {
			return Dig{}, io.EOF, false
		}
		if errors.Is(err, errRecordTooLong) {
			return Dig{}, &ParseError{File: c.rd.name, Line: c.lastLine + 1, Err: fmt.Errorf("%w: the record that starts after line %d runs past %d MB, far more than any dig: a quote left open, or not a dig log", ErrEncoding, c.lastLine, MaxRecordBytes>>20)}, true
		}
		if err != nil {
			var ce *csv.ParseError
			// A broken quote leaves the rest of the file unreadable; a short
			// or long row does not.
			fatal := !errors.As(err, &ce) || !errors.Is(ce.Err, csv.ErrFieldCount)
			return Dig{}, csvSyntax(c.rd.name, err), fatal
		}
		c.capped.n = 0
		line, _ := c.cr.FieldPos(0)
		c.lastLine, _ = c.cr.FieldPos(len(rec) - 1)
		for i, v := range rec {
			if !utf8.ValidString(v) {
				col := fmt.Sprintf("column %d", i+1)
				if i < len(c.s.names) {
					col = c.s.names[i]
				}
				return Dig{}, &ParseError{File: c.rd.name, Line: line, Column: col, Err: notUTF8(v)}, false
			}
		}
		if blankRecord(rec) {
			// ",,,,": a spreadsheet's empty row, skipped and counted.
			c.rd.BlankRows++
			continue
		}
		if len(rec) != len(c.s.names) {
			return Dig{}, &ParseError{File: c.rd.name, Line: line,
				Err: cause(ErrFieldCount, "the row has %d fields, the header %d", len(rec), len(c.s.names))}, false
		}
		if c.decimalComma {
			for i, v := range rec {
				rec[i] = decimalComma(v)
			}
		}
		d, err := c.row(line, rec)
		return d, err, false
	}
}

func (c *csvSource) row(line int, rec []string) (Dig, error) {
	perr := func(col int, err error) error {
		return &ParseError{File: c.rd.name, Line: line, Column: c.s.names[col], Err: err}
	}
	d := Dig{Line: line, DepthCM: math.NaN(), DisplayID: math.NaN()}
	if err := c.digFields(&d, rec, perr); err != nil {
		return d, err
	}
	return d, c.readings(&d, rec, perr)
}

// cell is the trimmed text of a per-dig column and its index, or "" and
// -1 when the log has no such column.
func (c *csvSource) cell(rec []string, k columnKind) (string, int) {
	if i, ok := c.s.index[k]; ok {
		return strings.TrimSpace(rec[i]), i
	}
	return "", -1
}

// digFields reads a row's per-dig columns: id, site, labels, date, depth
// and display ID.
func (c *csvSource) digFields(d *Dig, rec []string, perr func(int, error) error) error {
	d.ID, _ = c.cell(rec, colDig)
	d.Site, _ = c.cell(rec, colSite)
	m, mi := c.cell(rec, colMaterial)
	sh, si := c.cell(rec, colShape)
	d.Material, d.Shape = normaliseLabel(m), normaliseLabel(sh)
	if err := checkLabel(d.Material); err != nil {
		return perr(mi, err)
	}
	if err := checkLabel(d.Shape); err != nil {
		return perr(si, err)
	}
	if v, _ := c.cell(rec, colDate); v != "" {
		d.Date = c.rd.date(v, d.Line)
	}
	if v, i := c.cell(rec, colDepth); v != "" {
		x, err := parseNumber(v)
		if err == nil && x < 0 {
			err = cause(ErrNegative, "got %g", x)
		}
		if err != nil {
			return perr(i, err)
		}
		d.DepthCM = x
	}
	if v, i := c.cell(rec, colDisplayID); v != "" {
		x, err := parseNumber(v)
		if err != nil {
			return perr(i, err)
		}
		d.DisplayID = x
	}
	return nil
}

// readings reads a row's target reading at every frequency, and its
// ground reading, which must cover all of them or none.
func (c *csvSource) readings(d *Dig, rec []string, perr func(int, error) error) error {
	s := c.s
	d.Readings = make([]Reading, len(s.freqs))
	groundCells := 0
	var ground []Reading
	if s.ground {
		ground = make([]Reading, len(s.freqs))
	}
	for k, hz := range s.freqs {
		fc := s.perFreq[hz]
		polar := fc.phase >= 0
		ia, ib := fc.x, fc.r
		if polar {
			ia, ib = fc.phase, fc.amp
		}
		rd, err := c.pair(hz, polar, rec, ia, ib, perr)
		if err != nil {
			return err
		}
		d.Readings[k] = rd
		if !s.ground {
			continue
		}
		gpolar := fc.groundPhase >= 0
		ga, gb := fc.groundX, fc.groundR
		if gpolar {
			ga, gb = fc.groundPhase, fc.groundAmp
		}
		if strings.TrimSpace(rec[ga]) == "" && strings.TrimSpace(rec[gb]) == "" {
			continue
		}
		groundCells++
		g, err := c.pair(hz, gpolar, rec, ga, gb, perr)
		if err != nil {
			return err
		}
		ground[k] = g
	}
	switch {
	case groundCells == len(s.freqs):
		d.Ground = ground
	case groundCells > 0:
		return &ParseError{File: c.rd.name, Line: d.Line, Column: "ground",
			Err: cause(ErrFreqSet, "the ground reading covers %d of the log's %d frequencies", groundCells, len(s.freqs))}
	}
	return nil
}

// pair reads the two cells of one reading.
func (c *csvSource) pair(hz int, polar bool, rec []string, ia, ib int, perr func(int, error) error) (Reading, error) {
	va, vb := strings.TrimSpace(rec[ia]), strings.TrimSpace(rec[ib])
	if va == "" && vb == "" {
		return Reading{}, perr(ia, cause(ErrFreqSet, "no reading at %d Hz, which the header lists", hz))
	}
	if va == "" || vb == "" {
		col := ia
		if va != "" {
			col = ib
		}
		return Reading{}, perr(col, cause(ErrMissingValue, "%s is empty (its partner %s is not)", c.s.names[col], c.s.names[ia+ib-col]))
	}
	a, err := parseNumber(va)
	if err != nil {
		return Reading{}, perr(ia, err)
	}
	b, err := parseNumber(vb)
	if err != nil {
		return Reading{}, perr(ib, err)
	}
	rd, which, err := readingFrom(hz, polar, a, b)
	if err != nil {
		return Reading{}, perr([]int{ia, ib}[which], err)
	}
	return rd, nil
}

// blankRecord reports a row with nothing in any cell.
func blankRecord(rec []string) bool {
	for _, v := range rec {
		if strings.TrimSpace(v) != "" {
			return false
		}
	}
	return true
}

// decimalComma reads "0,5" as "0.5" in a semicolon- or tab-separated file;
// a field that is not a number with one comma (a label "lead, cast") is
// left as it is.
func decimalComma(v string) string {
	if strings.Count(v, ",") != 1 {
		return v
	}
	d := strings.Replace(v, ",", ".", 1)
	if _, err := strconv.ParseFloat(strings.TrimSpace(d), 64); err != nil {
		return v
	}
	return d
}
