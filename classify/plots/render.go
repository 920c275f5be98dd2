package plots

import (
	"fmt"
	"image/color"
	"io"
	"path/filepath"
	"strings"

	"github.com/spade-detect/spade/internal/atomicfile"

	"gonum.org/v1/plot"
	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"
	"gonum.org/v1/plot/vg/vgimg"
	"gonum.org/v1/plot/vg/vgsvg"
)

// FormatOf picks "png" or "svg" from a file name.
func FormatOf(path string) (string, error) {
	switch strings.ToLower(filepath.Ext(path)) {
	case ".png":
		return "png", nil
	case ".svg":
		return "svg", nil
	}
	return "", fmt.Errorf("plots: %s: want a .png or .svg file name", path)
}

// dpi is the PNG resolution.
const dpi = 96

// render draws onto a PNG or SVG canvas of the given size and writes it.
func render(w io.Writer, format string, width, height vg.Length, paint func(dc draw.Canvas)) error {
	switch format {
	case "png":
		c := vgimg.NewWith(vgimg.UseWH(width, height), vgimg.UseDPI(dpi))
		dc := draw.New(c)
		fill(dc, color.White)
		paint(dc)
		_, err := vgimg.PngCanvas{Canvas: c}.WriteTo(w)
		return err
	case "svg":
		c := vgsvg.New(width, height)
		dc := draw.New(c)
		fill(dc, color.White)
		paint(dc)
		_, err := c.WriteTo(w)
		return err
	}
	return fmt.Errorf("plots: unknown format %q (want png or svg)", format)
}

func fill(dc draw.Canvas, c color.Color) {
	dc.FillPolygon(c, []vg.Point{dc.Min, {X: dc.Max.X, Y: dc.Min.Y}, dc.Max, {X: dc.Min.X, Y: dc.Max.Y}})
}

// okabeIto is the colour-blind-safe qualitative palette, black last.
var okabeIto = []color.Color{
	color.RGBA{0xE6, 0x9F, 0x00, 0xFF}, // orange
	color.RGBA{0x56, 0xB4, 0xE9, 0xFF}, // sky blue
	color.RGBA{0x00, 0x9E, 0x73, 0xFF}, // bluish green
	color.RGBA{0xF0, 0xE4, 0x42, 0xFF}, // yellow
	color.RGBA{0x00, 0x72, 0xB2, 0xFF}, // blue
	color.RGBA{0xD5, 0x5E, 0x00, 0xFF}, // vermillion
	color.RGBA{0xCC, 0x79, 0xA7, 0xFF}, // reddish purple
	color.RGBA{0x00, 0x00, 0x00, 0xFF}, // black
}

// tolMuted is Paul Tol's "muted" qualitative scheme, designed to stay
// distinct under colour-vision deficiency (Tol, "Colour Schemes", SRON
// technical note SRON/EPS/TN/09-002, 2021), with black added: ten colours,
// for plots with more classes than Okabe-Ito's eight.
var tolMuted = []color.Color{
	color.RGBA{0x33, 0x22, 0x88, 0xFF}, // indigo
	color.RGBA{0xCC, 0x66, 0x77, 0xFF}, // rose
	color.RGBA{0xDD, 0xCC, 0x77, 0xFF}, // sand
	color.RGBA{0x11, 0x77, 0x33, 0xFF}, // green
	color.RGBA{0x88, 0xCC, 0xEE, 0xFF}, // cyan
	color.RGBA{0x88, 0x22, 0x55, 0xFF}, // wine
	color.RGBA{0x44, 0xAA, 0x99, 0xFF}, // teal
	color.RGBA{0x99, 0x99, 0x33, 0xFF}, // olive
	color.RGBA{0xAA, 0x44, 0x99, 0xFF}, // purple
	color.RGBA{0x00, 0x00, 0x00, 0xFF}, // black
}

var otherGrey = color.RGBA{0xBB, 0xBB, 0xBB, 0xFF}
var shadeGrey = color.RGBA{0xE8, 0xE8, 0xE8, 0xFF}
var stripGrey = color.RGBA{0x44, 0x44, 0x44, 0xFF}

// newPlot is a plot with spade's fonts and a title.
func newPlot(title, x, y string) *plot.Plot {
	p := plot.New()
	p.Title.Text = title
	p.Title.TextStyle.Font.Size = 12
	p.X.Label.Text = x
	p.Y.Label.Text = y
	return p
}

// swatch is a legend thumbnail: a filled square.
type swatch struct{ c color.Color }

func (s swatch) Thumbnail(c *draw.Canvas) {
	c.FillPolygon(s.c, []vg.Point{c.Min, {X: c.Max.X, Y: c.Min.Y}, c.Max, {X: c.Min.X, Y: c.Max.Y}})
}

// rects is a plotter of filled rectangles in data coordinates.
type rects struct {
	boxes  [][4]float64 // x0, x1, y0, y1
	colors []color.Color
}

func (r *rects) add(x0, x1, y0, y1 float64, c color.Color) {
	r.boxes = append(r.boxes, [4]float64{x0, x1, y0, y1})
	r.colors = append(r.colors, c)
}

func (r *rects) Plot(c draw.Canvas, p *plot.Plot) {
	tx, ty := p.Transforms(&c)
	for i, b := range r.boxes {
		pts := []vg.Point{{X: tx(b[0]), Y: ty(b[2])}, {X: tx(b[1]), Y: ty(b[2])}, {X: tx(b[1]), Y: ty(b[3])}, {X: tx(b[0]), Y: ty(b[3])}}
		c.FillPolygon(r.colors[i], c.ClipPolygonXY(pts))
	}
}

func (r *rects) DataRange() (xmin, xmax, ymin, ymax float64) {
	if len(r.boxes) == 0 {
		return 0, 1, 0, 1
	}
	xmin, xmax, ymin, ymax = r.boxes[0][0], r.boxes[0][1], r.boxes[0][2], r.boxes[0][3]
	for _, b := range r.boxes {
		xmin, xmax = min(xmin, b[0]), max(xmax, b[1])
		ymin, ymax = min(ymin, b[2]), max(ymax, b[3])
	}
	return
}

// WriteFile draws into a file atomically (a temporary file, then a rename),
// in the format its name asks for (FormatOf).
func WriteFile(path string, draw func(w io.Writer, format string) error) error {
	format, err := FormatOf(path)
	if err != nil {
		return err
	}
	return atomicfile.Write(path, func(w io.Writer) error { return draw(w, format) })
}
