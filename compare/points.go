package compare

import (
	"fmt"
	"math"
	"math/rand/v2"
)

// unitVec returns the unit vector of the point at (lon, lat) degrees.
func unitVec(lon, lat float64) [3]float64 {
	sl, cl := math.Sincos(lat * math.Pi / 180)
	so, co := math.Sincos(lon * math.Pi / 180)
	return [3]float64{cl * co, cl * so, sl}
}

func dot3(a, b [3]float64) float64 { return a[0]*b[0] + a[1]*b[1] + a[2]*b[2] }

func cross3(a, b [3]float64) [3]float64 {
	return [3]float64{a[1]*b[2] - a[2]*b[1], a[2]*b[0] - a[0]*b[2], a[0]*b[1] - a[1]*b[0]}
}

// angle returns the angle in radians between unit vectors, accurate for
// small and large angles (atan2 of |a x b| and a.b).
func angle(a, b [3]float64) float64 {
	c := cross3(a, b)
	return math.Atan2(math.Sqrt(dot3(c, c)), dot3(a, b))
}

// arcDistance returns the angular distance (radians) from p to the shorter
// great-circle arc from a to b: the distance to the foot of the
// perpendicular when it falls inside the arc, else to the nearer end.
func arcDistance(p, a, b [3]float64) float64 {
	n := cross3(a, b)
	nn := math.Sqrt(dot3(n, n))
	if nn < 1e-15 {
		return angle(p, a)
	}
	for i := range n {
		n[i] /= nn
	}
	s := dot3(p, n)
	// Projection of p onto the plane of the great circle.
	q := [3]float64{p[0] - s*n[0], p[1] - s*n[1], p[2] - s*n[2]}
	if dot3(cross3(a, q), n) >= 0 && dot3(cross3(q, b), n) >= 0 {
		return math.Asin(math.Min(1, math.Abs(s)))
	}
	return math.Min(angle(p, a), angle(p, b))
}

// DistanceToOutlines returns, for each point (lon, lat in degrees), the
// angular distance in degrees to the nearest edge of any ring of the
// outlines (rings of (lon, lat) degrees joined by great-circle arcs; a ring
// is closed from its last vertex back to its first, as in package
// flux/contour, and a repeated closing vertex is harmless).
func DistanceToOutlines(points [][2]float64, rings [][][2]float64) ([]float64, error) {
	var segs [][2][3]float64
	for _, r := range rings {
		for i := range r {
			j := (i + 1) % len(r)
			if r[j] == r[i] {
				continue
			}
			segs = append(segs, [2][3]float64{unitVec(r[i][0], r[i][1]), unitVec(r[j][0], r[j][1])})
		}
	}
	if len(segs) == 0 {
		return nil, fmt.Errorf("compare: no outline edges to measure distances to")
	}
	out := make([]float64, len(points))
	for k, pt := range points {
		p := unitVec(pt[0], pt[1])
		best := math.Inf(1)
		for _, s := range segs {
			best = math.Min(best, arcDistance(p, s[0], s[1]))
		}
		out[k] = best * 180 / math.Pi
	}
	return out, nil
}

// ProximityTest is the result of a Monte Carlo test of whether points lie
// closer to the outlines than points placed at random.
type ProximityTest struct {
	// MeanDistance is the mean angular distance of the points to the
	// outlines, degrees.
	MeanDistance float64 `json:"mean_distance_deg"`
	// RandomMean and RandomStd describe the mean distance of the random
	// point sets, degrees.
	RandomMean float64 `json:"random_mean_deg"`
	RandomStd  float64 `json:"random_std_deg"`
	// PValue is the probability that a set of as many points, uniformly
	// distributed on the sphere, has a mean distance at most MeanDistance:
	// (1 + count) / (1 + trials), the unbiased Monte Carlo estimate of
	// Davison & Hinkley (1997, Bootstrap Methods, eq. 4.11).
	PValue float64 `json:"p_value"`
	// Trials is the number of random point sets.
	Trials int `json:"trials"`
}

// TestProximity compares the mean distance of the points to the outlines with
// that of trials sets of as many points drawn uniformly on the sphere
// (longitude uniform, sine of latitude uniform), with a fixed seed so the
// result is reproducible. A small p-value means the points lie closer to the
// outlines than chance would place them.
func TestProximity(points [][2]float64, rings [][][2]float64, trials int, seed uint64) (*ProximityTest, error) {
	if len(points) == 0 {
		return nil, fmt.Errorf("compare: no points to test")
	}
	if trials < 1 {
		return nil, fmt.Errorf("compare: need at least one Monte Carlo trial, got %d", trials)
	}
	d, err := DistanceToOutlines(points, rings)
	if err != nil {
		return nil, err
	}
	obs := mean(d)
	rng := rand.New(rand.NewPCG(seed, 0x2545f4914f6cdd1d))
	rp := make([][2]float64, len(points))
	var count int
	var s, ss float64
	for t := 0; t < trials; t++ {
		for i := range rp {
			rp[i] = [2]float64{360 * rng.Float64(), math.Asin(2*rng.Float64()-1) * 180 / math.Pi}
		}
		rd, _ := DistanceToOutlines(rp, rings)
		m := mean(rd)
		s += m
		ss += m * m
		if m <= obs {
			count++
		}
	}
	mu := s / float64(trials)
	return &ProximityTest{
		MeanDistance: obs,
		RandomMean:   mu,
		RandomStd:    math.Sqrt(math.Max(0, ss/float64(trials)-mu*mu)),
		PValue:       float64(1+count) / float64(1+trials),
		Trials:       trials,
	}, nil
}

func mean(x []float64) float64 {
	var s float64
	for _, v := range x {
		s += v
	}
	return s / float64(len(x))
}
