package classify

import (
	"errors"
	"strings"
	"testing"

	"github.com/spade-detect/spade/datasets"
	"github.com/spade-detect/spade/features"
)

func TestDemoValuesFile(t *testing.T) {
	v, err := ParseValues("values.toml", string(datasets.DemoValues))
	if err != nil {
		t.Fatal(err)
	}
	cases := map[string]float64{
		"gold/ring":   300, // its own entry
		"gold/coin":   250, // its material's
		"bronze/coin": 15,  // its shape's
		"iron/nail":   0,   // nothing
		"lead/shot":   4,
	}
	for class, want := range cases {
		if got := v.ValueOf(class); got != want {
			t.Errorf("%s: %v, want %v", class, got, want)
		}
	}
	if !v.IsHazard("steel/ordnance") || v.IsKeeper("steel/ordnance") || !v.IsKeeper("lead/shot") || v.IsKeeper("iron/nail") {
		t.Error("hazard and keeper rules")
	}
	if v.CostPerDig != 2 || v.HazardThreshold != 0.01 {
		t.Errorf("cost %v, threshold %v", v.CostPerDig, v.HazardThreshold)
	}
}

func TestValuesErrors(t *testing.T) {
	cases := []struct{ name, text, want string }{
		{"syntax", "cost_per_dig = \n", "syntax.toml:1:"},
		{"unknown key", "cost_per_dog = 3\n", `unknown key "cost_per_dog"`},
		{"threshold", "hazard_threshold = 2\n", "hazard_threshold"},
		{"type", "cost_per_dig = \"a lot\"\n", "type.toml"},
		// TOML has nan and inf; a NaN threshold would silence the caution.
		{"nan threshold", "hazard_threshold = nan\n", "hazard_threshold"},
		{"inf cost", "cost_per_dig = inf\n", "cost_per_dig"},
		{"nan value", "[value]\ngold = nan\n", `value of "gold"`},
	}
	for _, c := range cases {
		_, err := ParseValues(c.name+".toml", c.text)
		if !errors.Is(err, ErrValues) || !strings.Contains(err.Error(), c.want) {
			t.Errorf("%s: error %v, want %q", c.name, err, c.want)
		}
	}
	v, err := ParseValues("empty.toml", "")
	if err != nil || v.CostPerDig != 1 || v.HazardThreshold != DefaultHazardThreshold || !v.IsHazard("steel/ordnance") {
		t.Errorf("defaults: %+v, %v", v, err)
	}
}

func TestParseInline(t *testing.T) {
	d, err := ParseInline("20k=147.5/0.23, 5k=111.8/0.10 10000=129/0.17; id=60, g5k=3/0.01, g10k=3/0.01, g20k=2/0.01")
	if err != nil {
		t.Fatal(err)
	}
	if len(d.Readings) != 3 || d.Readings[0].Hz != 5000 || d.Readings[2].Hz != 20000 || d.DisplayID != 60 || len(d.Ground) != 3 {
		t.Errorf("parsed %+v", d)
	}
	for _, bad := range []string{"", "5k=111", "5k=abc/0.1", "5k=111/-1", "5k=1/1, 5k=2/1", "id=x, 5k=1/1", "5k=1/1, g10k=1/1", "hello"} {
		if _, err := ParseInline(bad); !errors.Is(err, ErrInline) {
			t.Errorf("%q: error %v", bad, err)
		}
	}
}

func TestParseInlineIsStrict(t *testing.T) {
	// Issues 13 and 14: "0.1O" (letter O) and "id=6O" were read as 0.1
	// and 6; a typo inside a reading is now refused, naming the character.
	for _, c := range []struct{ in, want string }{
		{"5k=111.8/0.1O", `character 'O' at position 4`},
		{"5k=111.8/0.1, id=6O", `character 'O' at position 2`},
		{"5k=11l.8/0.1", `character 'l' at position 3`},
		{"5k=111.8/0.1, depth=-3", "a depth is >= 0"},
	} {
		_, err := ParseInline(c.in)
		if !errors.Is(err, ErrInline) || !strings.Contains(err.Error(), c.want) {
			t.Errorf("%q: error %v, want %q", c.in, err, c.want)
		}
	}
	// Tabs, 5kHz and a depth are accepted.
	d, err := ParseInline("5kHz=111.8/0.10\t10kHz=129/0.17\tdepth=40")
	if err != nil || len(d.Readings) != 2 || d.Readings[1].Hz != 10000 || d.DepthCM != 40 {
		t.Errorf("parsed %+v, %v", d, err)
	}
}

