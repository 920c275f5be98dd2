package features

import (
	"strings"
)

// Dig is one row of a dig log: a target's readings and, when labelled, what
// came out of the ground.
type Dig struct {
	ID       string
	Site     string
	Date     string // YYYY-MM-DD, or empty
	Material string // case-folded and trimmed; empty when unlabelled
	Shape    string
	DepthCM  float64 // NaN when not given
	// DisplayID is the single number the user's detector showed; NaN when
	// the log has no display_id column or the cell is empty.
	DisplayID float64
	Readings  []Reading // one per frequency, in the log's frequency order
	Ground    []Reading // nil, or one per frequency
	Line      int       // line in the source file where the row starts
}

// Labelled reports whether the dig carries the label that kind asks for.
func (d *Dig) Labelled(kind Label) bool {
	switch kind {
	case LabelMaterial:
		return d.Material != ""
	case LabelShape:
		return d.Shape != ""
	default:
		return d.Material != "" && d.Shape != ""
	}
}

// Class is the dig's class name for kind: the material, the shape, or the
// joint class written "material/shape".
func (d *Dig) Class(kind Label) string {
	switch kind {
	case LabelMaterial:
		return d.Material
	case LabelShape:
		return d.Shape
	default:
		return d.Material + "/" + d.Shape
	}
}

// Label says what a model learns to tell apart.
type Label string

// The label kinds.
const (
	LabelMaterial Label = "material"
	LabelShape    Label = "shape"
	LabelBoth     Label = "both"
)

// ParseLabel checks a --label value.
func ParseLabel(s string) (Label, bool) {
	switch Label(strings.ToLower(strings.TrimSpace(s))) {
	case LabelMaterial:
		return LabelMaterial, true
	case LabelShape:
		return LabelShape, true
	case LabelBoth, "":
		return LabelBoth, true
	}
	return "", false
}

// SplitClass splits a joint class "material/shape" into its parts; a class
// without a slash is returned as both parts.
func SplitClass(class string) (material, shape string) {
	if i := strings.IndexByte(class, '/'); i >= 0 {
		return class[:i], class[i+1:]
	}
	return class, class
}

// Log is a parsed dig history.
type Log struct {
	Name  string // file name as given, "-" for standard input
	Freqs []int  // ascending
	Digs  []Dig
	// HasDisplayID is true when the log has a display_id column and every
	// dig that was kept has a value in it.
	HasDisplayID bool
	// DisplayIDOnly is true for a log read with ReadOptions.DisplayIDOnly
	// that has no reading columns: Freqs is empty and so is every dig's
	// Readings.
	DisplayIDOnly bool
	HasGround     bool     // at least one dig carries a ground reading
	Ignored       []string // columns kept out of the model
	Bad           []*ParseError
	Unlabelled    int      // rows skipped under ReadOptions.SkipUnlabelled
	Notes         []string // remarks for the user (Reader.Notes)
	BlankRows     int      // empty rows skipped
}
