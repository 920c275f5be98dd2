package features

import (
	"bytes"
	"os"
	"path/filepath"
	"testing"
)

// seedFromTestdata adds every file of the reader's test data as a seed.
func seedFromTestdata(f *testing.F, pattern ...string) {
	for _, p := range pattern {
		files, _ := filepath.Glob(logs + p)
		for _, name := range files {
			b, err := os.ReadFile(name)
			if err != nil {
				f.Fatal(err)
			}
			f.Add(b)
		}
	}
}

// roundTrip checks parse -> write -> parse gives the same digs.
func roundTrip(t *testing.T, data []byte, format string) {
	log, err := ReadLog(bytes.NewReader(data), "fuzz", ReadOptions{Format: format, SkipBad: true})
	if err != nil {
		return
	}
	var buf bytes.Buffer
	if err := WriteCSV(&buf, log.Freqs, log.Digs, WriteOptions{Components: true, PhaseDecimals: -1, AmpDigits: -1, Labels: true}); err != nil {
		t.Fatalf("write: %v", err)
	}
	again, err := ReadLog(bytes.NewReader(buf.Bytes()), "again", ReadOptions{Format: "csv"})
	if err != nil {
		t.Fatalf("re-read of written log: %v\n%s", err, buf.Bytes())
	}
	if msg := sameDigs(log.Digs, again.Digs); msg != "" {
		t.Fatalf("round trip: %s\n%s", msg, buf.Bytes())
	}
	spec := NewSpec(log.Freqs, log.HasDisplayID)
	for i := range log.Digs {
		if _, _, err := spec.Extract(&log.Digs[i], nil); err != nil && log.HasDisplayID {
			t.Fatalf("extract: %v", err)
		}
	}
}

func FuzzReadCSV(f *testing.F) {
	seedFromTestdata(f, "*.csv", "bad/*.csv", "exports/*.csv")
	f.Fuzz(func(t *testing.T, data []byte) { roundTrip(t, data, "csv") })
}

func FuzzReadJSONL(f *testing.F) {
	seedFromTestdata(f, "*.jsonl", "bad/*.jsonl")
	f.Fuzz(func(t *testing.T, data []byte) { roundTrip(t, data, "jsonl") })
}
