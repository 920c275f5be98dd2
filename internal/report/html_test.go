package report

import (
	"context"
	"image/png"
	"os"
	"path/filepath"
	"slices"
	"strconv"
	"strings"
	"sync"
	"testing"

	"github.com/spade-detect/spade/classify"
	"github.com/spade-detect/spade/datasets"
	"github.com/spade-detect/spade/features"
	"github.com/spade-detect/spade/train"
	"golang.org/x/net/html"
)

var (
	demoOnce   sync.Once
	demoSeason *Season
	demoErr    error
)

// demoSeasonForTest evaluates the demo history with small forests (40
// trees, the screen's 30) once for every test of the package: real
// figures, a few seconds.
func demoSeasonForTest(t *testing.T) *Season {
	t.Helper()
	demoOnce.Do(func() {
		log, err := datasets.DemoLog()
		if err != nil {
			demoErr = err
			return
		}
		vals, err := classify.ParseValues("values.toml", string(datasets.DemoValues))
		if err != nil {
			demoErr = err
			return
		}
		spec := features.SpecOf(log)
		ds, err := train.FromLog(log, spec, features.LabelBoth)
		if err != nil {
			demoErr = err
			return
		}
		keepers, hazards := classify.Roles(vals, ds.Classes)
		ev, err := train.CrossValidate(context.Background(), ds, train.EvalOptions{Folds: 5, Forest: train.Options{Trees: 40, Seed: 1}, Seed: 1, Keepers: keepers, Hazards: hazards, LearningCurve: true})
		if err != nil {
			demoErr = err
			return
		}
		keeper := func(d *features.Dig) bool { return vals.IsKeeper(d.Class(features.LabelBoth)) }
		if ev.Screen, err = train.EvaluateScreen(context.Background(), log, spec, train.ScreenOptions{Seed: 1, Trees: 30}, keeper); err != nil {
			demoErr = err
			return
		}
		demoSeason, demoErr = NewSeason(log, ds, ev, vals)
	})
	if demoErr != nil {
		t.Fatal(demoErr)
	}
	return demoSeason
}

// parsedPage is a parsed report: its images, figures with captions, links and
// scripts, and its text.
type parsedPage struct {
	images           []map[string]string
	figures, figcaps int
	outside          []string // src, href or url() pointing off the folder
	scripts          int
	text             string
}

func parsePage(t *testing.T, path string) parsedPage {
	t.Helper()
	f, err := os.Open(path)
	if err != nil {
		t.Fatal(err)
	}
	defer f.Close()
	doc, err := html.Parse(f)
	if err != nil {
		t.Fatalf("%s: %v", path, err)
	}
	var p parsedPage
	var text strings.Builder
	var walk func(n *html.Node)
	walk = func(n *html.Node) {
		switch {
		case n.Type == html.TextNode:
			text.WriteString(n.Data)
			text.WriteString(" ")
			if strings.Contains(n.Data, "url(") || strings.Contains(n.Data, "@import") {
				p.outside = append(p.outside, "CSS: "+n.Data)
			}
		case n.Type == html.ElementNode:
			attrs := map[string]string{}
			for _, a := range n.Attr {
				attrs[a.Key] = a.Val
				if (a.Key == "src" || a.Key == "href") && (strings.Contains(a.Val, ":") || strings.HasPrefix(a.Val, "//") || strings.Contains(a.Val, "/")) {
					p.outside = append(p.outside, a.Key+"="+a.Val)
				}
			}
			switch n.Data {
			case "img":
				p.images = append(p.images, attrs)
			case "figure":
				p.figures++
			case "figcaption":
				p.figcaps++
			case "script", "link", "iframe", "object", "embed":
				p.scripts++
			}
		}
		for c := n.FirstChild; c != nil; c = c.NextSibling {
			walk(c)
		}
	}
	walk(doc)
	p.text = strings.Join(strings.Fields(text.String()), " ")
	return p
}

