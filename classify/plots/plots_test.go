package plots

import (
	"bytes"
	"encoding/xml"
	"fmt"
	"image/color"
	"image/png"
	"io"
	"math"
	"strconv"
	"strings"
	"testing"

	"github.com/spade-detect/spade/classify/overlap"
	"github.com/spade-detect/spade/train"
)

// checkImage decodes a PNG with image/png, or parses an SVG with
// encoding/xml, and checks its size in pixels or points.
func checkImage(t *testing.T, name, format string, data []byte, wantWIn, wantHIn float64) {
	t.Helper()
	switch format {
	case "png":
		img, err := png.Decode(bytes.NewReader(data))
		if err != nil {
			t.Fatalf("%s: not a PNG: %v", name, err)
		}
		// Inches at 96 dpi, within a pixel of rounding.
		if b := img.Bounds(); math.Abs(float64(b.Dx())-wantWIn*dpi) > 1 || math.Abs(float64(b.Dy())-wantHIn*dpi) > 1 {
			t.Errorf("%s: %dx%d pixels, want %.0fx%.0f", name, b.Dx(), b.Dy(), wantWIn*dpi, wantHIn*dpi)
		}
	case "svg":
		dec := xml.NewDecoder(bytes.NewReader(data))
		var root *xml.StartElement
		for {
			tok, err := dec.Token()
			if err == io.EOF {
				break
			}
			if err != nil {
				t.Fatalf("%s: not well-formed SVG: %v", name, err)
			}
			if se, ok := tok.(xml.StartElement); ok && root == nil {
				se := se.Copy()
				root = &se
			}
		}
		if root == nil || root.Name.Local != "svg" {
			t.Fatalf("%s: root element %v", name, root)
		}
		attrs := map[string]string{}
		for _, a := range root.Attr {
			attrs[a.Name.Local] = a.Value
		}
		// vgsvg writes the size in points, 72 an inch.
		w, _ := strconv.ParseFloat(strings.TrimSuffix(attrs["width"], "pt"), 64)
		h, _ := strconv.ParseFloat(strings.TrimSuffix(attrs["height"], "pt"), 64)
		if math.Abs(w-wantWIn*72) > 1 || math.Abs(h-wantHIn*72) > 1 {
			t.Errorf("%s: svg size %s x %s, want %.0f x %.0f pt", name, attrs["width"], attrs["height"], wantWIn*72, wantHIn*72)
		}
	}
}

func sampleOverlap(t *testing.T) *overlap.Result {
	var axis []float64
	var y []int32
	classes := []string{"a/x", "b/y", "c/z", "d/w", "e/v", "f/u", "g/t", "h/s", "i/r", "j/q"}
	for i := range 400 {
		axis = append(axis, float64(i%100))
		y = append(y, int32((i*7+i/100)%len(classes)))
	}
	r, err := overlap.Analyse("display_id", axis, classes, y, nil, overlap.Options{Width: 5})
	if err != nil {
		t.Fatal(err)
	}
	return r
}

func TestPlotsDecode(t *testing.T) {
	classes := []string{"gold/ring", "aluminium/ring-pull", "iron/nail"}
	cm := map[string]map[string]int{
		"gold/ring":           {"gold/ring": 8, "aluminium/ring-pull": 2},
		"aluminium/ring-pull": {"aluminium/ring-pull": 9, "gold/ring": 1},
		"iron/nail":           {"iron/nail": 10},
	}
	rel := []train.ReliabilityBin{{Lo: 0.4, Hi: 0.5, Count: 3, Confidence: 0.45, Accuracy: 0.33}, {Lo: 0.9, Hi: 1, Count: 20, Confidence: 0.96, Accuracy: 0.95}}
	freqs := []int{5000, 10000, 20000, 40000}
	phases := [][]float64{{110, 128, 147, 163}, {112, 127, 145, 157}, {5, 9, 13, 17}, {115, 130, 149, 165}}
	y := []int32{0, 1, 2, 0}
	for _, format := range []string{"png", "svg"} {
		var buf bytes.Buffer
		if err := Overlap(&buf, format, sampleOverlap(t), "display ID", Roles{Hazards: []string{"j/q"}, Keepers: []string{"a/x"}}); err != nil {
			t.Fatal(err)
		}
		checkImage(t, "overlap."+format, format, buf.Bytes(), 12, 7)
		buf.Reset()
		if err := Reliability(&buf, format, rel); err != nil {
			t.Fatal(err)
		}
		checkImage(t, "reliability."+format, format, buf.Bytes(), 8.5, 6)
		buf.Reset()
		if err := Confusion(&buf, format, classes, cm); err != nil {
			t.Fatal(err)
		}
		checkImage(t, "confusion."+format, format, buf.Bytes(), 9, 8)
		buf.Reset()
		if err := Spectra(&buf, format, freqs, classes, phases, y, Roles{}); err != nil {
			t.Fatal(err)
		}
		checkImage(t, "spectra."+format, format, buf.Bytes(), 12, 2.6+0.6)
		buf.Reset()
		learning := []train.LearningPoint{{Share: 0.25, Digs: 300, Accuracy: 0.75, LogLoss: 0.79}, {Share: 1, Digs: 1200, Accuracy: 0.8, LogLoss: 0.61}}
		if err := Learning(&buf, format, learning, train.Metrics{Accuracy: 0.6, LogLoss: 1.16}); err != nil {
			t.Fatal(err)
		}
		checkImage(t, "learning."+format, format, buf.Bytes(), 12, 4.5)
		buf.Reset()
		saving := []train.SavingPoint{{Keep: 0.95, TrashSkipped: 0.6, Keepers: 40, Trash: 100}, {Keep: 1, TrashSkipped: 0.2, Keepers: 40, Trash: 100}}
		if err := DigSaving(&buf, format, saving, saving[1:], train.SavingLevels); err != nil {
			t.Fatal(err)
		}
		checkImage(t, "dig-saving."+format, format, buf.Bytes(), 9, 6)
	}
}

