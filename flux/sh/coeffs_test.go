package sh

import (
	"errors"
	"math"
	"testing"
)

func TestValidate(t *testing.T) {
	good := randomCoeffs(4, Canonical, 1)
	if err := good.Validate(); err != nil {
		t.Fatalf("valid coefficients: %v", err)
	}
	bad := func(f func(c *Coeffs)) *Coeffs { c := good.Clone(); f(c); return c }
	for name, c := range map[string]*Coeffs{
		"short C":      bad(func(c *Coeffs) { c.C = c.C[:3] }),
		"S at m=0":     bad(func(c *Coeffs) { c.S[Index(2, 0)] = 1 }),
		"NaN":          bad(func(c *Coeffs) { c.C[Index(3, 1)] = math.NaN() }),
		"Inf":          bad(func(c *Coeffs) { c.S[Index(3, 2)] = math.Inf(-1) }),
		"negative max": {LMax: -1},
	} {
		if err := c.Validate(); err == nil {
			t.Errorf("%s: no error", name)
		}
	}
	big := NewCoeffs(UnnormalizedMaxDegree+1, Convention{Norm: Unnormalized})
	var de *DegreeError
	if err := big.Validate(); !errors.As(err, &de) {
		t.Errorf("unnormalized beyond degree %d: %v, want *DegreeError", UnnormalizedMaxDegree, err)
	}
}
