package compare

import (
	"encoding/json"
	"math"
	"math/rand/v2"
	"testing"

	"cmbflux/flux/sh"
)

// twoProvinces returns a degree-lmax expansion dominated by Y_22, with two
// antipodal equatorial lows at longitudes lon0 and lon0 + 180, plus small
// random structure.
func twoProvinces(lmax int, lon0 float64, seed uint64) *sh.Coeffs {
	c := sh.NewCoeffs(lmax, sh.Canonical)
	rng := rand.New(rand.NewPCG(seed, 1))
	for l := 1; l <= lmax; l++ {
		for m := 0; m <= l; m++ {
			s := 0.0
			if m > 0 {
				s = 2e-4 * rng.NormFloat64()
			}
			c.Set(l, m, 2e-4*rng.NormFloat64(), s)
		}
	}
	// C Y_22^c + S Y_22^s is proportional to sin^2(colat) a cos(2 (lon -
	// lon0)) for C = a cos(2 lon0), S = a sin(2 lon0); with a < 0 its lows
	// are at lon0 and lon0 + 180.
	a := -0.03
	c.Set(2, 2, a*math.Cos(2*lon0*math.Pi/180), a*math.Sin(2*lon0*math.Pi/180))
	return c
}

// TestAnalyzeSelfAndNegative: a field's correlation with itself is 1 at
// every degree and in total, and with its negative -1 (definition of the
// correlation coefficient; the outside check).
func TestAnalyzeSelfAndNegative(t *testing.T) {
	a := twoProvinces(8, 0, 1)
	neg := a.Clone()
	for i := range neg.C {
		neg.C[i], neg.S[i] = -neg.C[i], -neg.S[i]
	}
	res, err := Analyze([]Model{{Name: "a", Coeffs: a}, {Name: "a-again", Coeffs: a.Clone()}, {Name: "minus-a", Coeffs: neg}}, Options{})
	if err != nil {
		t.Fatal(err)
	}
	if len(res.Pairs) != 3 {
		t.Fatalf("%d pairs, want 3", len(res.Pairs))
	}
	check := func(p Pair, want float64) {
		t.Helper()
		for _, d := range p.ByDegree {
			if !d.Defined || math.Abs(d.R-want) > 1e-14 {
				t.Errorf("%v degree %d: r = %v, want %v", p.Names, d.L, d.R, want)
			}
		}
		if math.Abs(p.Total-want) > 1e-14 || math.Abs(p.Weighted-want) > 1e-14 {
			t.Errorf("%v: total %v weighted %v, want %v", p.Names, p.Total, p.Weighted, want)
		}
	}
	check(res.Pairs[0], 1)
	check(res.Pairs[1], -1)
	check(res.Pairs[2], -1)
	if _, err := json.Marshal(res); err != nil {
		t.Fatalf("result does not encode as JSON: %v", err)
	}
}

// TestAnalyzeProvinces: two models with the same two antipodal slow
// provinces, shifted by 10 degrees in longitude, correlate strongly at
// degree 2 (r_2 = cos(2 * 10 deg) for pure Y_22 patterns, since the shift
// turns the (cos, sin) pair of order 2 by 20 degrees), their slow regions
// are nearly antipodal, and the vote map gives both votes at the provinces.
func TestAnalyzeProvinces(t *testing.T) {
	a := twoProvinces(6, 0, 2)
	b := twoProvinces(6, 10, 3)
	res, err := Analyze([]Model{{Name: "a", Coeffs: a}, {Name: "b", Coeffs: b}}, Options{Step: 2, Level: -0.015})
	if err != nil {
		t.Fatal(err)
	}
	r2 := res.Pairs[0].ByDegree[1]
	if r2.L != 2 || math.Abs(r2.R-math.Cos(20*math.Pi/180)) > 0.02 {
		t.Errorf("r_2 = %v, want about cos(20 deg) = %.3f", r2, math.Cos(20*math.Pi/180))
	}
	if r2.Confidence < 0.95 {
		t.Errorf("r_2 = %.3f significant only at %.3f", r2.R, r2.Confidence)
	}
	for _, m := range res.Models {
		if len(m.Regions) < 2 {
			t.Fatalf("model %s: %d slow regions, want 2", m.Name, len(m.Regions))
		}
		if !m.HasAntipodality || m.Antipodality < 170 {
			t.Errorf("model %s: centroids %.1f degrees apart, want nearly antipodal", m.Name, m.Antipodality)
		}
		if m.RMS <= 0 || m.SlowFraction <= 0 || m.SlowFraction >= 0.5 {
			t.Errorf("model %s: rms %g, slow fraction %g", m.Name, m.RMS, m.SlowFraction)
		}
	}
	// At the equator, longitude 4 (between the two models' lows at 0 and 10),
	// both models are slow: two votes by area and by cluster.
	j := len(res.Grid.Lat) / 2
	i := 2 // longitude 4 degrees
	k := j*len(res.Grid.Lon) + i
	if res.Grid.Lat[j] != 0 || res.Grid.Lon[i] != 4 {
		t.Fatalf("grid point (%g, %g), want (4, 0)", res.Grid.Lon[i], res.Grid.Lat[j])
	}
	if res.Votes[k] != 2 || res.ClusterVotes[k] != 2 {
		t.Errorf("votes at (4, 0): %d by area, %d by cluster; want 2 and 2", res.Votes[k], res.ClusterVotes[k])
	}
	// At the pole neither model is slow.
	if res.Votes[0] != 0 {
		t.Errorf("votes at the north pole: %d, want 0", res.Votes[0])
	}
	if len(res.Critical) != 2 || res.Critical[0].OneSided[1] < 0.80 || res.Critical[0].OneSided[1] > 0.81 {
		t.Errorf("critical r at l = 2, 95 %%: %v (want 0.805, shared/references.md)", res.Critical[0].OneSided)
	}
}

// TestAnalyzeProfiles: with depth profiles that share the provinces at
// every depth, the profile clustering puts the provinces in the slow cluster
// (cluster analysis of Lekic et al. 2012 on profiles).
func TestAnalyzeProfiles(t *testing.T) {
	a := twoProvinces(6, 0, 4)
	b := twoProvinces(6, 10, 5)
	prof := func(c *sh.Coeffs) []*sh.Coeffs {
		var p []*sh.Coeffs
		for _, f := range []float64{0.5, 0.8, 1} {
			d := c.Clone()
			for i := range d.C {
				d.C[i] *= f
				d.S[i] *= f
			}
			p = append(p, d)
		}
		return p
	}
	res, err := Analyze([]Model{{"a", a, prof(a)}, {"b", b, prof(b)}}, Options{Step: 2})
	if err != nil {
		t.Fatal(err)
	}
	j := len(res.Grid.Lat) / 2
	k := j*len(res.Grid.Lon) + 2
	// Longitude 94 on the equator lies between the fast maxima of the two
	// models (at 90 and 100 degrees).
	fast := j*len(res.Grid.Lon) + 47
	if res.ClusterVotes[k] != 2 || res.ClusterVotes[fast] != 0 {
		t.Errorf("cluster votes at (4, 0) %d (want 2), at (94, 0) %d (want 0)", res.ClusterVotes[k], res.ClusterVotes[fast])
	}
}
