package features

import (
	"fmt"
	"math"
	"math/big"
	"slices"
	"strconv"
	"strings"
)

// columnKind says what a header column holds.
type columnKind int

const (
	colIgnored columnKind = iota
	colDig
	colSite
	colDate
	colMaterial
	colShape
	colDepth
	colDisplayID
	colPhase
	colAmp
	colX
	colR
	colGroundPhase
	colGroundAmp
	colGroundX
	colGroundR
)

var plainColumns = map[string]columnKind{
	"dig": colDig, "site": colSite, "date": colDate, "material": colMaterial,
	"shape": colShape, "depth_cm": colDepth, "display_id": colDisplayID,
}

// Longest prefixes first, so "ground_phase_" wins over "phase_".
var readingPrefixes = []struct {
	prefix string
	kind   columnKind
}{
	{"ground_phase_", colGroundPhase}, {"ground_amp_", colGroundAmp},
	{"ground_x_", colGroundX}, {"ground_r_", colGroundR},
	{"phase_", colPhase}, {"amp_", colAmp}, {"x_", colX}, {"r_", colR},
}

// ParseHz reads a frequency in integer hertz, accepting a k suffix:
// "8000", "8k" and "12.5k" are 8000, 8000 and 12500.
func ParseHz(s string) (int, error) {
	s = strings.ToLower(strings.Join(strings.Fields(s), ""))
	s = strings.ReplaceAll(s, "_", "")
	mult := int64(1)
	if t, ok := strings.CutSuffix(s, "hz"); ok {
		s = t
	}
	if t, ok := strings.CutSuffix(s, "k"); ok {
		s, mult = t, 1000
	}
	// As an exact decimal, so that 16.1k is 16100 Hz (16.1 × 1000 is not
	// a whole number in floating point).
	r, ok := new(big.Rat).SetString(s)
	if !ok || strings.ContainsAny(s, "/eExXoObB") {
		return 0, fmt.Errorf("%q is not a frequency in hertz", s)
	}
	r.Mul(r, new(big.Rat).SetInt64(mult))
	if !r.IsInt() || r.Sign() <= 0 || r.Cmp(new(big.Rat).SetInt64(1e9)) > 0 {
		return 0, fmt.Errorf("frequency %q must be a whole number of hertz > 0", s)
	}
	return int(r.Num().Int64()), nil
}

// classifyColumn names what one header cell holds.
func classifyColumn(name string) (columnKind, int, error) {
	// Spreadsheet headers: "Phase 5k", "phase 5 kHz", "Display ID".
	name = strings.Join(strings.Fields(name), "_")
	if k, ok := plainColumns[name]; ok {
		return k, 0, nil
	}
	for _, p := range readingPrefixes {
		if rest, ok := strings.CutPrefix(name, p.prefix); ok {
			hz, err := ParseHz(rest)
			if err != nil {
				return 0, 0, err
			}
			return p.kind, hz, nil
		}
	}
	return colIgnored, 0, nil
}

// freqColumns are the column indices of one frequency's reading, -1 if absent.
type freqColumns struct {
	phase, amp, x, r                         int
	groundPhase, groundAmp, groundX, groundR int
}

// schema is a parsed header.
type schema struct {
	index   map[columnKind]int // plain columns
	names   []string           // lower-cased header cells
	freqs   []int              // ascending
	perFreq map[int]*freqColumns
	ground  bool
	ignored []string
}

func newFreqColumns() *freqColumns {
	return &freqColumns{-1, -1, -1, -1, -1, -1, -1, -1}
}

func (f *freqColumns) slot(k columnKind) *int {
	switch k {
	case colPhase:
		return &f.phase
	case colAmp:
		return &f.amp
	case colX:
		return &f.x
	case colR:
		return &f.r
	case colGroundPhase:
		return &f.groundPhase
	case colGroundAmp:
		return &f.groundAmp
	case colGroundX:
		return &f.groundX
	default:
		return &f.groundR
	}
}

// parseHeader checks a header row; errors name the column.
func parseHeader(file string, line int, cells []string, displayIDOnly bool) (*schema, error) {
	herr := func(col string, err error) error { return &ParseError{File: file, Line: line, Column: col, Err: err} }
	s, err := placeColumns(cells, herr)
	if err != nil {
		return nil, err
	}
	for hz := range s.perFreq {
		s.freqs = append(s.freqs, hz)
	}
	// In order, so that of two faulty frequencies the lower is always the
	// one reported.
	slices.Sort(s.freqs)
	for _, hz := range s.freqs {
		ground, err := s.perFreq[hz].check(hz, herr)
		if err != nil {
			return nil, err
		}
		s.ground = s.ground || ground
	}
	if _, hasID := s.index[colDisplayID]; len(s.freqs) == 0 && !(hasID && displayIDOnly) {
		msg := "no reading columns (phase_<hz> and amp_<hz>, or x_<hz> and r_<hz>)"
		if hasID {
			msg += "; a log of display IDs only is read by spade overlap and spade evaluate, which need no phase"
		}
		return nil, herr("phase_<hz>", cause(ErrMissingColumn, "%s", msg))
	}
	if s.ground {
		for _, hz := range s.freqs {
			if fc := s.perFreq[hz]; fc.groundPhase < 0 && fc.groundX < 0 {
				return nil, herr(fmt.Sprintf("ground_phase_%d", hz), cause(ErrMissingColumn, "ground readings must cover the same frequencies as the target's"))
			}
		}
	}
	return s, nil
}

