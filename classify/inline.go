package classify

import (
	"errors"
	"fmt"
	"math"
	"slices"
	"strconv"
	"strings"

	"github.com/spade-detect/spade/features"
)

// ErrInline is the cause of every inline-reading error.
var ErrInline = errors.New("bad reading")

// ParseInline reads one reading as typed in the field: per frequency
// HZ=PHASE/AMP, separated by commas, semicolons, spaces or tabs, with
// optional id=N for the display ID, depth=CM for the depth (the ordnance
// screen then judges by apparent size) and gHZ=PHASE/AMP for a bare-ground
// reading beside it:
//
//	4.3k=111.8/0.100, 9.7k=129.0/0.170, 21.7k=147.5/0.232, 36.3k=163.2/0.263, id=60
//
// Frequencies take the dig log's forms (5000, 5k) and may end in Hz
// (5kHz). Numbers are parsed strictly: "0.1O" (a letter O) is refused,
// naming the character, never read as 0.1.
func ParseInline(s string) (*features.Dig, error) {
	d := &features.Dig{ID: "reading", DisplayID: math.NaN(), DepthCM: math.NaN()}
	var ground []features.Reading
	fields := strings.FieldsFunc(s, func(r rune) bool { return r == ',' || r == ' ' || r == ';' || r == '\t' })
	if len(fields) == 0 {
		return nil, fmt.Errorf("%w: empty (want e.g. 4.3k=111.8/0.10, 21.7k=147.5/0.23)", ErrInline)
	}
	for _, f := range fields {
		key, val, ok := strings.Cut(f, "=")
		if !ok {
			return nil, fmt.Errorf("%w: %q is not HZ=PHASE/AMP or id=N", ErrInline, f)
		}
		key = strings.ToLower(strings.TrimSpace(key))
		if key == "id" || key == "depth" {
			v, err := inlineNumber(val)
			if err != nil {
				return nil, fmt.Errorf("%w: %s=%q: %w", ErrInline, key, val, err)
			}
			if key == "id" {
				d.DisplayID = v
			} else if v < 0 {
				return nil, fmt.Errorf("%w: depth=%q: a depth is >= 0 (in cm)", ErrInline, val)
			} else {
				d.DepthCM = v
			}
			continue
		}
		isGround := strings.HasPrefix(key, "g")
		hz, err := features.ParseHz(strings.TrimSuffix(strings.TrimPrefix(key, "g"), "hz"))
		if err != nil {
			return nil, fmt.Errorf("%w: %q: %w", ErrInline, f, err)
		}
		ph, amp, ok := strings.Cut(val, "/")
		if !ok {
			return nil, fmt.Errorf("%w: %q: want PHASE/AMP after =", ErrInline, f)
		}
		p, err := inlineNumber(ph)
		if err != nil {
			return nil, fmt.Errorf("%w: %q: phase: %w", ErrInline, f, err)
		}
		a, err := inlineNumber(amp)
		if err != nil || !(a > 0) {
			if err == nil {
				err = fmt.Errorf("must be > 0, got %v", a)
			}
			return nil, fmt.Errorf("%w: %q: amplitude: %w", ErrInline, f, err)
		}
		r := features.FromPolar(hz, p, a)
		list := &d.Readings
		if isGround {
			list = &ground
		}
		for _, prev := range *list {
			if prev.Hz == hz {
				return nil, fmt.Errorf("%w: %d Hz given twice", ErrInline, hz)
			}
		}
		*list = append(*list, r)
	}
	if len(d.Readings) == 0 {
		return nil, fmt.Errorf("%w: no HZ=PHASE/AMP reading", ErrInline)
	}
	byHz := func(a, b features.Reading) int { return a.Hz - b.Hz }
	slices.SortFunc(d.Readings, byHz)
	if ground != nil {
		slices.SortFunc(ground, byHz)
		if len(ground) != len(d.Readings) {
			return nil, fmt.Errorf("%w: the ground reading must cover the same frequencies", ErrInline)
		}
		for i := range ground {
			if ground[i].Hz != d.Readings[i].Hz {
				return nil, fmt.Errorf("%w: the ground reading must cover the same frequencies", ErrInline)
			}
		}
		d.Ground = ground
	}
	return d, nil
}

// inlineNumber parses a whole field as a finite number, naming the first
// character that is not part of one.
func inlineNumber(s string) (float64, error) {
	s = strings.TrimSpace(s)
	v, err := strconv.ParseFloat(s, 64)
	if err == nil && !math.IsNaN(v) && !math.IsInf(v, 0) {
		return v, nil
	}
	for i, r := range s {
		if !strings.ContainsRune("0123456789.+-eE", r) {
			return 0, fmt.Errorf("%q is not a number: character %q at position %d", s, r, i+1)
		}
	}
	return 0, fmt.Errorf("%q is not a finite number", s)
}
