package classify

import (
	"errors"
	"fmt"
	"math"
	"slices"
	"strings"

	"github.com/spade-detect/spade/features"
)

// ErrInline is the cause of every inline-reading error.
var ErrInline = errors.New("bad reading")

// ParseInline reads one reading as typed in the field: per frequency
// HZ=PHASE/AMP, separated by commas or spaces, with optional id=N for the
// display ID and gHZ=PHASE/AMP for a bare-ground reading beside it:
//
//	5k=111.8/0.100, 10k=129.0/0.170, 20k=147.5/0.232, 40k=163.2/0.263, id=60
//
// Frequencies take the dig log's forms (5000, 5k).
func ParseInline(s string) (*features.Dig, error) {
	d := &features.Dig{ID: "reading", DisplayID: math.NaN(), DepthCM: math.NaN()}
	var ground []features.Reading
	fields := strings.FieldsFunc(s, func(r rune) bool { return r == ',' || r == ' ' || r == ';' })
	if len(fields) == 0 {
		return nil, fmt.Errorf("%w: empty (want e.g. 5k=111.8/0.10, 20k=147.5/0.23)", ErrInline)
	}
	for _, f := range fields {
		key, val, ok := strings.Cut(f, "=")
		if !ok {
			return nil, fmt.Errorf("%w: %q is not HZ=PHASE/AMP or id=N", ErrInline, f)
		}
		key = strings.ToLower(strings.TrimSpace(key))
		if key == "id" {
			var v float64
			if _, err := fmt.Sscan(val, &v); err != nil || math.IsNaN(v) || math.IsInf(v, 0) {
				return nil, fmt.Errorf("%w: id=%q is not a number", ErrInline, val)
			}
			d.DisplayID = v
			continue
		}
		isGround := strings.HasPrefix(key, "g")
		hz, err := features.ParseHz(strings.TrimPrefix(key, "g"))
		if err != nil {
			return nil, fmt.Errorf("%w: %q: %v", ErrInline, f, err)
		}
		ph, amp, ok := strings.Cut(val, "/")
		if !ok {
			return nil, fmt.Errorf("%w: %q: want PHASE/AMP after =", ErrInline, f)
		}
		var p, a float64
		if _, err := fmt.Sscan(ph, &p); err != nil || math.IsNaN(p) || math.IsInf(p, 0) {
			return nil, fmt.Errorf("%w: %q: phase %q is not a number", ErrInline, f, ph)
		}
		if _, err := fmt.Sscan(amp, &a); err != nil || !(a > 0) || math.IsInf(a, 0) {
			return nil, fmt.Errorf("%w: %q: amplitude must be a number > 0, got %q", ErrInline, f, amp)
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
