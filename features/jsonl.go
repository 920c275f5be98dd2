package features

import (
	"bufio"
	"bytes"
	"encoding/json"
	"errors"
	"fmt"
	"io"
	"math"
	"slices"
	"strconv"
	"strings"
	"unicode/utf8"
)

// jsonlSource parses JSON Lines: one object per line, the CSV's names.
type jsonlSource struct {
	rd      *Reader
	sc      *bufio.Scanner
	line    int
	ignored map[string]bool
}

func newJSONLSource(r io.Reader, rd *Reader) *jsonlSource {
	sc := bufio.NewScanner(r)
	sc.Buffer(make([]byte, 64<<10), MaxRecordBytes)
	return &jsonlSource{rd: rd, sc: sc, ignored: map[string]bool{}}
}

func (j *jsonlSource) next() (Dig, error, bool) {
	for j.sc.Scan() {
		j.line++
		b := bytes.TrimSpace(j.sc.Bytes())
		if len(b) == 0 || b[0] == '#' {
			continue
		}
		if !utf8.Valid(b) {
			// encoding/json would quietly turn the bytes into U+FFFD.
			return Dig{}, &ParseError{File: j.rd.name, Line: j.line, Err: notUTF8(string(b))}, false
		}
		d, err := j.row(b)
		return d, err, false
	}
	if err := j.sc.Err(); err != nil {
		if errors.Is(err, bufio.ErrTooLong) {
			return Dig{}, &ParseError{File: j.rd.name, Line: j.line + 1, Err: fmt.Errorf("%w: the line is longer than %d MB, far more than any dig; is this a dig log?", ErrEncoding, MaxRecordBytes>>20)}, true
		}
		return Dig{}, &ParseError{File: j.rd.name, Line: j.line + 1, Err: fmt.Errorf("%w JSON Lines: %w", ErrSyntax, err)}, true
	}
	return Dig{}, io.EOF, false
}

type jsonReading struct {
	Hz    json.RawMessage `json:"hz"`
	Phase *float64        `json:"phase"`
	Amp   *float64        `json:"amp"`
	X     *float64        `json:"x"`
	R     *float64        `json:"r"`
}

func (j *jsonlSource) row(b []byte) (Dig, error) {
	perr := func(col string, err error) error {
		return &ParseError{File: j.rd.name, Line: j.line, Column: col, Err: err}
	}
	var obj map[string]json.RawMessage
	if err := json.Unmarshal(b, &obj); err != nil {
		return Dig{}, perr("", fmt.Errorf("%w JSON: %w", ErrSyntax, err))
	}
	if dup := duplicateKey(b); dup != "" {
		// encoding/json keeps the last of two equal keys without a word.
		return Dig{}, perr(dup, fmt.Errorf("%w JSON: key %q appears twice in the object; keep one", ErrSyntax, dup))
	}
	d := Dig{Line: j.line, DepthCM: math.NaN(), DisplayID: math.NaN()}
	var rs rowReadings
	for _, key := range sortedKeys(obj) {
		name := strings.ToLower(key)
		if err := j.field(&d, &rs, name, obj[key]); err != nil {
			if _, ok := err.(*json.UnmarshalTypeError); ok {
				err = fmt.Errorf("%w JSON: %w", ErrSyntax, err)
			}
			return d, perr(name, err)
		}
	}
	return d, j.attachReadings(&d, rs, perr)
}

// rowReadings are a row's reading arrays as given, before conversion.
type rowReadings struct{ readings, ground []jsonReading }

// field sets the dig's field of one key of its object; readings go to rs,
// and an unknown key is noted once as ignored.
func (j *jsonlSource) field(d *Dig, rs *rowReadings, name string, raw json.RawMessage) error {
	var err error
	switch name {
	case "dig":
		d.ID, err = jsonText(raw, true)
	case "site":
		d.Site, err = jsonText(raw, false)
	case "date":
		if d.Date, err = jsonText(raw, false); err == nil && d.Date != "" {
			d.Date = j.rd.date(d.Date, j.line)
		}
	case "material", "shape":
		var label string
		if label, err = jsonText(raw, false); err == nil {
			label = normaliseLabel(label)
			err = checkLabel(label)
		}
		if name == "material" {
			d.Material = label
		} else {
			d.Shape = label
		}
	case "depth_cm":
		if d.DepthCM, err = jsonNumber(raw); err == nil && d.DepthCM < 0 {
			err = cause(ErrNegative, "got %g", d.DepthCM)
		}
	case "display_id":
		d.DisplayID, err = jsonNumber(raw)
		if !j.rd.displayCol && j.rd.kept == 0 {
			j.rd.displayCol = true
		}
	case "readings":
		err = json.Unmarshal(raw, &rs.readings)
	case "ground":
		if string(raw) != "null" {
			err = json.Unmarshal(raw, &rs.ground)
		}
	default:
		if !j.ignored[name] {
			j.ignored[name] = true
			j.rd.ignore(name)
		}
	}
	return err
}

