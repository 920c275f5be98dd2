package report

import (
	"context"
	_ "embed"
	"fmt"
	"html/template"
	"image/png"
	"io"
	"maps"
	"os"
	"path/filepath"
	"slices"
	"strconv"
	"strings"
	"time"

	"github.com/spade-detect/spade/classify"
	"github.com/spade-detect/spade/classify/overlap"
	"github.com/spade-detect/spade/features"
	"github.com/spade-detect/spade/internal/atomicfile"
	"github.com/spade-detect/spade/internal/cli"
	"github.com/spade-detect/spade/train"
)

// PageFile is the report's page in its folder.
const PageFile = "index.html"

//go:embed page.html
var pageTemplate string

var page = template.Must(template.New("page").Parse(pageTemplate))

// Meta is what a report says of where it came from: the log's file name
// (without its folders, which may name the user; "-" is standard input),
// the day it was made (YYYY-MM-DD) and spade's version.
type Meta struct {
	LogName, Date, Version string
}

// logTitle is how the page names the log.
func logTitle(name string) string {
	if name == "-" || name == "" {
		return "a log from standard input"
	}
	return filepath.Base(name)
}

// Files lists the files WriteHTML may write into a folder: the page and
// every picture. A caller checks them against its inputs before the work.
func Files() []string { return append([]string{PageFile}, AllPictures...) }

// WriteHTML writes the season's report into dir, which must exist: the
// page (PageFile) and the pictures it shows, each written atomically, the
// page last. It needs nothing but its folder: no script, no font and no
// address outside it. It returns the paths written.
func WriteHTML(ctx context.Context, dir string, s *Season, meta Meta) ([]string, error) {
	paths, err := WritePictures(dir, s.Pictures(AllPictures...))
	if err != nil {
		return paths, err
	}
	data, err := s.pageData(dir, paths, meta)
	if err != nil {
		return paths, err
	}
	path := filepath.Join(dir, PageFile)
	if err := atomicfile.WriteContext(ctx, path, func(w io.Writer) error { return page.Execute(w, data) }); err != nil {
		return paths, err
	}
	return append(paths, path), nil
}

// pageData is what the template shows.
type pageData struct {
	LogName, Date, Version, Freqs string
	Digs, Classes, Folds          int
	GroupedBy, Axis               string
	Safety, HazardUnavailable     string
	Notes, Short                  []string
	Model                         bool
	Compare                       []compareRow
	OneNumberVerdict              string
	Sections                      []section
}

type compareRow struct{ Name, Spade, OneNumber, Better string }

// section is one part of the page: a title, some sentences, a picture
// with its caption, a table.
type section struct {
	ID, Title             string
	Paragraphs            []string
	Picture, Alt, Caption string
	Width, Height         int
	Table                 *table
}

type table struct {
	Head []string
	Rows [][]string
}

func (s *Season) pageData(dir string, pictures []string, meta Meta) (*pageData, error) {
	ev := s.Eval
	d := &pageData{LogName: logTitle(meta.LogName), Date: meta.Date, Version: meta.Version,
		Digs: ev.Digs, Classes: len(ev.Classes), Folds: ev.Folds, GroupedBy: ev.GroupedBy, Axis: ev.BaselineAxis,
		Safety: classify.Safety, Notes: ev.Warnings, Model: !ev.BaselineOnly, OneNumberVerdict: ev.OneNumberVerdict}
	d.Freqs = "display IDs only"
	if s.Log != nil && len(s.Log.Freqs) > 0 {
		d.Freqs = "read at " + features.HzList(s.Log.Freqs)
	}
	if ev.Screen == nil {
		d.HazardUnavailable = "HAZARD CHECK UNAVAILABLE: " + screenUnavailable(ev)
	}
	d.Short = s.inShort()
	d.Compare = compareRows(ev)
	drawn := map[string]bool{}
	for _, p := range pictures {
		drawn[filepath.Base(p)] = true
	}
	for _, sec := range []section{s.savingSection(), s.learningSection(), s.reliabilitySection(), s.confusionSection(),
		s.spectraSection(), s.rangesSection(), s.screenSection(), s.classSection()} {
		if sec.ID == "" {
			continue
		}
		if sec.Picture != "" {
			if !drawn[sec.Picture] {
				sec.Picture = ""
			} else {
				w, h, err := pngSize(filepath.Join(dir, sec.Picture))
				if err != nil {
					return nil, err
				}
				sec.Width, sec.Height = w, h
			}
		}
		d.Sections = append(d.Sections, sec)
	}
	return d, nil
}