// TestReportPageWorksFromItsFolder writes the demo history's report and
// reads it back as a browser would need it: at least five pictures
// (confusion, reliability, spectra, learning curve, dig saving), each a
// PNG in the folder of the size the page declares, each with a caption;
// nothing outside the folder, no script; the log's name, the date, spade's
// version and the safety text on the page (issue 17's target).
func TestReportPageWorksFromItsFolder(t *testing.T) {
	s := demoSeasonForTest(t)
	dir := t.TempDir()
	written, err := WriteHTML(context.Background(), dir, s, Meta{LogName: "/home/someone/digs/history.csv", Date: "2026-12-04", Version: "9.9.9 (commit test)"})
	if err != nil {
		t.Fatal(err)
	}
	if len(written) != len(AllPictures)+1 {
		t.Errorf("wrote %v, want every picture and the page", written)
	}
	p := parsePage(t, filepath.Join(dir, PageFile))
	var srcs []string
	for _, img := range p.images {
		srcs = append(srcs, img["src"])
		f, err := os.Open(filepath.Join(dir, img["src"]))
		if err != nil {
			t.Errorf("the page shows %s, which is not in its folder: %v", img["src"], err)
			continue
		}
		c, err := png.DecodeConfig(f)
		f.Close()
		w, _ := strconv.Atoi(img["width"])
		h, _ := strconv.Atoi(img["height"])
		if err != nil || c.Width != w || c.Height != h {
			t.Errorf("%s: %dx%d (%v), the page says %sx%s", img["src"], c.Width, c.Height, err, img["width"], img["height"])
		}
		if img["alt"] == "" {
			t.Errorf("%s has no alt text", img["src"])
		}
	}
	for _, want := range []string{PictureConfusion, PictureReliability, PictureSpectra, PictureLearning, PictureDigSaving, PictureOverlap} {
		if !slices.Contains(srcs, want) {
			t.Errorf("the page lacks %s; it shows %v", want, srcs)
		}
	}
	if p.figures != len(p.images) || p.figcaps != p.figures {
		t.Errorf("%d images, %d figures, %d captions: want one caption a picture", len(p.images), p.figures, p.figcaps)
	}
	if len(p.outside) > 0 || p.scripts > 0 {
		t.Errorf("the page reaches outside its folder: %v, %d scripts or links", p.outside, p.scripts)
	}
	for _, want := range []string{"history.csv", "2026-12-04", "9.9.9 (commit test)", classify.Safety,
		"Out of every 100 digs it had not learnt from", "Would it warn of ordnance", "steel/ordnance (hazard)"} {
		if !strings.Contains(p.text, want) {
			t.Errorf("the page does not say %q", want)
		}
	}
	if strings.Contains(p.text, "/home/someone") || strings.Contains(p.text, "HAZARD CHECK UNAVAILABLE") {
		t.Errorf("the page names the log's folders, or calls the hazard check unavailable when it was measured")
	}
}

// TestReportSaysWhenTheHazardCheckIsUnavailable: without a screen's
// evaluation the page says HAZARD CHECK UNAVAILABLE in its safety box and
// in the ordnance section, and a history without keepers says how to name
// them instead of drawing a dig-saving curve.
func TestReportSaysWhenTheHazardCheckIsUnavailable(t *testing.T) {
	full := demoSeasonForTest(t)
	ev := *full.Eval
	ev.Screen, ev.DigSaving = nil, nil
	s := *full
	s.Eval = &ev
	dir := t.TempDir()
	if _, err := WriteHTML(context.Background(), dir, &s, Meta{LogName: "-", Date: "2026-12-04", Version: "v"}); err != nil {
		t.Fatal(err)
	}
	p := parsePage(t, filepath.Join(dir, PageFile))
	if n := strings.Count(p.text, "HAZARD CHECK UNAVAILABLE"); n < 2 {
		t.Errorf("HAZARD CHECK UNAVAILABLE said %d times, want in the safety box and the ordnance section", n)
	}
	if !strings.Contains(p.text, "a log from standard input") || !strings.Contains(p.text, "Name your keepers") {
		t.Errorf("page text: %s", p.text)
	}
	for _, img := range p.images {
		if img["src"] == PictureDigSaving {
			t.Error("a dig-saving curve without keepers")
		}
	}
}

// TestPrepareFolderRefusesToOverwriteAnInput: a log named like one of the
// report's files in the report's folder is refused before any work, as is
// another output of the command named like one; the folder is made when
// it is missing.
func TestPrepareFolderRefusesToOverwriteAnInput(t *testing.T) {
	dir := filepath.Join(t.TempDir(), "season", "2026")
	if err := PrepareFolder(dir, nil, "digs.csv"); err != nil {
		t.Fatal(err)
	}
	if fi, err := os.Stat(dir); err != nil || !fi.IsDir() {
		t.Fatalf("folder not made: %v", err)
	}
	input := filepath.Join(dir, PageFile)
	if err := os.WriteFile(input, []byte("dig,material\n"), 0o644); err != nil {
		t.Fatal(err)
	}
	if err := PrepareFolder(dir, nil, input); err == nil || !strings.Contains(err.Error(), "would be overwritten") {
		t.Errorf("an input at %s: %v", input, err)
	}
	// evaluate's text report (-o) written where the page would go.
	page := filepath.Join(dir, "..", "2026", PageFile)
	if err := PrepareFolder(dir, map[string]string{"-o": page}, "digs.csv"); err == nil || !strings.Contains(err.Error(), "name the same file") {
		t.Errorf("-o %s: %v", page, err)
	}
}

// TestToday reads SOURCE_DATE_EPOCH (reproducible-builds.org's convention):
// 1764806400 is 2025-12-04 00:00 UTC.
func TestToday(t *testing.T) {
	t.Setenv("SOURCE_DATE_EPOCH", "1764806400")
	if got := Today(); got != "2025-12-04" {
		t.Errorf("Today() = %s, want 2025-12-04", got)
	}
}
