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

// spadeBlue and oneNumberOrange draw spade and the detector's one number
// wherever the two are compared (Okabe & Ito's blue and orange, which stay
// apart under the common colour-vision deficiencies).
var (
	spadeBlue       = color.RGBA{0x00, 0x72, 0xB2, 0xFF}
	oneNumberOrange = color.RGBA{0xE6, 0x9F, 0x00, 0xFF}
)

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

// pictureTitle writes a title across the top of a picture of several
// panels and returns the canvas below it.
func pictureTitle(dc draw.Canvas, title string) draw.Canvas {
	font := plot.DefaultFont
	font.Size = vg.Points(12)
	dc.FillText(draw.TextStyle{Color: color.Black, Font: font, Handler: plot.DefaultTextHandler, XAlign: draw.XCenter},
		vg.Point{X: (dc.Min.X + dc.Max.X) / 2, Y: dc.Max.Y - vg.Points(16)}, title)
	dc.Max.Y -= vg.Points(24)
	return dc
}

// legendColumn draws leg in a column of its own at the right of dc, from
// the top, and returns the rest of dc for the data: a legend never covers
// what it explains.
func legendColumn(dc draw.Canvas, leg plot.Legend) draw.Canvas {
	leg.Top, leg.Left = true, true
	r := leg.Rectangle(dc)
	col := dc
	col.Min.X = dc.Max.X - (r.Max.X - r.Min.X) - vg.Points(8)
	col.Max.Y -= vg.Points(24)
	leg.Draw(col)
	rest := dc
	rest.Max.X = col.Min.X - vg.Points(8)
	return rest
}

// newLegend is a legend in spade's size.
func newLegend() plot.Legend {
	leg := plot.NewLegend()
	leg.TextStyle.Font.Size = 9
	leg.Padding = vg.Points(2)
	return leg
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
