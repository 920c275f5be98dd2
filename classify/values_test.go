package classify

import (
	"errors"
	"strings"
	"testing"

	"github.com/spade-detect/spade/datasets"
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