func TestValuesKeysDifferingOnlyInCaseAreRefused(t *testing.T) {
	// Folded while ranging over a map, such keys made the verdict change
	// from run to run; now the same file always gives the same answer.
	for range 20 {
		_, err := ParseValues("v.toml", "[value]\nGold = 300\ngold = 0\n")
		if err == nil || !strings.Contains(err.Error(), `keys "Gold" and "gold" differ only in case or spacing`) {
			t.Fatalf("error %v", err)
		}
	}
	if _, err := ParseValues("v.toml", "[value]\n\"gold / ring\" = 3\n\"gold/ring\" = 4\n"); err == nil {
		t.Error("keys differing in spacing accepted")
	}
}

func TestValuesTyposAreRefusedWithASuggestion(t *testing.T) {
	classes := []string{"gold/ring", "iron/nail", "silver/coin"}
	cases := []struct {
		text, want string
	}{
		{"[value]\n\"gold/rnig\" = 300\n", `value key "gold/rnig" names no class, material or shape of this model; did you mean "gold/ring"?`},
		{"keep = [\"silvr\"]\n", `keep name "silvr" names no class, material or shape of this model; did you mean "silver"?`},
		{"[value]\nplatinum = 900\n", `(it knows coin, gold, gold/ring, iron, iron/nail, nail, ring, silver, silver/coin)`},
	}
	for _, c := range cases {
		v, err := ParseValues("v.toml", c.text)
		if err != nil {
			t.Fatal(err)
		}
		err = v.CheckNames("v.toml", classes, features.LabelBoth)
		if err == nil || !errors.Is(err, ErrValues) || !strings.Contains(err.Error(), c.want) {
			t.Errorf("%q: error %v, want %q", c.text, err, c.want)
		}
	}
	good, _ := ParseValues("v.toml", "keep = [\"Iron/Nail\"]\n[value]\ngold = 1\ncoin = 2\n\"silver/coin\" = 3\n")
	if err := good.CheckNames("v.toml", classes, features.LabelBoth); err != nil {
		t.Errorf("good names refused: %v", err)
	}
	// A material-only model does not know shapes: only near misses fail.
	mat, _ := ParseValues("v.toml", "[value]\ncoin = 2\nsilvr = 3\n")
	err := mat.CheckNames("v.toml", []string{"gold", "silver"}, features.LabelMaterial)
	if err == nil || !strings.Contains(err.Error(), `did you mean "silver"`) {
		t.Errorf("material model: %v", err)
	}
}

func TestHazardThresholdChecks(t *testing.T) {
	for _, text := range []string{"hazard_threshold = 1\n", "hazard_threshold = 0.99\n", "hazard_threshold = -0.2\n", "hazard_threshold = 0\n", "hazard_threshold = nan\n"} {
		if _, err := ParseValues("v.toml", text); err == nil || !strings.Contains(err.Error(), "hazard_threshold is a fraction: 0.01 means 1 %") {
			t.Errorf("%q: %v", text, err)
		}
	}
	v, err := ParseValues("v.toml", "cost_per_dig = 3\n")
	if err != nil || v.HazardThreshold != DefaultHazardThreshold {
		t.Errorf("default threshold %v, %v", v.HazardThreshold, err)
	}
}

// TestAddKeepers: --keep's list adds keepers, case-folded and trimmed, to a
// values file's or, with none, to values that weigh nothing else (no cost
// a dig, the default hazards); an empty list changes nothing.
func TestAddKeepers(t *testing.T) {
	if AddKeepers(nil, " , ") != nil {
		t.Error("an empty list made values")
	}
	v := AddKeepers(nil, " Gold , coin,,")
	if v == nil || len(v.Keep) != 2 || v.Keep[0] != "gold" || v.Keep[1] != "coin" || v.CostPerDig != 0 || !v.IsHazard("steel/ordnance") {
		t.Fatalf("keepers from nothing: %+v", v)
	}
	if !v.IsKeeper("gold/ring") || v.IsKeeper("iron/nail") {
		t.Error("gold/ring not a keeper, or iron/nail one")
	}
	file, err := ParseValues("v.toml", "cost_per_dig = 2.0\n[value]\n\"silver/ring\" = 60\n")
	if err != nil {
		t.Fatal(err)
	}
	if got := AddKeepers(file, "button"); got != file || !got.IsKeeper("brass/button") || !got.IsKeeper("silver/ring") || got.CostPerDig != 2 {
		t.Errorf("keepers added to a values file: %+v", got)
	}
}
