package plots

import (
	"bytes"
	"encoding/xml"
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
		if err := Overlap(&buf, format, sampleOverlap(t), "display ID", []string{"j/q"}); err != nil {
			t.Fatal(err)
		}
		checkImage(t, "overlap."+format, format, buf.Bytes(), 10, 7)
		buf.Reset()
		if err := Reliability(&buf, format, rel); err != nil {
			t.Fatal(err)
		}
		checkImage(t, "reliability."+format, format, buf.Bytes(), 6, 6)
		buf.Reset()
		if err := Confusion(&buf, format, classes, cm); err != nil {
			t.Fatal(err)
		}
		checkImage(t, "confusion."+format, format, buf.Bytes(), 9, 8)
		buf.Reset()
		if err := Spectra(&buf, format, freqs, classes, phases, y); err != nil {
			t.Fatal(err)
		}
		checkImage(t, "spectra."+format, format, buf.Bytes(), 12, 2.6+0.6)
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
