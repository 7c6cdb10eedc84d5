package compare

import (
	"math/rand/v2"
	"testing"
)

// TestKMeansRecoversTwoBlobs: two well-separated Gaussian blobs (centres 10
// standard deviations apart) must be recovered exactly by k-means with
// k = 2 (the standard sanity check of the method, common practice), with
// the slower (lower) cluster numbered 0.
func TestKMeansRecoversTwoBlobs(t *testing.T) {
	rng := rand.New(rand.NewPCG(21, 22))
	var x [][]float64
	var truth []int
	for i := 0; i < 400; i++ {
		c := i % 2
		mu := []float64{-2, 0}
		if c == 1 {
			mu = []float64{1, 0.5}
		}
		x = append(x, []float64{mu[0] + 0.15*rng.NormFloat64(), mu[1] + 0.15*rng.NormFloat64()})
		truth = append(truth, c)
	}
	res, err := KMeans(x, nil, 2, 5, 1)
	if err != nil {
		t.Fatal(err)
	}
	for i := range x {
		if res.Labels[i] != truth[i] {
			t.Fatalf("point %d (%v) put in cluster %d, want %d", i, x[i], res.Labels[i], truth[i])
		}
	}
	if d := res.Centers[0][0] + 2; d*d > 0.01 {
		t.Errorf("slow centre at %v, want near (-2, 0)", res.Centers[0])
	}
	// Deterministic for a given seed.
	again, _ := KMeans(x, nil, 2, 5, 1)
	if again.Inertia != res.Inertia {
		t.Error("k-means not reproducible with the same seed")
	}
}

// TestKMeansWeights: a point with a large weight pulls its cluster centre
// onto itself (the weighted mean, by definition of the objective).
func TestKMeansWeights(t *testing.T) {
	x := [][]float64{{0}, {1}, {10}, {11}}
	w := []float64{1, 99, 1, 1}
	res, err := KMeans(x, w, 2, 3, 7)
	if err != nil {
		t.Fatal(err)
	}
	if got := res.Centers[0][0]; got < 0.98 || got > 0.995 {
		t.Errorf("weighted centre %g, want 0.99", got)
	}
	if _, err := KMeans(x, nil, 5, 1, 1); err == nil {
		t.Error("k larger than the number of points accepted")
	}
}
