package features

import (
	"bytes"
	"errors"
	"math"
	"os"
	"path/filepath"
	"strings"
	"testing"
)

const logs = "../testdata/logs/"

func TestReadSpreadsheetExport(t *testing.T) {
	// A UTF-8 byte-order mark, CRLF line ends, a quoted comma, comments,
	// mixed-case column names and an ignored column (dig-log contract).
	for _, name := range []string{"spreadsheet.csv", "spreadsheet.jsonl"} {
		t.Run(name, func(t *testing.T) {
			log, err := readFile(logs+name, ReadOptions{})
			if err != nil {
				t.Fatal(err)
			}
			if got, want := log.Freqs, []int{5000, 20000}; !equalInts(got, want) {
				t.Fatalf("freqs %v, want %v", got, want)
			}
			if len(log.Digs) != 3 {
				t.Fatalf("%d digs, want 3", len(log.Digs))
			}
			d := log.Digs[0]
			if d.ID != "a1" || d.Site != "Harrowmere, lower field" || d.Material != "gold" || d.Shape != "ring" || d.DepthCM != 12 || d.DisplayID != 61 {
				t.Errorf("first dig %+v", d)
			}
			if p := d.Readings[0].Phase(); math.Abs(p-128.4) > 1e-9 {
				t.Errorf("phase_5000 = %v, want 128.4", p)
			}
			if a := d.Readings[1].Amp(); math.Abs(a-1.12) > 1e-12 {
				t.Errorf("amp_20000 = %v, want 1.12", a)
			}
			if log.Digs[2].Labelled(LabelBoth) {
				t.Error("third dig has no labels but reads as labelled")
			}
			if !log.HasDisplayID {
				t.Error("display_id column not noticed")
			}
			if len(log.Ignored) != 1 || log.Ignored[0] != "notes" {
				t.Errorf("ignored %v, want [notes]", log.Ignored)
			}
		})
	}
}

func TestReadComponentsAndGround(t *testing.T) {
	log, err := readFile(logs+"components.csv", ReadOptions{})
	if err != nil {
		t.Fatal(err)
	}
	g1, g2 := log.Digs[0], log.Digs[1]
	if g1.Readings[0].X != -0.4 || g1.Readings[0].R != 0.6 || g1.Ground == nil || g1.Ground[1].X != 0.28 {
		t.Errorf("g1 = %+v", g1)
	}
	if g2.Ground != nil {
		t.Errorf("g2 has empty ground cells but got %+v", g2.Ground)
	}
	if !log.HasGround {
		t.Error("HasGround false")
	}
}

