package features

import (
	"errors"
	"fmt"
	"math"
	"os"
	"strings"
	"testing"
)

func TestEditDistance(t *testing.T) {
	// Textbook values (common practice, no source): kitten → sitting is 3.
	for _, c := range []struct {
		a, b string
		d    int
	}{{"kitten", "sitting", 3}, {"", "abc", 3}, {"aluminum", "aluminium", 1}, {"flaw", "lawn", 2}, {"same", "same", 0}} {
		if got := EditDistance(c.a, c.b); got != c.d {
			t.Errorf("%q, %q: %d, want %d", c.a, c.b, got, c.d)
		}
	}
}

func TestLabelNotes(t *testing.T) {
	digs := []Dig{
		{Material: "aluminium", Shape: "foil"}, {Material: "aluminum", Shape: "foil"},
		{Material: "iron", Shape: "nail"}, {Material: "iron", Shape: "nails"}, {Material: "iron", Shape: "nails"},
		{Material: "tin", Shape: "cap"}, {Material: "zinc", Shape: "cup"},
	}
	notes := strings.Join(LabelNotes(digs), "\n")
	for _, want := range []string{`materials "aluminium" (1 digs) and "aluminum" (1 digs)`, `shapes "nail" (1 digs) and "nails" (2 digs)`} {
		if !strings.Contains(notes, want) {
			t.Errorf("notes lack %q:\n%s", want, notes)
		}
	}
	// Short words one letter apart are different things.
	if strings.Contains(notes, `"cap"`) {
		t.Errorf("cap and cup reported:\n%s", notes)
	}
}

func TestSpreadsheetHeaders(t *testing.T) {
	// Issue 13: headers as people type them, and decimal kilohertz parsed
	// exactly (16.1 × 1000 is not a whole number in floating point).
	for _, c := range []struct {
		header string
		hz     int
	}{
		{"phase_5kHz", 5000}, {"Phase 5k", 5000}, {"phase 5 kHz", 5000}, {"PHASE_5000", 5000},
		{"phase_16.1k", 16100}, {"phase_2.01k", 2010}, {"phase_8.11k", 8110}, {"phase_12500Hz", 12500},
	} {
		in := "dig,material,shape," + c.header + ",Amp " + strings.TrimPrefix(strings.TrimPrefix(strings.ToLower(c.header), "phase_"), "phase ") + "\na,iron,nail,20,0.5\n"
		log, err := ReadLog(strings.NewReader(in), "h.csv", ReadOptions{})
		if err != nil {
			t.Errorf("%q: %v", c.header, err)
			continue
		}
		if len(log.Freqs) != 1 || log.Freqs[0] != c.hz {
			t.Errorf("%q: frequencies %v, want %d", c.header, log.Freqs, c.hz)
		}
	}
	for _, bad := range []string{"phase_1e3", "phase_0x10", "phase_16.15k5"} {
		in := "dig," + bad + ",amp_5000\na,20,0.5\n"
		if _, err := ReadLog(strings.NewReader(in), "h.csv", ReadOptions{}); err == nil {
			t.Errorf("%q accepted", bad)
		}
	}
}

func TestDatesAsSpreadsheetsWriteThem(t *testing.T) {
	// Issue 13: every dig is kept; readable dates become YYYY-MM-DD, an
	// unreadable one is dropped with a note, an ambiguous one is read day
	// first (or month first when asked) and said once.
	for _, c := range []struct {
		order string
		first string
	}{{"", "2025-05-03"}, {MonthFirst, "2025-03-05"}} {
		f, err := os.Open(logs + "dates.csv")
		if err != nil {
			t.Fatal(err)
		}
		log, err := ReadLog(f, "dates.csv", ReadOptions{DateOrder: c.order})
		f.Close()
		if err != nil {
			t.Fatal(err)
		}
		var got []string
		for _, d := range log.Digs {
			got = append(got, d.Date)
		}
		want := []string{c.first, "2025-04-12", "2025-04-12", "2025-04-12", "2025-04-12", "2025-12-25", "", ""}
		if strings.Join(got, ",") != strings.Join(want, ",") {
			t.Errorf("order %q: dates %v, want %v", c.order, got, want)
		}
		notes := strings.Join(log.Notes, "\n")
		for _, w := range []string{`dates.csv:2: dates such as "03/05/2025" are read as`, `dates.csv:8: date: not a date: got "31/02/2025"`, `dates.csv:9: date: not a date: got "tuesday"`} {
			if !strings.Contains(notes, w) {
				t.Errorf("order %q: notes lack %q:\n%s", c.order, w, notes)
			}
		}
	}
}