func TestFormatOf(t *testing.T) {
	for name, want := range map[string]string{"a.png": "png", "b.SVG": "svg"} {
		if got, err := FormatOf(name); err != nil || got != want {
			t.Errorf("%s: %q, %v", name, got, err)
		}
	}
	if _, err := FormatOf("c.pdf"); err == nil {
		t.Error("c.pdf accepted")
	}
}

// TestClassColoursStable: a class's colour comes from its name, so it is
// the same in two logs with other classes beside it (unless two classes
// meet on one home colour); hazards always get the reserved red and no
// other class does; with more classes than colours, the keepers and then
// the commonest are named, and only the least dug are left grey (issue 17:
// steel/cap was black in one log and aluminium/foil in another).
func TestClassColoursStable(t *testing.T) {
	roles := Roles{Keepers: []string{"gold/ring"}, Hazards: []string{"steel/ordnance"}}
	a := ClassColours(map[string]int{"gold/ring": 5, "steel/cap": 40, "steel/ordnance": 2}, roles)
	b := ClassColours(map[string]int{"gold/ring": 50, "steel/cap": 4, "aluminium/foil": 9, "steel/ordnance": 1, "iron/nail": 30}, roles)
	if colourHome("steel/cap") != colourHome("aluminium/foil") && colourHome("steel/cap") != colourHome("iron/nail") && colourHome("steel/cap") != colourHome("gold/ring") {
		if a["steel/cap"] != b["steel/cap"] {
			t.Errorf("steel/cap is %v in one log and %v in another", a["steel/cap"], b["steel/cap"])
		}
	}
	if a["steel/ordnance"] != hazardRed || b["steel/ordnance"] != hazardRed {
		t.Errorf("the hazard is not drawn in the reserved red")
	}
	many := map[string]int{"steel/ordnance": 1}
	for i := range 15 {
		many[fmt.Sprintf("trash%02d/x", i)] = 100 - i
	}
	many["gold/ring"] = 1
	c := ClassColours(many, roles)
	seen := map[color.Color]string{}
	for class, col := range c {
		if col == hazardRed && class != "steel/ordnance" {
			t.Errorf("%s has the hazard colour", class)
		}
		if other, ok := seen[col]; ok && col != hazardRed {
			t.Errorf("%s and %s share a colour", class, other)
		}
		seen[col] = class
	}
	if _, ok := c["gold/ring"]; !ok {
		t.Error("the keeper, the least dug class, was left grey")
	}
	if _, ok := c["trash00/x"]; !ok {
		t.Error("the commonest trash was left grey")
	}
	if _, ok := c["trash14/x"]; ok {
		t.Error("the least dug trash got a colour beyond the palette")
	}
	if got := len(c); got != len(classPalette)+1 {
		t.Errorf("%d classes coloured, want the palette's %d and the hazard", got, len(classPalette))
	}
}

// TestTensTicks: the single-number axis is marked every 10, labelled every
// 10, or every 50 on a long axis (issue 17: two ticks on 0-99).
func TestTensTicks(t *testing.T) {
	ticks := tensTicks{}.Ticks(0, 99)
	if len(ticks) != 10 || ticks[3].Value != 30 || ticks[3].Label != "30" {
		t.Errorf("0-99: %v", ticks)
	}
	long := tensTicks{}.Ticks(-40, 400)
	labelled := 0
	for _, tk := range long {
		if tk.Label != "" {
			labelled++
			if math.Mod(tk.Value, 50) != 0 {
				t.Errorf("label at %g on a long axis", tk.Value)
			}
		}
	}
	if len(long) != 45 || labelled != 9 {
		t.Errorf("-40-400: %d ticks, %d labelled; want 45 and 9", len(long), labelled)
	}
}
