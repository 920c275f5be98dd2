package classify

import (
	"errors"
	"math"
	"testing"

	"github.com/spade-detect/spade/datasets"
)

func FuzzParseInline(f *testing.F) {
	for _, s := range []string{"4.3k=111.8/0.10, 9.7k=129.0/0.17, 21.7k=147.5/0.23, 36.3k=163.2/0.26, id=60",
		"5000=1/1 g5000=2/0.1", "id=1", "", "5k=/", "5k=1/1,,;;  10k=2/2"} {
		f.Add(s)
	}
	f.Fuzz(func(t *testing.T, s string) {
		d, err := ParseInline(s)
		if err != nil {
			if !errors.Is(err, ErrInline) {
				t.Fatalf("error without ErrInline: %v", err)
			}
			return
		}
		for i, r := range d.Readings {
			if !(r.Amp() > 0) || math.IsNaN(r.Phase()) || (i > 0 && r.Hz <= d.Readings[i-1].Hz) {
				t.Fatalf("reading %+v from %q", r, s)
			}
		}
	})
}

func FuzzParseValues(f *testing.F) {
	f.Add(string(datasets.DemoValues))
	f.Add("cost_per_dig = 1\n[value]\ngold = 3\n")
	f.Add("hazards = [\"ordnance\", \"steel\"]\nkeep = [\"lead/shot\"]\n")
	f.Add("hazard_threshold = nan\n")
	f.Add("cost_per_dig = inf\n[value]\ngold = -nan\n")
	f.Fuzz(func(t *testing.T, s string) {
		v, err := ParseValues("fuzz.toml", s)
		if err != nil {
			if !errors.Is(err, ErrValues) {
				t.Fatalf("error without ErrValues: %v", err)
			}
			return
		}
		// NaN must not get through: it would silence the caution.
		if CheckHazardThreshold(v.HazardThreshold) != nil || !(v.CostPerDig >= 0) || math.IsInf(v.CostPerDig, 0) {
			t.Fatalf("accepted %+v", v)
		}
		for k, x := range v.Value {
			if math.IsNaN(x) || math.IsInf(x, 0) {
				t.Fatalf("accepted value %s = %v", k, x)
			}
		}
		v.ValueOf("gold/ring")
		v.IsKeeper("gold/ring")
	})
}