// pngSize reads a picture's size in pixels, for the page's layout.
func pngSize(path string) (int, int, error) {
	f, err := os.Open(path)
	if err != nil {
		return 0, 0, err
	}
	defer f.Close()
	c, err := png.DecodeConfig(f)
	if err != nil {
		return 0, 0, fmt.Errorf("cannot read %s: %w", path, err)
	}
	return c.Width, c.Height, nil
}

func screenUnavailable(ev *train.Evaluation) string {
	if ev.BaselineOnly {
		return "a log of display IDs only carries no ordnance screen, and the one number cannot warn of munitions your history lacks."
	}
	return "this log cannot carry an ordnance screen (no usable amplitudes), so a model of it warns only from your own hazardous digs."
}

// inShort is the page's summary in plain words, for someone who has never
// met a log-loss.
func (s *Season) inShort() []string {
	ev := s.Eval
	var out []string
	if ev.BaselineOnly {
		out = append(out, "This log has display IDs only, so these are your detector's number's own figures. Log phase and amplitude at two or more frequencies and spade can add its own.")
		out = append(out, fmt.Sprintf("Out of every 100 digs, the kind of find most often dug at the same number was the right one for %s.", per100(ev.Baseline.Accuracy)))
	} else {
		out = append(out, fmt.Sprintf("Out of every 100 digs it had not learnt from, spade named the right kind of find for %s; your detector's number alone, for %s.",
			per100(ev.Model.Accuracy), per100(ev.Baseline.Accuracy)))
	}
	if dsv := ev.DigSaving; dsv != nil {
		if p, ok := savingAt(dsv, 0.99); ok {
			line := fmt.Sprintf("Still digging 99 of every 100 of your keepers, you could have left %s of your trash digs in the ground (%d of %d)", pct(p.model.TrashSkipped), p.model.TrashSkips, p.model.Trash)
			if ev.BaselineOnly {
				line = fmt.Sprintf("Still digging 99 of every 100 of your keepers, your detector's number would have let you leave %s of your trash digs in the ground", pct(p.base.TrashSkipped))
			} else {
				line += fmt.Sprintf("; by your detector's number alone, %s", pct(p.base.TrashSkipped))
			}
			out = append(out, line+".")
		}
	} else {
		out = append(out, "Name your keepers (spade evaluate --values FILE, or --keep) to see how much digging spade would save you.")
	}
	if ev.LearningVerdict != "" {
		out = append(out, ev.LearningVerdict)
	}
	if !ev.BaselineOnly {
		if m := commonestMistakes(ev.Classes, ev.Model.Confusion, 1); len(m) > 0 {
			out = append(out, fmt.Sprintf("Its commonest mistake: taking %s for %s (%d of %d).", m[0].Truth, m[0].Taken, m[0].N, m[0].Of))
		}
	}
	if sc := ev.Screen; sc != nil {
		out = append(out, fmt.Sprintf("Of spade's simulated munitions, read as your instrument would read them, its ordnance screen warned of %s; it is an alarm, not a guarantee.", pct(sc.Caught)))
	}
	return out
}

type savingPair struct{ model, base train.SavingPoint }

func savingAt(d *train.DigSaving, keep float64) (savingPair, bool) {
	for i, b := range d.Baseline {
		if b.Keep == keep && b.Keepers > 0 && b.Trash > 0 {
			p := savingPair{base: b}
			if i < len(d.Model) {
				p.model = d.Model[i]
			}
			return p, true
		}
	}
	return savingPair{}, false
}

