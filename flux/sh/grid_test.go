package sh

import (
	"math"
	"sort"
	"testing"

	"gonum.org/v1/gonum/integrate/quad"
	"gonum.org/v1/gonum/mat"
)

// TestGaussLegendreNodes compares nodes and weights with gonum's
// integrate/quad Legendre rule (Bogaert 2014, an independent,
// iteration-free algorithm) sorted to colatitude order. Weights are compared
// relative to the largest weight: near the poles both routes lose relative
// accuracy in 1 - x^2 (about 1e-11 at n = 1000), which changes any
// quadrature sum by less than 1e-15; elsewhere the two routes agree to a
// few 1e-14 of the largest weight.
func TestGaussLegendreNodes(t *testing.T) {
	const tolX, tolW = 1e-14, 5e-14
	for _, n := range []int{1, 2, 3, 10, 64, 101, 512, 1000} {
		g := NewGaussLegendre(n, 1)
		x := make([]float64, n)
		w := make([]float64, n)
		quad.Legendre{}.FixedLocations(x, w, -1, 1)
		// Ring i has x descending.
		sort.Sort(byXDesc{x, w})
		wmax := w[n/2]
		var sum float64
		for i := range n {
			gx, gw := x[i], w[i]
			if d := math.Abs(math.Cos(g.Colat[i]) - gx); d > tolX {
				t.Errorf("n=%d node %d: cos(colat) %.17g, gonum %.17g (diff %.2g)", n, i, math.Cos(g.Colat[i]), gx, d)
			}
			if d := math.Abs(g.Weight[i]-gw) / wmax; d > tolW {
				t.Errorf("n=%d weight %d: %.17g, gonum %.17g (rel diff %.2g)", n, i, g.Weight[i], gw, d)
			}
			sum += g.Weight[i]
		}
		// The weights integrate 1 over [-1, 1] (Abramowitz & Stegun 25.4.29).
		if math.Abs(sum-2) > 1e-13 {
			t.Errorf("n=%d: weights sum to %.17g, want 2", n, sum)
		}
	}
}

// TestDriscollHealyWeights checks the closed-form weights against their
// defining property: they integrate cos(k theta) sin(theta) over [0, pi]
// exactly for k = 0..n-1 (Driscoll & Healy 1994, Theorem 3), with
// integral = (1 + (-1)^k)/(1 - k^2) for k != 1 and 0 for k = 1
// (elementary integral, common practice).
func TestDriscollHealyWeights(t *testing.T) {
	const tol = 1e-14
	for _, n := range []int{2, 8, 34, 130} {
		g := NewDriscollHealy(n)
		if g.Colat[0] != 0 || g.Weight[0] != 0 {
			t.Errorf("n=%d: north pole ring at %v with weight %v, want 0 and 0", n, g.Colat[0], g.Weight[0])
		}
		for k := range n {
			var got float64
			for i, th := range g.Colat {
				got += g.Weight[i] * math.Cos(float64(k)*th)
			}
			want := 0.0
			if k != 1 {
				want = (1 + math.Pow(-1, float64(k))) / (1 - float64(k*k))
			}
			if math.Abs(got-want) > tol {
				t.Errorf("n=%d k=%d: quadrature %.17g, exact %.17g", n, k, got, want)
			}
		}
	}
}

// TestAreaWeights: the cell areas of a global cell-registered grid sum to
// 4 pi, each equals (cos theta_top - cos theta_bottom) 2 pi / nlon
// (spherical zone area, common practice); node-registered pole rings get
// the polar caps.
func TestAreaWeights(t *testing.T) {
	g := NewLonLat(90, 180, CellRegistered)
	w := g.AreaWeights()
	var sum float64
	for i, v := range w {
		sum += v * float64(g.NLon)
		top, bot := math.Pi*float64(i)/90, math.Pi*float64(i+1)/90
		if want := (math.Cos(top) - math.Cos(bot)) * 2 * math.Pi / 180; math.Abs(v-want) > 1e-15 {
			t.Errorf("ring %d area %.17g, want %.17g", i, v, want)
		}
	}
	if math.Abs(sum-4*math.Pi) > 1e-12 {
		t.Errorf("areas sum to %.15g, want 4 pi", sum)
	}
	n := NewLonLat(91, 180, NodeRegistered)
	wn := n.AreaWeights()
	if want := (1 - math.Cos(math.Pi/180)) * 2 * math.Pi / 180; math.Abs(wn[0]-want) > 1e-17 {
		t.Errorf("pole ring area %.17g, want cap %.17g", wn[0], want)
	}
	if n.Colat[0] != 0 || n.Colat[90] != math.Pi || n.Colat[45] != math.Pi/2 {
		t.Errorf("node-registered colatitudes %v %v %v", n.Colat[0], n.Colat[45], n.Colat[90])
	}
}