func TestBlankRowsAndEmptyCells(t *testing.T) {
	in := "dig,material,shape,phase_5k,amp_5k,phase_10k,amp_10k\na,iron,nail,20,0.5,25,0.4\n,,,,,,\n , ,,,,,\nb,gold,ring,120,0.5,130,0.6\n,,,,,,\n"
	rd, n := streamDigs(t, in, "blank.csv", ReadOptions{})
	if n != 2 || rd.BlankRows != 3 {
		t.Errorf("%d digs, %d blank rows; want 2 and 3", n, rd.BlankRows)
	}
	// A forgotten amplitude is named as empty, not as a frequency-set error.
	_, err := ReadLog(strings.NewReader("dig,phase_5k,amp_5k,phase_10k,amp_10k\na,20,0.5,25,\n"), "e.csv", ReadOptions{})
	if !errors.Is(err, ErrMissingValue) || !strings.Contains(err.Error(), "e.csv:2: amp_10k: missing value, amp_10k is empty") {
		t.Errorf("error %v", err)
	}
}

func TestSpreadsheetExports(t *testing.T) {
	// Issue 13: the same two digs as CR-only, UTF-16 with a byte-order
	// mark, semicolon-separated with decimal commas, and UTF-8 with a BOM
	// and CRLF all read as the plain file does.
	read := func(name string) *Log {
		f, err := os.Open(logs + "exports/" + name)
		if err != nil {
			t.Fatal(err)
		}
		defer f.Close()
		log, err := ReadLog(f, name, ReadOptions{})
		if err != nil {
			t.Fatalf("%s: %v", name, err)
		}
		return log
	}
	want := read("reference.csv")
	for _, name := range []string{"cr-only.csv", "utf16.csv", "semicolon.csv", "utf8-bom-crlf.csv",
		"tab-decimal-comma.csv", "utf16le-no-bom.csv", "utf16be-no-bom.csv"} {
		got := read(name)
		if len(got.Digs) != len(want.Digs) {
			t.Fatalf("%s: %d digs, want %d", name, len(got.Digs), len(want.Digs))
		}
		for i := range want.Digs {
			w, g := want.Digs[i], got.Digs[i]
			if g.ID != w.ID || g.Date != w.Date || g.Class(LabelBoth) != w.Class(LabelBoth) || g.DepthCM != w.DepthCM {
				t.Errorf("%s: dig %d is %+v, want %+v", name, i, g, w)
			}
			for k := range w.Readings {
				if math.Abs(g.Readings[k].Phase()-w.Readings[k].Phase()) > 1e-12 || math.Abs(g.Readings[k].Amp()-w.Readings[k].Amp()) > 1e-12 {
					t.Errorf("%s: dig %d reading %d is %+v, want %+v", name, i, k, g.Readings[k], w.Readings[k])
				}
			}
		}
	}
}

func TestEncodingMessagesNameTheFix(t *testing.T) {
	// Issue 13: each refusal of another encoding ends with what to do.
	// (TestBadInputs checks the files' positions and causes.)
	for _, file := range []string{"latin1.csv", "utf32.csv", "workbook.xlsx"} {
		f, err := os.Open(logs + "bad/" + file)
		if err != nil {
			t.Fatal(err)
		}
		_, err = ReadLog(f, file, ReadOptions{})
		f.Close()
		if err == nil || !strings.HasSuffix(err.Error(), "save or export the file again as CSV (UTF-8)") {
			t.Errorf("%s: %v names no fix", file, err)
		}
	}
}

func TestNotUTF8PastTheStartAndOverlongRecords(t *testing.T) {
	head := "dig,material,shape,phase_5k,amp_5k\n"
	row := "d%d,iron,nail,20,0.5\n"
	var b strings.Builder
	b.WriteString(head)
	for i := range 5000 { // well past the 64 KB the encoding sniff sees
		fmt.Fprintf(&b, row, i)
	}
	good := b.String()
	// A Latin-1 byte on line 5003, in the material column.
	_, err := ReadLog(strings.NewReader(good+"x1,fer \xe0 cheval,nail,20,0.5\n"), "late.csv", ReadOptions{})
	if !errors.Is(err, ErrEncoding) || !strings.Contains(err.Error(), "late.csv:5002: material: ") {
		t.Errorf("late Latin-1 byte: %v", err)
	}
	// The same in JSON Lines.
	_, err = ReadLog(strings.NewReader("{\"dig\":\"a\",\"material\":\"fer \xe0\",\"readings\":[{\"hz\":5000,\"phase\":20,\"amp\":0.5}]}\n"), "l.jsonl", ReadOptions{})
	if !errors.Is(err, ErrEncoding) || !strings.Contains(err.Error(), "l.jsonl:1: ") {
		t.Errorf("JSON Lines Latin-1 byte: %v", err)
	}
	// A quote opened on line 5002 and never closed, in a file of 3 MB:
	// refused once the record passes MaxRecordBytes, not read whole.
	open := good + "x2,\"iron,nail,20,0.5\n" + strings.Repeat("a,b,c,d,e\n", 300000)
	_, err = ReadLog(strings.NewReader(open), "open.csv", ReadOptions{})
	if !errors.Is(err, ErrEncoding) || !strings.Contains(err.Error(), "open.csv:5002: ") || !strings.Contains(err.Error(), "a quote left open") {
		t.Errorf("overlong record: %v", err)
	}
	// A label with a comma in a semicolon file keeps its comma.
	log, err := ReadLog(strings.NewReader("dig;material;shape;phase_5k;amp_5k\na;lead, cast;ball;20,5;0,5\n"), "s.csv", ReadOptions{})
	if err != nil || log.Digs[0].Material != "lead, cast" || log.Digs[0].Readings[0].Phase() != 20.5 {
		t.Errorf("semicolon file: %v %+v", err, log)
	}
}