func per100(v float64) string { return fmt.Sprintf("%.0f", 100*v) }
func pct(v float64) string    { return fmt.Sprintf("%.0f%%", 100*v) }
func f3(v float64) string     { return fmt.Sprintf("%.3f", v) }

func compareRows(ev *train.Evaluation) []compareRow {
	m, b := ev.Model, ev.Baseline
	return []compareRow{
		{"named right (accuracy)", f3(m.Accuracy), f3(b.Accuracy), "higher is better"},
		{"named right, every kind of find counted alike (balanced accuracy)", f3(m.BalancedAccuracy), f3(b.BalancedAccuracy), "higher is better"},
		{"surprise at what came out (log-loss)", f3(m.LogLoss), f3(b.LogLoss), "lower is better"},
		{"Brier score", f3(m.Brier), f3(b.Brier), "lower is better"},
		{"how far its percentages are off (calibration error)", f3(m.ECE), f3(b.ECE), "lower is better"},
	}
}

func (s *Season) savingSection() section {
	ev := s.Eval
	sec := section{ID: "saving", Title: "How much digging would it save you?"}
	d := ev.DigSaving
	if d == nil {
		sec.Paragraphs = []string{"No keepers were named, so there is nothing to weigh: give your values file (--values) or --keep to see how many trash digs spade would spare you."}
		return sec
	}
	sec.Paragraphs = []string{fmt.Sprintf("Your keepers: %s (%d keeper digs, %d trash digs in the log).", strings.Join(d.Keepers, ", "), d.KeeperDigs, d.TrashDigs)}
	if len(d.Hazards) > 0 {
		sec.Paragraphs = append(sec.Paragraphs, fmt.Sprintf("Hazards (%s) are never to be dug and are left out of these figures.", strings.Join(d.Hazards, ", ")))
	}
	sec.Picture, sec.Alt = PictureDigSaving, "The share of trash digs left in the ground against the share of keepers still dug, for spade and for the one number."
	sec.Caption = "Further up is better: more trash left in the ground for the same keepers. The dots mark keeping 95, 99 and 100% of your keepers."
	t := &table{Head: []string{"keeping", "spade: trash left", "one number: trash left"}}
	if ev.BaselineOnly {
		t.Head = []string{"keeping", "one number: trash left"}
	}
	for i, b := range d.Baseline {
		row := []string{pct(b.Keep) + " of keepers"}
		if !ev.BaselineOnly && i < len(d.Model) {
			row = append(row, savingCell(d.Model[i]))
		}
		t.Rows = append(t.Rows, append(row, savingCell(b)))
	}
	sec.Table = t
	return sec
}

func savingCell(p train.SavingPoint) string {
	return fmt.Sprintf("%s (%d keepers lost of %d)", pct(p.TrashSkipped), p.KeepersLost, p.Keepers)
}

func (s *Season) learningSection() section {
	ev := s.Eval
	if len(ev.Learning) == 0 {
		return section{}
	}
	sec := section{ID: "learning", Title: "Would more digs help?", Paragraphs: []string{ev.LearningVerdict},
		Picture: PictureLearning, Alt: "Held-out accuracy and log-loss against the number of digs learnt from.",
		Caption: "If the blue line still climbs (left) or falls (right) at its end, more digs would still make spade better; the dashed line is your detector's number to beat."}
	t := &table{Head: []string{"learnt from", "digs", "named right", "log-loss"}}
	for _, p := range ev.Learning {
		t.Rows = append(t.Rows, []string{pct(p.Share) + " of each fold", fmt.Sprint(p.Digs), f3(p.Accuracy), f3(p.LogLoss)})
	}
	sec.Table = t
	return sec
}