// attachReadings converts a row's readings and ground reading onto d and
// checks their frequencies against the log's (set by its first row). A row
// of a display ID alone, where display IDs only are allowed, sets an empty
// frequency set.
func (j *jsonlSource) attachReadings(d *Dig, rs rowReadings, perr func(string, error) error) error {
	if len(rs.readings) == 0 && j.rd.opts.DisplayIDOnly && !math.IsNaN(d.DisplayID) && len(j.rd.freqs) == 0 {
		j.rd.freqs = []int{}
		return nil
	}
	if len(rs.readings) == 0 {
		return perr("readings", cause(ErrMissingColumn, "a row needs a readings array"))
	}
	var err error
	if d.Readings, err = j.convert("readings", rs.readings, perr); err != nil {
		return err
	}
	freqs := hzOf(d.Readings)
	if j.rd.freqs == nil {
		j.rd.freqs = freqs
	} else if !slices.Equal(freqs, j.rd.freqs) {
		return perr("readings", cause(ErrFreqSet, "this row has %s, the log's first row %s", HzList(freqs), HzList(j.rd.freqs)))
	}
	if len(rs.ground) == 0 {
		return nil
	}
	if d.Ground, err = j.convert("ground", rs.ground, perr); err != nil {
		return err
	}
	if gf := hzOf(d.Ground); !slices.Equal(gf, freqs) {
		return perr("ground", cause(ErrFreqSet, "the ground reading has %s, the target's %s", HzList(gf), HzList(freqs)))
	}
	return nil
}

// hzOf lists the frequencies of readings, in order.
func hzOf(rs []Reading) []int {
	hz := make([]int, len(rs))
	for i, r := range rs {
		hz[i] = r.Hz
	}
	return hz
}

// convert checks an array of readings and sorts it by frequency.
func (j *jsonlSource) convert(field string, in []jsonReading, perr func(string, error) error) ([]Reading, error) {
	out := make([]Reading, 0, len(in))
	for i, jr := range in {
		at := fmt.Sprintf("%s[%d]", field, i)
		hzText, err := jsonText(jr.Hz, true)
		if err != nil || hzText == "" {
			return nil, perr(at+".hz", cause(ErrMissingValue, "each reading needs hz"))
		}
		hz, err := ParseHz(hzText)
		if err != nil {
			return nil, perr(at+".hz", cause(ErrNotNumber, "%v", err))
		}
		polar := jr.Phase != nil || jr.Amp != nil
		comps := jr.X != nil || jr.R != nil
		var a, b *float64
		names := [2]string{".phase", ".amp"}
		switch {
		case polar && comps:
			return nil, perr(at, cause(ErrSyntax, "give phase and amp, or x and r, not both"))
		case polar:
			a, b = jr.Phase, jr.Amp
		case comps:
			a, b, names = jr.X, jr.R, [2]string{".x", ".r"}
		default:
			return nil, perr(at, cause(ErrMissingValue, "a reading needs phase and amp, or x and r"))
		}
		if a == nil {
			return nil, perr(at+names[0], cause(ErrMissingValue, "%s goes with %s", names[0][1:], names[1][1:]))
		}
		if b == nil {
			return nil, perr(at+names[1], cause(ErrMissingValue, "%s goes with %s", names[1][1:], names[0][1:]))
		}
		rd, which, err := readingFrom(hz, polar, *a, *b)
		if err != nil {
			return nil, perr(at+names[which], err)
		}
		for _, prev := range out {
			if prev.Hz == hz {
				return nil, perr(at+".hz", cause(ErrFreqSet, "%d Hz appears twice", hz))
			}
		}
		out = append(out, rd)
	}
	slices.SortFunc(out, func(p, q Reading) int { return p.Hz - q.Hz })
	return out, nil
}

func sortedKeys(m map[string]json.RawMessage) []string {
	keys := make([]string, 0, len(m))
	for k := range m {
		keys = append(keys, k)
	}
	slices.Sort(keys)
	return keys
}

// jsonText reads a string, or (when numbers is set) a number as its text.
func jsonText(raw json.RawMessage, numbers bool) (string, error) {
	if len(raw) == 0 || string(raw) == "null" {
		return "", nil
	}
	var s string
	if err := json.Unmarshal(raw, &s); err == nil {
		return strings.TrimSpace(s), nil
	}
	if numbers {
		var n json.Number
		if err := json.Unmarshal(raw, &n); err == nil {
			return n.String(), nil
		}
	}
	return "", cause(ErrSyntax, "want a string, got %s", raw)
}

// jsonNumber reads a number; null is absent (NaN).
func jsonNumber(raw json.RawMessage) (float64, error) {
	if string(raw) == "null" {
		return math.NaN(), nil
	}
	var n json.Number
	if err := json.Unmarshal(raw, &n); err != nil {
		return 0, cause(ErrNotNumber, "got %s", raw)
	}
	v, err := strconv.ParseFloat(n.String(), 64)
	if err != nil || math.IsInf(v, 0) {
		return 0, cause(ErrNotFinite, "got %s", raw)
	}
	return v, nil
}

// duplicateKey is the first top-level key of a JSON object that appears
// twice (compared as spade reads keys, case-folded), or "".
func duplicateKey(b []byte) string {
	dec := json.NewDecoder(bytes.NewReader(b))
	if t, err := dec.Token(); err != nil || t != json.Delim('{') {
		return ""
	}
	seen := map[string]bool{}
	for dec.More() {
		t, err := dec.Token()
		if err != nil {
			return ""
		}
		key, _ := t.(string)
		k := strings.ToLower(key)
		if seen[k] {
			return key
		}
		seen[k] = true
		var skip json.RawMessage
		if err := dec.Decode(&skip); err != nil {
			return ""
		}
	}
	return ""
}