// placeColumns names each header cell's column and gives it its place:
// a per-dig column, a slot of its frequency, or ignored. An empty or
// repeated name, or two columns for one slot, is refused.
func placeColumns(cells []string, herr func(string, error) error) (*schema, error) {
	s := &schema{index: map[columnKind]int{}, perFreq: map[int]*freqColumns{}}
	seen := map[string]bool{}
	for i, c := range cells {
		name := strings.ToLower(strings.TrimSpace(c))
		s.names = append(s.names, name)
		if name == "" {
			return nil, herr(fmt.Sprintf("column %d", i+1), cause(ErrHeader, "empty column name"))
		}
		if seen[name] {
			return nil, herr(name, cause(ErrHeader, "column appears twice"))
		}
		seen[name] = true
		kind, hz, err := classifyColumn(name)
		if err != nil {
			return nil, herr(name, cause(ErrHeader, "%v", err))
		}
		switch {
		case kind == colIgnored:
			s.ignored = append(s.ignored, name)
		case hz == 0:
			s.index[kind] = i
		default:
			fc := s.perFreq[hz]
			if fc == nil {
				fc = newFreqColumns()
				s.perFreq[hz] = fc
			}
			slot := fc.slot(kind)
			if *slot >= 0 {
				return nil, herr(name, cause(ErrHeader, "same frequency as column %q", s.names[*slot]))
			}
			*slot = i
		}
	}
	return s, nil
}

// check refuses a frequency's columns that do not pair up: a target
// reading as phase/amp or x/r (not both, not half), and a ground reading
// likewise. It reports whether there is a ground reading.
func (fc *freqColumns) check(hz int, herr func(string, error) error) (ground bool, err error) {
	polar, comps := fc.phase >= 0 || fc.amp >= 0, fc.x >= 0 || fc.r >= 0
	switch {
	case polar && comps:
		return false, herr(fmt.Sprintf("phase_%d", hz), cause(ErrHeader, "give phase/amp or x/r at %d Hz, not both", hz))
	case !polar && !comps:
		return false, herr(fmt.Sprintf("phase_%d", hz), cause(ErrMissingColumn, "ground reading at %d Hz but no target reading", hz))
	case polar && (fc.phase < 0 || fc.amp < 0):
		return false, herr(fmt.Sprintf("amp_%d", hz), cause(ErrMissingColumn, "phase_%d and amp_%d go together", hz, hz))
	case comps && (fc.x < 0 || fc.r < 0):
		return false, herr(fmt.Sprintf("r_%d", hz), cause(ErrMissingColumn, "x_%d and r_%d go together", hz, hz))
	}
	gp, gc := fc.groundPhase >= 0 || fc.groundAmp >= 0, fc.groundX >= 0 || fc.groundR >= 0
	if (gp && (fc.groundPhase < 0 || fc.groundAmp < 0)) || (gc && (fc.groundX < 0 || fc.groundR < 0)) || (gp && gc) {
		return false, herr(fmt.Sprintf("ground_phase_%d", hz), cause(ErrHeader, "ground reading at %d Hz needs ground_phase/ground_amp or ground_x/ground_r", hz))
	}
	return gp || gc, nil
}

// parseNumber reads one numeric cell; the caller names the column.
func parseNumber(cell string) (float64, error) {
	v, err := strconv.ParseFloat(strings.TrimSpace(cell), 64)
	if err != nil {
		return 0, cause(ErrNotNumber, "got %q", cell)
	}
	if math.IsNaN(v) || math.IsInf(v, 0) {
		return 0, cause(ErrNotFinite, "got %s", strings.TrimSpace(cell))
	}
	return v, nil
}

// normaliseLabel case-folds and trims a material or shape.
func normaliseLabel(s string) string { return strings.ToLower(strings.TrimSpace(s)) }

// checkLabel refuses a "/" in a material or shape: spade writes a joint
// class as "material/shape", so "gold/plated" in the material column would
// split into the wrong material and shape, and be valued as them.
func checkLabel(s string) error {
	if strings.Contains(s, "/") {
		return cause(ErrLabelSlash, "got %q: spade joins material and shape with \"/\"; write it another way, such as %q", s, strings.ReplaceAll(s, "/", "-"))
	}
	return nil
}
