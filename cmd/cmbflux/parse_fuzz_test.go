package main

import (
	"errors"
	"regexp"
	"testing"

	"cmbflux/cmd/cmbflux/internal/config"
)

// FuzzParseSpecs feeds the small parsers of the command line (--taper,
// --grid, --only, and the reading options --vref, --missing, --units,
// --vertical, --lon-name through config.Resolve) arbitrary text: they must return an error or a valid
// value, never panic.
func FuzzParseSpecs(f *testing.F) {
	for _, s := range []string{"none", "cos:8:12", "gauss:10", "gauss:0", "cos:12:8", "lonlat:1", "gauss:40", "equiangular:64", "lonlat:7", "3", "0,4,9", "2-5", "5-2", "-1", "1,,2", "-999,99999", "mean", "7.26", "km/s", "radius", ",", "NaN"} {
		f.Add(s)
	}
	f.Fuzz(func(t *testing.T, s string) {
		if w, err := taperWeights(s, 20); err == nil {
			if len(w) != 21 {
				t.Fatalf("taper %q: %d weights", s, len(w))
			}
			for l, x := range w {
				if !(x >= 0 && x <= 1) {
					t.Fatalf("taper %q: weight %g at degree %d", s, x, l)
				}
			}
		} else if !errors.Is(err, config.ErrBadConfig) {
			t.Fatalf("taper %q: error without ErrBadConfig: %v", s, err)
		}
		if !bigNumber.MatchString(s) { // large grids are slow to build, not wrong
			if g, err := parseGrid(s); err == nil && (g.Len() == 0 || g.Len() > 4000*8000) {
				t.Fatalf("grid %q: %d points", s, g.Len())
			} else if err != nil && !errors.Is(err, config.ErrBadConfig) {
				t.Fatalf("grid %q: error without ErrBadConfig: %v", s, err)
			}
		}
		for _, key := range []string{"vref", "missing", "units", "vertical", "lon-name"} {
			set := config.Set{}
			err := set.SetFlag(key, s)
			if err == nil {
				if err = set.SetFlag("demo", "true"); err != nil {
					t.Fatal(err)
				}
				if err = set.SetFlag("quantity", "dvs"); err != nil {
					t.Fatal(err)
				}
				var sp *config.Spec
				if sp, err = config.Resolve(set); err == nil {
					if sp.VRef < 0 || sp.VRef >= 20 || (key == "missing" && len(sp.Missing) == 0) {
						t.Fatalf("--%s %q: vref %g, missing %v", key, s, sp.VRef, sp.Missing)
					}
					for _, m := range sp.Missing {
						if m != m {
							t.Fatalf("--missing %q gave NaN", s)
						}
					}
				}
			}
			if err != nil && !errors.Is(err, config.ErrBadConfig) {
				t.Fatalf("--%s %q: error without ErrBadConfig: %v", key, s, err)
			}
		}
		if idx, err := parseIndices(s, 12); err == nil {
			for _, i := range idx {
				if i < 0 || i >= 12 {
					t.Fatalf("--only %q gave index %d of 12", s, i)
				}
			}
		} else if exitCode(err) != 2 {
			t.Fatalf("--only %q: error %v exits with %d, want 2", s, err, exitCode(err))
		}
	})
}

var bigNumber = regexp.MustCompile(`[0-9]{4}|[0-9]e|\.[0-9]{3}`)