// TestMaxDegree checks the sampling limits documented on Grid.MaxDegree.
// For rings the limit is checked by rank (TestMaxDegreeRank).
func TestMaxDegree(t *testing.T) {
	for _, tc := range []struct {
		g    *Grid
		want int
	}{
		{NewGaussLegendre(64, 128), 63},
		{NewDriscollHealy(130), 64},
		{NewLonLat(90, 180, CellRegistered), 89},
		{NewLonLat(181, 360, NodeRegistered), 179},
		// Both poles: 17 rings away from the poles plus one.
		{NewLonLat(19, 72, NodeRegistered), 17},
		{NewRings([]float64{0, 0.5, 1, 1.5}, 72, 0), 3},
		{NewRings([]float64{0.5, 1, 1.5}, 72, 0), 2},
	} {
		if got := tc.g.MaxDegree(); got != tc.want {
			t.Errorf("%v %dx%d: MaxDegree %d, want %d", tc.g.Kind, tc.g.NLat(), tc.g.NLon, got, tc.want)
		}
	}
}

type byXDesc struct{ x, w []float64 }

func (s byXDesc) Len() int           { return len(s.x) }
func (s byXDesc) Less(i, j int) bool { return s.x[i] > s.x[j] }
func (s byXDesc) Swap(i, j int) {
	s.x[i], s.x[j] = s.x[j], s.x[i]
	s.w[i], s.w[j] = s.w[j], s.w[i]
}

// TestMaxDegreeRank checks Grid.MaxDegree of ring grids by linear algebra:
// on whole rings the least-squares problem splits by order (fit.go), and
// the order-m block, rings x degrees m..L with entries Pbar_lm(cos theta_i),
// must have full column rank for every m <= L. Pole rings vanish for m > 0,
// so with both poles present order 1 sees two rings fewer than order 0.
// The rank is read from the singular values (gonum/mat SVD; relative
// threshold 1e-10, common practice): full at MaxDegree, deficient above.
func TestMaxDegreeRank(t *testing.T) {
	fullRank := func(g *Grid, L int) bool {
		for m := 0; m <= L; m++ {
			a := mat.NewDense(g.NLat(), L-m+1, nil)
			for i, th := range g.Colat {
				p := Legendre(nil, L, th, Canonical)
				for l := m; l <= L; l++ {
					a.Set(i, l-m, p[Index(l, m)])
				}
			}
			if g.NLat() < L-m+1 {
				return false
			}
			var svd mat.SVD
			if !svd.Factorize(a, mat.SVDNone) {
				t.Fatal("SVD failed")
			}
			s := svd.Values(nil)
			if s[len(s)-1] <= 1e-10*s[0] {
				return false
			}
		}
		return true
	}
	for _, g := range []*Grid{
		NewLonLat(19, 72, NodeRegistered),
		NewLonLat(18, 72, CellRegistered),
		NewRings([]float64{0, 0.4, 0.9, 1.3, 2.0}, 72, 0),
		NewRings([]float64{0.4, 0.9, 1.3, 2.0, math.Pi}, 72, 0),
	} {
		L := g.MaxDegree()
		if !fullRank(g, L) {
			t.Errorf("%d rings from %v to %v: MaxDegree %d, but an order block is rank deficient there", g.NLat(), g.Colat[0], g.Colat[g.NLat()-1], L)
		}
		if fullRank(g, L+1) {
			t.Errorf("%d rings from %v to %v: MaxDegree %d, but degree %d is still determined", g.NLat(), g.Colat[0], g.Colat[g.NLat()-1], L, L+1)
		}
	}
}
