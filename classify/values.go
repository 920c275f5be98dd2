package classify

import (
	"errors"
	"fmt"
	"math"
	"os"
	"slices"
	"strings"

	"github.com/BurntSushi/toml"
	"github.com/spade-detect/spade/features"
)

// Values is the user's own worth of finds, from a TOML values file:
//
//	cost_per_dig = 1.0          # the effort of one dig, in your unit
//	hazard_threshold = 0.01     # caution at this probability of a hazard
//	hazards = ["ordnance"]      # classes, materials or shapes never to dig
//	keep = ["lead/shot"]        # optional: keepers beyond those worth > cost
//	[value]                     # by "material/shape", by material or by shape
//	"gold/ring" = 300
//	silver = 40
//	coin = 15
//
// A class's value is its own entry, else its material's, else its shape's,
// else 0. A keeper, for the dig-saving figures, is a class worth more than a
// dig costs, or one listed in keep.
type Values struct {
	CostPerDig      float64            `toml:"cost_per_dig"`
	HazardThreshold float64            `toml:"hazard_threshold"`
	Hazards         []string           `toml:"hazards"`
	Keep            []string           `toml:"keep"`
	Value           map[string]float64 `toml:"value"`
	// source is the values file's name; empty for DefaultValues, which
	// give no dig verdict.
	source string
}

// Given reports whether the values come from a values file: without one
// there is no worth to weigh, so no dig verdict.
func (v *Values) Given() bool { return v.source != "" }

// DefaultHazardThreshold is the caution threshold when none is given.
const DefaultHazardThreshold = 0.01

// DefaultValues holds no values, a cost of 1 and the default hazard rule.
func DefaultValues() *Values {
	return &Values{CostPerDig: 1, HazardThreshold: DefaultHazardThreshold, Hazards: []string{"ordnance"}, Value: map[string]float64{}}
}

// MaxHazardThreshold is the largest hazard_threshold allowed: above a half
// a reading whose likeliest class is a hazard could go without a caution.
const MaxHazardThreshold = 0.5

// CheckHazardThreshold refuses a threshold outside (0, 0.5]. Written so
// that NaN fails: a NaN threshold would silence the caution for good.
func CheckHazardThreshold(t float64) error {
	if t > 0 && t <= MaxHazardThreshold {
		return nil
	}
	return fmt.Errorf("hazard_threshold is a fraction: 0.01 means 1 %%, and it must be above 0 and at most %v; got %v", MaxHazardThreshold, t)
}

// ErrValues is the cause of every values-file error.
var ErrValues = errors.New("bad values file")

// LoadValues reads a values file. Errors name the file and, for syntax, the
// line and column; an unknown key is an error, not silently ignored.
func LoadValues(path string) (*Values, error) {
	data, err := os.ReadFile(path)
	if err != nil {
		return nil, fmt.Errorf("cannot read values file %s: %w", path, features.PathCause(err))
	}
	return ParseValues(path, string(data))
}

// ParseValues reads a values file's text; name is used in errors.
func ParseValues(name, text string) (*Values, error) {
	v := DefaultValues()
	v.CostPerDig = 0
	v.Hazards = nil
	v.source = name
	md, err := toml.Decode(text, v)
	if err != nil {
		var pe toml.ParseError
		if errors.As(err, &pe) {
			return nil, fmt.Errorf("%s:%d:%d: %w: %s", name, pe.Position.Line, pe.Position.Col, ErrValues, pe.Message)
		}
		return nil, fmt.Errorf("%s: %w: %w", name, ErrValues, err)
	}
	if und := md.Undecoded(); len(und) > 0 {
		return nil, fmt.Errorf("%s: %w: unknown key %q", name, ErrValues, und[0].String())
	}
	if !md.IsDefined("cost_per_dig") {
		v.CostPerDig = 1
	}
	if !md.IsDefined("hazards") {
		v.Hazards = []string{"ordnance"}
	}
	if !md.IsDefined("hazard_threshold") {
		v.HazardThreshold = DefaultHazardThreshold
	}
	if err := CheckHazardThreshold(v.HazardThreshold); err != nil {
		return nil, fmt.Errorf("%s: %w: %w", name, ErrValues, err)
	}
	// Written so that NaN fails: TOML accepts nan and inf as floats.
	if !(v.CostPerDig >= 0) || math.IsInf(v.CostPerDig, 0) {
		return nil, fmt.Errorf("%s: %w: cost_per_dig must be a finite number >= 0, got %v", name, ErrValues, v.CostPerDig)
	}
	// Keys in sorted order, so that whatever is said is said the same way
	// every run.
	keys := make([]string, 0, len(v.Value))
	for k := range v.Value {
		keys = append(keys, k)
	}
	slices.Sort(keys)
	norm := map[string]float64{}
	raw := map[string]string{}
	for _, k := range keys {
		x := v.Value[k]
		if math.IsNaN(x) || math.IsInf(x, 0) {
			return nil, fmt.Errorf("%s: %w: value of %q must be a finite number, got %v", name, ErrValues, k, x)
		}
		n := normaliseName(k)
		if prev, ok := raw[n]; ok {
			return nil, fmt.Errorf("%s: %w: keys %q and %q differ only in case or spacing; keep one", name, ErrValues, prev, k)
		}
		raw[n] = k
		norm[n] = x
	}
	v.Value = norm
	for i := range v.Hazards {
		v.Hazards[i] = normaliseName(v.Hazards[i])
	}
	for i := range v.Keep {
		v.Keep[i] = normaliseName(v.Keep[i])
	}
	return v, nil
}