func TestBadInputs(t *testing.T) {
	cases := []struct {
		file   string
		opts   ReadOptions
		cause  error
		prefix string // the message starts with file:line: column
	}{
		{"empty.csv", ReadOptions{}, ErrNoDigs, "empty.csv: no digs"},
		{"header-only.csv", ReadOptions{}, ErrNoDigs, "header-only.csv: no digs"},
		{"amp-negative.csv", ReadOptions{}, ErrNotPositive, "amp-negative.csv:2: amp_5000: must be > 0, got -0.3"},
		{"nan.csv", ReadOptions{}, ErrNotFinite, "nan.csv:2: phase_5000: must be finite"},
		{"inf.csv", ReadOptions{}, ErrNotFinite, "inf.csv:2: phase_20k: must be finite"},
		{"not-number.csv", ReadOptions{}, ErrNotNumber, `not-number.csv:2: amp_20k: not a number, got "abc"`},
		{"missing-amp.csv", ReadOptions{}, ErrMissingColumn, "missing-amp.csv:1: amp_5000: missing column"},
		{"no-readings.csv", ReadOptions{}, ErrMissingColumn, "no-readings.csv:1: phase_<hz>: missing column"},
		{"freq-gap.csv", ReadOptions{}, ErrFreqSet, "freq-gap.csv:2: phase_20k: frequency set differs"},
		{"duplicate-dig.csv", ReadOptions{}, ErrDuplicateDig, `duplicate-dig.csv:3: dig: duplicate dig id, "b1" was used on line 2`},
		{"short-row.csv", ReadOptions{}, ErrFieldCount, "short-row.csv:2: wrong number of fields"},
		{"bad-quote.csv", ReadOptions{}, ErrSyntax, "bad-quote.csv:2:"},
		{"open-quote.csv", ReadOptions{}, ErrSyntax, "open-quote.csv:3: column"},
		{"duplicate-key.jsonl", ReadOptions{}, ErrSyntax, `duplicate-key.jsonl:1: Material: malformed JSON: key "Material" appears twice`},
		{"duplicate-column.csv", ReadOptions{}, ErrHeader, "duplicate-column.csv:1: phase_5k: bad header"},
		{"bad-frequency.csv", ReadOptions{}, ErrHeader, "bad-frequency.csv:1: phase_abc: bad header"},
		{"negative-depth.csv", ReadOptions{}, ErrNegative, "negative-depth.csv:2: depth_cm: must be >= 0"},
		{"slash-label.csv", ReadOptions{}, ErrLabelSlash, `slash-label.csv:3: material: "/" inside a label, got "gold/plated"`},
		{"slash-label.jsonl", ReadOptions{}, ErrLabelSlash, `slash-label.jsonl:1: shape: "/" inside a label`},
		{"unlabelled.csv", ReadOptions{Require: LabelBoth}, ErrUnlabelled, "unlabelled.csv:2: material: unlabelled"},
		{"partial-ground.csv", ReadOptions{}, ErrFreqSet, "partial-ground.csv:2: ground: frequency set differs"},
		{"freq-set.jsonl", ReadOptions{}, ErrFreqSet, "freq-set.jsonl:2: readings: frequency set differs"},
		{"bad-json.jsonl", ReadOptions{}, ErrSyntax, "bad-json.jsonl:2: malformed JSON"},
		{"amp-zero.jsonl", ReadOptions{}, ErrNotPositive, "amp-zero.jsonl:1: readings[0].amp: must be > 0, got 0"},
		{"no-readings.jsonl", ReadOptions{}, ErrMissingColumn, "no-readings.jsonl:1: readings: missing column"},
		{"latin1.csv", ReadOptions{}, ErrEncoding, "latin1.csv:3: not a text log spade reads: byte 0xE9 at offset"},
		{"utf32.csv", ReadOptions{}, ErrEncoding, "utf32.csv: not a text log spade reads: the file is UTF-32 text"},
		{"workbook.xlsx", ReadOptions{}, ErrEncoding, "workbook.xlsx: not a text log spade reads: the file is a zipped spreadsheet workbook"},
		{"pipe.csv", ReadOptions{}, ErrEncoding, `pipe.csv:1: not a text log spade reads: the header is separated by "|"`},
	}
	files, _ := filepath.Glob(logs + "bad/*")
	if len(files) != len(cases) {
		t.Errorf("%d files in testdata/logs/bad, %d cases: every bad file needs a case", len(files), len(cases))
	}
	for _, c := range cases {
		t.Run(c.file, func(t *testing.T) {
			f, err := os.Open(logs + "bad/" + c.file)
			if err != nil {
				t.Fatal(err)
			}
			defer f.Close()
			_, err = ReadLog(f, c.file, c.opts)
			if !errors.Is(err, c.cause) {
				t.Fatalf("error %v, want cause %v", err, c.cause)
			}
			var pe *ParseError
			if !errors.As(err, &pe) {
				t.Fatalf("error %T is not a *ParseError", err)
			}
			if !strings.HasPrefix(err.Error(), c.prefix) {
				t.Errorf("message %q, want prefix %q", err, c.prefix)
			}
		})
	}
}

func TestSkipBadListsEveryRow(t *testing.T) {
	in := "dig,phase_5000,amp_5000\nr1,120,0.5\nr2,120,-1\nr3,x,0.5\nr4,130,0.6\nr5,140\n"
	log, err := ReadLog(strings.NewReader(in), "mixed.csv", ReadOptions{SkipBad: true})
	if err != nil {
		t.Fatal(err)
	}
	if len(log.Digs) != 2 || len(log.Bad) != 3 {
		t.Fatalf("%d good, %d bad; want 2 and 3", len(log.Digs), len(log.Bad))
	}
	for i, want := range []int{3, 4, 6} {
		if log.Bad[i].Line != want {
			t.Errorf("bad row %d on line %d, want %d", i, log.Bad[i].Line, want)
		}
	}
}

// streamDigs reads a log to its end and counts the digs it gives.
func streamDigs(t *testing.T, in, name string, opts ReadOptions) (*Reader, int) {
	t.Helper()
	rd, err := NewReader(strings.NewReader(in), name, opts)
	if err != nil {
		t.Fatal(err)
	}
	n := 0
	for {
		if _, err := rd.Next(); err != nil {
			break
		}
		n++
	}
	return rd, n
}

func TestSkipUnlabelledCounts(t *testing.T) {
	in := "dig,material,shape,phase_5000,amp_5000\nr1,gold,ring,120,0.5\nr2,,,120,0.4\n"
	rd, n := streamDigs(t, in, "u.csv", ReadOptions{Require: LabelBoth, SkipUnlabelled: true})
	if n != 1 || rd.Unlabelled != 1 {
		t.Errorf("kept %d, skipped %d unlabelled; want 1 and 1", n, rd.Unlabelled)
	}
}

func TestPhaseOffsetRotates(t *testing.T) {
	in := "dig,phase_5000,amp_5000\nr1,130,0.5\n"
	log, err := ReadLog(strings.NewReader(in), "o.csv", ReadOptions{PhaseOffset: 10})
	if err != nil {
		t.Fatal(err)
	}
	r := log.Digs[0].Readings[0]
	if math.Abs(r.Phase()-120) > 1e-9 || math.Abs(r.Amp()-0.5) > 1e-12 {
		t.Errorf("after a 10° offset: %v, want 120° × 0.5", r)
	}
}

