package config

import (
	"math"
	"strings"
	"testing"
)

func TestParsePattern(t *testing.T) {
	terms, err := ParsePattern(" 2:2:cos:1 , 1:0:cos:0.3,3:1:sin")
	if err != nil {
		t.Fatal(err)
	}
	if got := PatternText(terms); got != "2:2:cos:1,1:0:cos:0.3,3:1:sin:1" {
		t.Errorf("PatternText = %q", got)
	}
	for _, bad := range []string{"", ",", "2", "2:3", "0:0", "2:0:sin", "2:2:tan", "2:2:cos:NaN", "1001:0", "1:0:0,2:2:0"} {
		if _, err := ParsePattern(bad); err == nil {
			t.Errorf("ParsePattern(%q) accepted", bad)
		}
	}
}

// FuzzParsePattern feeds --pattern arbitrary text: it returns an error or
// valid terms that PatternText writes back to the same terms.
func FuzzParsePattern(f *testing.F) {
	for _, s := range []string{"2:2:cos", "2:2:cos:1,1:0:cos:0.3", "3:1:sin:-0.5", "1:0:c:2", ",", "2:2:cos:1e308", "1:1:s:s:1", "5:5:0"} {
		f.Add(s)
	}
	f.Fuzz(func(t *testing.T, s string) {
		terms, err := ParsePattern(s)
		if err != nil {
			if strings.TrimSpace(err.Error()) == "" {
				t.Fatalf("%q: empty error", s)
			}
			return
		}
		nonzero := false
		for _, x := range terms {
			if x.L < 1 || x.L > 1000 || x.M < 0 || x.M > x.L || (x.Sin && x.M == 0) || math.IsNaN(x.Weight) || math.IsInf(x.Weight, 0) {
				t.Fatalf("%q: invalid term %+v", s, x)
			}
			nonzero = nonzero || x.Weight != 0
		}
		if !nonzero {
			t.Fatalf("%q: all weights zero accepted", s)
		}
		again, err := ParsePattern(PatternText(terms))
		if err != nil || len(again) != len(terms) {
			t.Fatalf("%q: PatternText %q does not read back: %v", s, PatternText(terms), err)
		}
		for i := range terms {
			if again[i] != terms[i] {
				t.Fatalf("%q: term %d reads back as %+v, was %+v", s, i, again[i], terms[i])
			}
		}
	})
}
