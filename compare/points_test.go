package compare

import (
	"math"
	"math/rand/v2"
	"testing"
)

// capRing returns a ring of n+1 points on the small circle at angular radius
// alpha (degrees) about (lon0, lat0), by rotating a circle about the pole.
func capRing(lon0, lat0, alpha float64, n int) [][2]float64 {
	ring := make([][2]float64, 0, n+1)
	c := unitVec(lon0, lat0)
	// Two unit vectors orthogonal to c.
	e1 := cross3(c, [3]float64{0, 0, 1})
	if dot3(e1, e1) < 1e-12 {
		e1 = [3]float64{1, 0, 0}
	}
	l := math.Sqrt(dot3(e1, e1))
	for i := range e1 {
		e1[i] /= l
	}
	e2 := cross3(c, e1)
	sa, ca := math.Sincos(alpha * math.Pi / 180)
	for k := 0; k <= n; k++ {
		t := 2 * math.Pi * float64(k%n) / float64(n)
		st, ct := math.Sincos(t)
		var v [3]float64
		for i := range v {
			v[i] = ca*c[i] + sa*(ct*e1[i]+st*e2[i])
		}
		ring = append(ring, [2]float64{math.Atan2(v[1], v[0]) * 180 / math.Pi, math.Asin(v[2]) * 180 / math.Pi})
	}
	return ring
}

// TestDistanceToOutlinesCap: the distance from a cap's centre to its rim is
// the cap's angular radius (definition of a spherical cap), up to the
// sagitta of the polygon's chords, and a point at the pole is 90 - 20 degrees
// from a cap of radius 20 degrees on the equator.
func TestDistanceToOutlinesCap(t *testing.T) {
	ring := capRing(150, 10, 25, 720)
	d, err := DistanceToOutlines([][2]float64{{150, 10}, {150, 10 + 25}}, [][][2]float64{ring})
	if err != nil {
		t.Fatal(err)
	}
	if math.Abs(d[0]-25) > 0.01 {
		t.Errorf("centre to rim %g degrees, want 25", d[0])
	}
	if d[1] > 1e-6 {
		t.Errorf("point on the rim is %g degrees away, want 0", d[1])
	}
	d, _ = DistanceToOutlines([][2]float64{{0, 90}}, [][][2]float64{capRing(0, 0, 20, 720)})
	if math.Abs(d[0]-70) > 0.01 {
		t.Errorf("pole to equatorial cap rim %g degrees, want 70", d[0])
	}
}

// TestProximityPValues: points placed on the outline must give a small
// p-value, and points drawn uniformly at random must not (the null
// hypothesis of the test; the outside check).
func TestProximityPValues(t *testing.T) {
	rings := [][][2]float64{capRing(200, 0, 30, 120), capRing(20, -5, 20, 120)}
	var on [][2]float64
	for i := 0; i < 30; i++ {
		r := rings[i%2]
		on = append(on, r[(i*37)%(len(r)-1)])
	}
	res, err := TestProximity(on, rings, 200, 3)
	if err != nil {
		t.Fatal(err)
	}
	if res.PValue > 0.01 {
		t.Errorf("points on the outline: p = %g, want <= 0.01", res.PValue)
	}
	if res.MeanDistance > 1e-6 {
		t.Errorf("points on the outline have mean distance %g", res.MeanDistance)
	}
	rng := rand.New(rand.NewPCG(5, 5))
	var rnd [][2]float64
	for i := 0; i < 30; i++ {
		rnd = append(rnd, [2]float64{360 * rng.Float64(), math.Asin(2*rng.Float64()-1) * 180 / math.Pi})
	}
	res2, _ := TestProximity(rnd, rings, 200, 4)
	t.Logf("on outline p = %g; random p = %g", res.PValue, res2.PValue)
	if res2.PValue < 0.05 {
		t.Errorf("random points: p = %g, want not small", res2.PValue)
	}
	if math.Abs(res2.RandomMean-res.RandomMean) > 3*res.RandomStd {
		t.Errorf("null distributions of two runs differ: %g vs %g", res.RandomMean, res2.RandomMean)
	}
}
