package compare

import (
	"fmt"
	"math"

	"gonum.org/v1/gonum/stat/distuv"
)

// DegreesOfFreedom returns the number of degrees of freedom of the Student's
// t statistic for the correlation of two degree-l expansions: the 2l+1
// coefficient pairs less 2, nu = 2l - 1 (Eckhardt 1984, Math. Geology 16,
// 155). It panics for l < 1.
func DegreesOfFreedom(l int) int {
	if l < 1 {
		panic("compare: degree correlation needs l >= 1")
	}
	return 2*l - 1
}

// CriticalR returns the smallest correlation coefficient that is significant
// at confidence level conf (e.g. 0.95) for degree l, from Student's t with
// nu = 2l - 1 degrees of freedom (Eckhardt 1984):
//
//	t = r sqrt(nu / (1 - r^2))  =>  r_c = t_c / sqrt(nu + t_c^2),
//
// with t_c the conf quantile (one-sided test) or the (1+conf)/2 quantile
// (two-sided test). It returns an error for conf outside (0, 1).
func CriticalR(l int, conf float64, twoSided bool) (float64, error) {
	if !(conf > 0 && conf < 1) {
		return 0, fmt.Errorf("compare: confidence level %g outside (0, 1); give e.g. 0.95", conf)
	}
	nu := float64(DegreesOfFreedom(l))
	p := conf
	if twoSided {
		p = (1 + conf) / 2
	}
	tc := distuv.StudentsT{Mu: 0, Sigma: 1, Nu: nu}.Quantile(p)
	return tc / math.Sqrt(nu+tc*tc), nil
}

// Significance returns the confidence level at which a degree-l correlation r
// is significant in a one-sided test for positive correlation: the
// cumulative probability of Student's t with nu = 2l - 1 at
// t = r sqrt(nu / (1 - r^2)) (Eckhardt 1984). |r| >= 1 gives 1 or 0.
func Significance(l int, r float64) float64 {
	if r >= 1 {
		return 1
	}
	if r <= -1 {
		return 0
	}
	nu := float64(DegreesOfFreedom(l))
	t := r * math.Sqrt(nu/(1-r*r))
	return distuv.StudentsT{Mu: 0, Sigma: 1, Nu: nu}.CDF(t)
}

// SignificanceN returns the one-sided confidence level at which a
// correlation r between n pairs of values is significantly positive, from
// Student's t with nu = n - 2 degrees of freedom, t = r sqrt(nu / (1 - r^2))
// (the test of a Pearson correlation, e.g. Press et al. 2007, Numerical
// Recipes 3rd ed., section 14.5). Treating the coefficients of an expansion
// as independent samples, as is common practice for total correlations, n is
// the number of coefficients compared. It panics for n < 3.
func SignificanceN(n int, r float64) float64 {
	if n < 3 {
		panic("compare: a correlation test needs at least 3 pairs")
	}
	if r >= 1 {
		return 1
	}
	if r <= -1 {
		return 0
	}
	nu := float64(n - 2)
	t := r * math.Sqrt(nu/(1-r*r))
	return distuv.StudentsT{Mu: 0, Sigma: 1, Nu: nu}.CDF(t)
}