func TestDisplayIDOnlyLog(t *testing.T) {
	// Issue 13: a log of display IDs and labels only (what most instruments
	// log) is read when asked for, and otherwise refused with where to go.
	open := func() *os.File {
		f, err := os.Open(logs + "display-id-only.csv")
		if err != nil {
			t.Fatal(err)
		}
		t.Cleanup(func() { f.Close() })
		return f
	}
	log, err := ReadLog(open(), "ids.csv", ReadOptions{DisplayIDOnly: true, Require: LabelBoth})
	if err != nil {
		t.Fatal(err)
	}
	if !log.DisplayIDOnly || len(log.Freqs) != 0 || len(log.Digs) != 300 || !log.HasDisplayID || len(log.Digs[0].Readings) != 0 {
		t.Errorf("log: only %v, freqs %v, %d digs, display %v", log.DisplayIDOnly, log.Freqs, len(log.Digs), log.HasDisplayID)
	}
	_, err = ReadLog(open(), "ids.csv", ReadOptions{})
	if !errors.Is(err, ErrMissingColumn) || !strings.Contains(err.Error(), "a log of display IDs only is read by spade overlap and spade evaluate") {
		t.Errorf("without the option: %v", err)
	}
	_, err = ReadLog(strings.NewReader("dig,material,shape,display_id\na,iron,nail,12\nb,gold,ring,\n"), "gap.csv", ReadOptions{DisplayIDOnly: true})
	if !errors.Is(err, ErrMissingValue) || !strings.Contains(err.Error(), "gap.csv:3: display_id: ") {
		t.Errorf("a row without its display ID: %v", err)
	}
	j, err := ReadLog(strings.NewReader(`{"dig":"a","material":"iron","shape":"nail","display_id":12}`+"\n"+`{"dig":"b","material":"gold","shape":"ring","display_id":66}`+"\n"), "ids.jsonl", ReadOptions{DisplayIDOnly: true})
	if err != nil || !j.DisplayIDOnly || len(j.Digs) != 2 || j.Digs[1].DisplayID != 66 {
		t.Errorf("JSON Lines: %v %+v", err, j)
	}
	// A log with readings is read as before under the option.
	f, err := os.Open(logs + "exports/reference.csv")
	if err != nil {
		t.Fatal(err)
	}
	defer f.Close()
	if l, err := ReadLog(f, "ref.csv", ReadOptions{DisplayIDOnly: true}); err != nil || l.DisplayIDOnly || len(l.Freqs) != 2 {
		t.Errorf("a log with readings: %v %+v", err, l)
	}
}

func TestHashIDSurvivesCSV(t *testing.T) {
	// Found by FuzzReadJSONL: a JSON Lines dig id "#0" written to CSV as
	// the first field read back as a comment line, and the dig was lost.
	log, err := ReadLog(strings.NewReader(`{"dig":"#0","material":"iron","shape":"nail","readings":[{"hz":5000,"phase":20,"amp":0.5}]}`+"\n"), "h.jsonl", ReadOptions{})
	if err != nil {
		t.Fatal(err)
	}
	var b strings.Builder
	if err := WriteCSV(&b, log.Freqs, log.Digs, WriteOptions{Labels: true, PhaseDecimals: -1, AmpDigits: -1}); err != nil {
		t.Fatal(err)
	}
	again, err := ReadLog(strings.NewReader(b.String()), "h.csv", ReadOptions{})
	if err != nil || len(again.Digs) != 1 || again.Digs[0].ID != "#0" {
		t.Errorf("re-read: %v\n%s", err, b.String())
	}
}