func (s *Season) reliabilitySection() section {
	ev := s.Eval
	if ev.BaselineOnly {
		return section{}
	}
	return section{ID: "reliability", Title: "Can you take its percentages at their word?",
		Paragraphs: []string{fmt.Sprintf("On average spade's stated chance for its top class was off by %.0f points from how often it was right (calibration error %.3f).", 100*ev.Model.ECE, ev.Model.ECE)},
		Picture:    PictureReliability, Alt: "Reliability diagram: spade's stated probability against how often it was right.",
		Caption: "Dots on the dashed line mean its percentages can be taken at their word; above the line spade is right more often than it says, below it less."}
}

func (s *Season) confusionSection() section {
	ev := s.Eval
	if ev.BaselineOnly {
		return section{}
	}
	sec := section{ID: "confusion", Title: "What does it mix up?",
		Picture: PictureConfusion, Alt: "Confusion matrix of held-out digs: what came out of the ground against what spade called it.",
		Caption: "Each row is what came out of the ground, each column what spade called it; dark squares off the diagonal are its commonest mistakes."}
	t := &table{Head: []string{"what came out", "taken for", "digs"}}
	for _, m := range commonestMistakes(ev.Classes, ev.Model.Confusion, 8) {
		t.Rows = append(t.Rows, []string{m.Truth, m.Taken, fmt.Sprintf("%d of %d", m.N, m.Of)})
	}
	if len(t.Rows) > 0 {
		sec.Table = t
	}
	return sec
}

func (s *Season) spectraSection() section {
	if s.Log == nil || s.Log.DisplayIDOnly {
		return section{}
	}
	return section{ID: "spectra", Title: "What each kind of find reads across frequency",
		Paragraphs: []string{"The phase at each of your frequencies, for every kind of find in your log: 0° is iron-like (magnetic), 180° a very good conductor."},
		Picture:    PictureSpectra, Alt: "Phase against frequency for each class: median and middle half of its digs.",
		Caption: "Kinds of find whose lines differ in slope or height across frequency are the ones several frequencies tell apart, where one number cannot."}
}

func (s *Season) rangesSection() section {
	r := s.Overlap
	if r == nil {
		return section{}
	}
	sec := section{ID: "ranges", Title: "Which " + r.By + " ranges could be anything?",
		Picture: PictureOverlap, Alt: "Class shares per " + s.Unit + " bin, with the ambiguous ranges marked, and each bin's entropy.",
		Caption: "Where the bars are many-coloured and the grey bands stand, your detector's number alone could be anything; the dark strip marks those ranges."}
	sec.Paragraphs = append(sec.Paragraphs, r.Notes...)
	if len(r.Ranges) == 0 {
		sec.Paragraphs = append(sec.Paragraphs, "No ambiguous ranges: every bin has a clear top class.")
		return sec
	}
	t := &table{Head: []string{"range", "digs", "what comes out there", "keepers and hazards", "spade right / majority right"}}
	for _, rg := range r.Ranges {
		var classes []string
		for _, c := range rg.Classes[:min(4, len(rg.Classes))] {
			classes = append(classes, fmt.Sprintf("%s %s", c.Class, pct(c.Share)))
		}
		var chances []string
		for _, h := range rg.Hazards {
			chances = append(chances, "possible ordnance: "+h.Words)
		}
		for _, k := range rg.Keepers {
			chances = append(chances, k.Words)
		}
		if rg.TrashOnly {
			chances = append(chances, "only trash collides here")
		}
		resolved := ""
		if res := rg.Resolution; res != nil {
			resolved = fmt.Sprintf("%s / %s", pct(res.ModelAccuracy), pct(res.MajorityAccuracy))
		}
		t.Rows = append(t.Rows, []string{fmt.Sprintf("%s to %s", overlap.Edge(rg.From), overlap.Edge(rg.To)), fmt.Sprint(rg.Digs), strings.Join(classes, ", "), strings.Join(chances, "; "), resolved})
	}
	sec.Table = t
	return sec
}