// normaliseName case-folds a class, material or shape name and trims it,
// with any spaces around the "/" of a joint class taken out.
func normaliseName(s string) string {
	m, sh, joint := strings.Cut(strings.ToLower(strings.TrimSpace(s)), "/")
	if !joint {
		return m
	}
	return strings.TrimSpace(m) + "/" + strings.TrimSpace(sh)
}

// CheckNames refuses values keys and keep names that name nothing the
// model knows: none of its classes, nor a material or shape of them. Such
// a name is most often a typo ("gold/rnig", "silvr"), which would change
// the expected value without a word; the message suggests the nearest
// known name. Hazards are not checked: a hazard the history has never met
// is still one. A model of materials or of shapes alone knows only half
// the names a values file may use, so for it only near misses of a known
// name are refused.
func (v *Values) CheckNames(source string, classes []string, label features.Label) error {
	known := map[string]bool{}
	for _, c := range classes {
		m, s := features.SplitClass(c)
		known[c], known[m], known[s] = true, true, true
	}
	names := make([]string, 0, len(known))
	for n := range known {
		names = append(names, n)
	}
	slices.Sort(names)
	check := func(what, n string) error {
		if known[n] {
			return nil
		}
		near, d := nearestName(n, names)
		if label != features.LabelBoth && d > 2 {
			return nil
		}
		msg := fmt.Sprintf("%s %q names no class, material or shape of this model", what, n)
		if d <= 2 {
			msg += fmt.Sprintf("; did you mean %q?", near)
		} else {
			msg += fmt.Sprintf(" (it knows %s)", strings.Join(names, ", "))
		}
		return fmt.Errorf("%s: %w: %s", source, ErrValues, msg)
	}
	keys := make([]string, 0, len(v.Value))
	for k := range v.Value {
		keys = append(keys, k)
	}
	slices.Sort(keys)
	for _, k := range keys {
		if err := check("value key", k); err != nil {
			return err
		}
	}
	for _, k := range v.Keep {
		if err := check("keep name", k); err != nil {
			return err
		}
	}
	return nil
}

// nearestName is the name at the least edit distance from s (Levenshtein,
// "Binary codes capable of correcting deletions, insertions, and
// reversals", 1966), the first in order on a tie.
func nearestName(s string, names []string) (string, int) {
	best, bd := "", math.MaxInt
	for _, n := range names {
		if d := features.EditDistance(s, n); d < bd {
			best, bd = n, d
		}
	}
	return best, bd
}

// ValueOf is a class's worth: its own entry, else its material's, else its
// shape's, else 0.
func (v *Values) ValueOf(class string) float64 {
	if x, ok := v.Value[class]; ok {
		return x
	}
	m, s := features.SplitClass(class)
	if x, ok := v.Value[m]; ok {
		return x
	}
	if x, ok := v.Value[s]; ok {
		return x
	}
	return 0
}

// matches reports whether a rule names the class, its material or its shape.
func matches(rules []string, class string) bool {
	m, s := features.SplitClass(class)
	return slices.Contains(rules, class) || slices.Contains(rules, m) || slices.Contains(rules, s)
}

// IsHazard reports whether a class is never to be dug.
func (v *Values) IsHazard(class string) bool { return matches(v.Hazards, class) }

// IsKeeper reports whether a class is worth more than a dig, or listed.
func (v *Values) IsKeeper(class string) bool {
	if v.IsHazard(class) {
		return false
	}
	return matches(v.Keep, class) || v.ValueOf(class) > v.CostPerDig
}

// Split sorts classes into keepers and hazards.
func (v *Values) Split(classes []string) (keepers, hazards []string) {
	for _, c := range classes {
		switch {
		case v.IsHazard(c):
			hazards = append(hazards, c)
		case v.IsKeeper(c):
			keepers = append(keepers, c)
		}
	}
	return keepers, hazards
}

// AddKeepers adds a comma-separated list of keeper names (classes,
// materials or shapes, as --keep gives them) to v's keepers, case-folded
// and trimmed. With no values (v nil) it starts from the default values at
// no cost a dig, so that the named keepers weigh and nothing else does; a
// list that names nothing leaves v as it is, nil included.
func AddKeepers(v *Values, list string) *Values {
	var names []string
	for _, k := range strings.Split(list, ",") {
		if k = strings.ToLower(strings.TrimSpace(k)); k != "" {
			names = append(names, k)
		}
	}
	if len(names) == 0 {
		return v
	}
	if v == nil {
		v = DefaultValues()
		v.CostPerDig = 0
	}
	v.Keep = append(v.Keep, names...)
	return v
}

// Roles splits classes into keepers and hazards by v. With no values (v
// nil) no class is a keeper unless the user names it, and the default
// hazards (any shape "ordnance") are still marked.
func Roles(v *Values, classes []string) (keepers, hazards []string) {
	if v == nil {
		_, hazards = DefaultValues().Split(classes)
		return nil, hazards
	}
	return v.Split(classes)
}
