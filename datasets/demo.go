package datasets

import (
	"bytes"
	_ "embed"
	"encoding/csv"
	"fmt"
	"io"
	"math"
	"math/cmplx"
	"math/rand/v2"
	"slices"

	"github.com/spade-detect/spade/features"
)

// The embedded demo: an invented history of DemoN labelled digs and a file of
// unlabelled readings to classify, both made by Simulate and regenerated
// byte for byte by the tests (go test ./datasets -update rewrites them).
var (
	//go:embed demo/history.csv
	DemoHistory []byte
	//go:embed demo/readings.csv
	DemoReadings []byte
	// DemoValues is the demo's values file (invented worths), also the
	// documented example of the format.
	//go:embed demo/values.toml
	DemoValues []byte
)

// Demo parameters.
const (
	DemoN            = 1500
	DemoSeed         = 7
	DemoReadingsSeed = 8
	DemoHistoryName  = "demo/history.csv"
	DemoReadingsName = "demo/readings.csv"
)

// DemoLog reads the embedded demo history, every dig labelled.
func DemoLog() (*features.Log, error) {
	return features.ReadLog(bytes.NewReader(DemoHistory), DemoHistoryName, features.ReadOptions{Require: features.LabelBoth})
}

// instrumentWrite rounds as the demo instrument displays: phase to 0.01°,
// amplitude to 4 significant digits.
var instrumentWrite = features.WriteOptions{PhaseDecimals: 2, AmpDigits: 4, Labels: true}

// WriteLog simulates and writes a dig log in the CSV form of the contract.
func WriteLog(w io.Writer, opts Options) error {
	digs, _, err := Simulate(opts)
	if err != nil {
		return err
	}
	sc, freqs, _, _ := opts.resolve() // Simulate has checked them
	fmt.Fprintf(w, "# simulated by spade (scenario %s, seed %d): invented sites and finds\n", sc.Name, opts.Seed)
	return features.WriteCSV(w, freqs, digs, instrumentWrite)
}

// GenerateDemoHistory makes the embedded history's bytes.
func GenerateDemoHistory() ([]byte, error) {
	var buf bytes.Buffer
	err := WriteLog(&buf, Options{Scenario: "demo", N: DemoN, Seed: DemoSeed})
	return buf.Bytes(), err
}

// demoReading is one of the example readings: what it really is, where.
type demoReading struct {
	class   string // a catalogue class, or "" for the extra object below
	site    string
	depthCM float64
	note    string
}

var demoReadings = []demoReading{
	{"gold/ring", "Sandle Reach", 9, "simulated: gold ring"},
	{"aluminium/ring-pull", "Sandle Reach", 7, "simulated: aluminium ring-pull"},
	{"copper/coin", "Harrowmere Farm", 14, "simulated: copper coin"},
	{"iron/nail", "Harrowmere Farm", 6, "simulated: iron nail"},
	{"steel/ordnance", "Harrowmere Farm", 30, "simulated: steel projectile with copper band (possible ordnance)"},
	{"aluminium/foil", "Sandle Reach", 4, "simulated: aluminium foil"},
	{"lead/shot", "Harrowmere Farm", 16, "simulated: lead shot"},
	{"silver/coin", "Harrowmere Farm", 12, "simulated: silver coin"},
	{"bronze/coin", "Harrowmere Farm", 18, "simulated: bronze coin"},
	{"steel/cap", "Sandle Reach", 5, "simulated: steel crown cap"},
	{"silver/ring", "Sandle Reach", 10, "simulated: silver ring"},
	{"", "Harrowmere Farm", 8, "simulated: small foil beside a wire fence, with interference unlike anything in the history"},
}

// fenceInterference is a small target read beside a wire fence that
// carries interference: an extra response three times the target's whose
// phase falls from 160° to 20° across the band, with a little random jitter.
// A passive target's phase only rises with frequency (90° + atan ωτ for a
// loop), so nothing in a dig history reads like it: the example for the
// novelty flag.
func fenceInterference(rng *rand.Rand, freqs []int) Response {
	foil := poles(DiscPoles(mm(8), mm(0.03), Conductivity["aluminium"])...)
	extra := map[float64]complex128{}
	for k, hz := range freqs {
		w := 2 * math.Pi * float64(hz)
		phase := 160 - 140*float64(k)/float64(max(len(freqs)-1, 1)) + 5*rng.NormFloat64()
		// X - iR at that phase: X = A cos φ, R = A sin φ.
		extra[w] = cmplx.Conj(cmplx.Rect(3*cmplx.Abs(foil(w)), phase*math.Pi/180))
	}
	return func(w float64) complex128 { return foil(w) + extra[w] }
}

// GenerateDemoReadings makes the embedded readings' bytes: unlabelled rows,
// with a note column (kept out of the model) saying what each really was.
func GenerateDemoReadings() ([]byte, error) {
	rng := rand.New(rand.NewPCG(DemoReadingsSeed, 0x5eed_d16))
	freqs := DefaultFreqs
	var digs []features.Dig
	var notes []string
	for i, r := range demoReadings {
		site := SiteNamed(r.site)
		var d features.Dig
		for attempt := 0; ; attempt++ {
			var resp Response
			if r.class == "" {
				resp = fenceInterference(rng, freqs)
			} else {
				resp = KindOf(r.class).draw(rng)
			}
			var ok bool
			if d, ok = DefaultMeasurement.read(rng, freqs, site, resp, r.depthCM); ok {
				break
			}
			if attempt > 1000 {
				return nil, fmt.Errorf("datasets: demo reading %d is never heard", i+1)
			}
		}
		d.ID = fmt.Sprintf("R%02d", i+1)
		d.Site = r.site
		d.Date = "2026-11-14"
		d.DepthCM = math.NaN()
		digs = append(digs, d)
		notes = append(notes, r.note)
	}
	var buf bytes.Buffer
	buf.WriteString("# example readings to classify, simulated by spade: invented finds; the note column is kept out of the model\n")
	opts := instrumentWrite
	opts.Notes = notes
	err := features.WriteCSV(&buf, freqs, digs, opts)
	return buf.Bytes(), err
}

// DemoReadingNotes maps each embedded demo reading's dig id to its note
// column, which says what the simulated object really was. The note is
// kept out of every model; the demo shows it beside the result.
func DemoReadingNotes() map[string]string {
	r := csv.NewReader(bytes.NewReader(DemoReadings))
	r.Comment = '#'
	rows, err := r.ReadAll()
	notes := map[string]string{}
	if err != nil || len(rows) == 0 {
		return notes
	}
	dig, note := slices.Index(rows[0], "dig"), slices.Index(rows[0], "note")
	if dig < 0 || note < 0 {
		return notes
	}
	for _, row := range rows[1:] {
		notes[row[dig]] = row[note]
	}
	return notes
}