func (s *Season) screenSection() section {
	ev := s.Eval
	sec := section{ID: "screen", Title: "Would it warn of ordnance your history lacks?"}
	sc := ev.Screen
	if sc == nil {
		sec.Paragraphs = []string{"HAZARD CHECK UNAVAILABLE: " + screenUnavailable(ev)}
		return sec
	}
	sec.Paragraphs = []string{
		fmt.Sprintf("spade's simulated munitions (%s) were read as your instrument would read them, each group scored by a screen fitted without it: %s were warned of by phase and amplitude alone.", sc.Library, pct(sc.Caught)),
	}
	if sc.Depth {
		sec.Paragraphs[0] += fmt.Sprintf(" With their depth, %s.", pct(sc.CaughtDepth))
	}
	line := fmt.Sprintf("On your own digs, out of bag, the screen flags %s of %d trash digs", pct(sc.TrashFlagged), sc.TrashDigs)
	if sc.KeeperDigs > 0 {
		line += fmt.Sprintf(" and %s of %d keepers", pct(sc.KeepersFlagged), sc.KeeperDigs)
	}
	if sc.OwnHazardDigs > 0 {
		line += fmt.Sprintf("; it catches %s of your %d hazardous digs", pct(sc.OwnHazardCaught), sc.OwnHazardDigs)
	}
	sec.Paragraphs = append(sec.Paragraphs, line+". A warning is an alarm to stop and report, not a verdict that the signal is a shell.")
	t := &table{Head: []string{"held-out group", "warned of, no depth"}}
	if sc.Depth {
		t.Head = append(t.Head, "with depth")
	}
	for _, g := range sc.Groups {
		row := []string{g.Group, pct(g.Caught)}
		if sc.Depth {
			row = append(row, pct(g.CaughtDepth))
		}
		t.Rows = append(t.Rows, row)
	}
	sec.Table = t
	return sec
}

func (s *Season) classSection() section {
	ev := s.Eval
	m, who := ev.Model, "spade"
	if ev.BaselineOnly {
		m, who = ev.Baseline, "one number"
	}
	sec := section{ID: "classes", Title: "Kind by kind (" + who + ")",
		Paragraphs: []string{"Recall: of the digs that were this kind, the share named right. Precision: of the digs called this kind, the share that were."}}
	t := &table{Head: []string{"kind of find", "digs", "precision", "recall", "F1"}}
	for _, c := range ev.Classes {
		pc := m.PerClass[c]
		name := c
		if slices.Contains(s.Hazards, c) {
			name += " (hazard)"
		}
		t.Rows = append(t.Rows, []string{name, fmt.Sprint(pc.Support), fmt.Sprintf("%.2f", pc.Precision), fmt.Sprintf("%.2f", pc.Recall), fmt.Sprintf("%.2f", pc.F1)})
	}
	sec.Table = t
	return sec
}

// PrepareFolder makes dir (and its parents) for a report, and refuses,
// before any work, a report whose files would overwrite one of the inputs
// or be one of the command's other outputs (others, by flag). An empty dir
// asks for no report: nothing to do.
func PrepareFolder(dir string, others map[string]string, inputs ...string) error {
	if dir == "" {
		return nil
	}
	if err := os.MkdirAll(dir, 0o755); err != nil {
		return fmt.Errorf("--report %s: %w", dir, features.PathCause(err))
	}
	outputs := map[string]string{}
	maps.Copy(outputs, others)
	for _, f := range Files() {
		outputs["--report "+dir+" ("+f+")"] = filepath.Join(dir, f)
	}
	return cli.CheckOutputs(outputs, inputs...)
}

// Today is the date a report says it was made: SOURCE_DATE_EPOCH's when
// that is set (the reproducible-builds convention, so that a report of the
// same log and seed is the same file), else today's.
func Today() string {
	if v := os.Getenv("SOURCE_DATE_EPOCH"); v != "" {
		if secs, err := strconv.ParseInt(v, 10, 64); err == nil {
			return time.Unix(secs, 0).UTC().Format(time.DateOnly)
		}
	}
	return time.Now().Format(time.DateOnly)
}