func TestPolarComponentsRoundTrip(t *testing.T) {
	// phase = atan2(R, X), amplitude = hypot(X, R) (dig-log contract).
	for _, p := range []float64{-5, 0, 0.5, 45, 90, 135, 179.9, 180, 183} {
		for _, a := range []float64{1e-6, 0.3, 1, 250} {
			r := FromPolar(5000, p, a)
			if math.Abs(r.Phase()-p) > 1e-9 || math.Abs(r.Amp()-a) > 1e-12*a {
				t.Errorf("(%v°, %v) -> (%v, %v) -> (%v°, %v)", p, a, r.X, r.R, r.Phase(), r.Amp())
			}
		}
	}
}

func TestWriteReadRoundTrip(t *testing.T) {
	log, err := readFile(logs+"spreadsheet.csv", ReadOptions{})
	if err != nil {
		t.Fatal(err)
	}
	var buf bytes.Buffer
	if err := WriteCSV(&buf, log.Freqs, log.Digs, WriteOptions{Components: true, PhaseDecimals: -1, AmpDigits: -1, Labels: true}); err != nil {
		t.Fatal(err)
	}
	again, err := ReadLog(&buf, "again.csv", ReadOptions{})
	if err != nil {
		t.Fatal(err)
	}
	if msg := sameDigs(log.Digs, again.Digs); msg != "" {
		t.Error(msg)
	}
}

func equalInts(a, b []int) bool {
	if len(a) != len(b) {
		return false
	}
	for i := range a {
		if a[i] != b[i] {
			return false
		}
	}
	return true
}

// sameDigs compares the values a dig log carries; "" when equal.
func sameDigs(a, b []Dig) string {
	if len(a) != len(b) {
		return "different dig counts"
	}
	same := func(x, y float64) bool { return x == y || (math.IsNaN(x) && math.IsNaN(y)) }
	for i := range a {
		p, q := a[i], b[i]
		if p.ID != q.ID || p.Site != q.Site || p.Date != q.Date || p.Material != q.Material || p.Shape != q.Shape ||
			!same(p.DepthCM, q.DepthCM) || !same(p.DisplayID, q.DisplayID) || len(p.Readings) != len(q.Readings) || (p.Ground == nil) != (q.Ground == nil) {
			return "dig " + p.ID + " differs"
		}
		for j := range p.Readings {
			if p.Readings[j] != q.Readings[j] {
				return "dig " + p.ID + " readings differ"
			}
		}
		for j := range p.Ground {
			if p.Ground[j] != q.Ground[j] {
				return "dig " + p.ID + " ground differs"
			}
		}
	}
	return ""
}

// readFile reads a dig log from a file name, as a command does.
func readFile(name string, opts ReadOptions) (*Log, error) {
	f, err := os.Open(name)
	if err != nil {
		return nil, err
	}
	defer f.Close()
	return ReadLog(f, name, opts)
}

// TestHeaderFaultsInFrequencyOrder: of several faulty frequencies the
// lowest is reported, every time (the columns were once checked in map
// order, so the message could change from run to run).
func TestHeaderFaultsInFrequencyOrder(t *testing.T) {
	cells := []string{"phase_21700", "phase_9700", "phase_4300", "amp_36300"}
	for range 20 {
		_, err := parseHeader("h.csv", 1, cells, false)
		var pe *ParseError
		if !errors.As(err, &pe) || pe.Column != "amp_4300" || !errors.Is(err, ErrMissingColumn) {
			t.Fatalf("got %v, want the 4300 Hz pair reported first (amp_4300: missing)", err)
		}
	}
}

// TestIgnoredNumberColumnNoted: a column kept out of the model whose name
// suggests the detector's own number ("Target ID") gets a note naming
// display_id, in CSV and JSON Lines alike; another ignored column does not.
func TestIgnoredNumberColumnNoted(t *testing.T) {
	for name, text := range map[string]string{
		"a.csv":   "Target ID,finder,phase_8k,amp_8k,material,shape\n61,K,150,0.8,lead,ball\n",
		"a.jsonl": `{"target id":61,"finder":"K","readings":[{"hz":8000,"phase":150,"amp":0.8}],"material":"lead","shape":"ball"}` + "\n",
	} {
		log, err := ReadLog(strings.NewReader(text), name, ReadOptions{})
		if err != nil {
			t.Fatalf("%s: %v", name, err)
		}
		if len(log.Notes) != 1 || !strings.Contains(log.Notes[0], `column "target id"`) || !strings.Contains(log.Notes[0], "name it display_id") {
			t.Errorf("%s: notes %q, want one naming display_id for the target id column", name, log.Notes)
		}
	}
}
