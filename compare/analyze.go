package compare

import (
	"fmt"
	"math"

	"cmbflux/flux/contour"
	"cmbflux/flux/sh"
)

// Model is one tomography model reduced to the comparison depth: the
// spherical-harmonic expansion of dlnVs (a fraction) in any convention.
type Model struct {
	Name   string
	Coeffs *sh.Coeffs
	// Profile optionally holds expansions of dlnVs at several depths (any
	// number, the same for every model is not required). When present, the
	// k-means cluster analysis runs on the depth profile at each map point
	// (Lekic et al. 2012) instead of on the single layer.
	Profile []*sh.Coeffs
}

// Options controls a comparison. The zero value asks for the defaults given
// beside each field.
type Options struct {
	// LMax is the common degree (default: the smallest LMax of the models).
	LMax int
	// Step is the spacing in degrees of the node-registered map grid,
	// poles included (default 2).
	Step float64
	// Level is the dlnVs (fraction) of the slow-region outline (default
	// -0.01, the -1 % contour of common practice, e.g. Burke & Torsvik
	// 2004). Ignored when AreaFraction > 0.
	Level float64
	// AreaFraction, when > 0, outlines each model at the level below which
	// it covers this fraction of the sphere instead of at Level.
	AreaFraction float64
	// VoteFraction is the slowest fraction of the area that counts as a
	// vote in the vote map (default 0.3).
	VoteFraction float64
	// K is the number of k-means clusters (default 2).
	K int
	// Confidence lists the levels of the significance curves (default 0.95
	// and 0.99).
	Confidence []float64
	// Seed makes the k-means seeding reproducible (default 1).
	Seed uint64
}

func (o Options) withDefaults(models []Model) Options {
	if o.LMax <= 0 {
		o.LMax = math.MaxInt
		for _, m := range models {
			o.LMax = min(o.LMax, m.Coeffs.LMax)
		}
	}
	if o.Step <= 0 {
		o.Step = 2
	}
	if o.Level == 0 {
		o.Level = -0.01
	}
	if o.VoteFraction <= 0 {
		o.VoteFraction = 0.3
	}
	if o.K <= 0 {
		o.K = 2
	}
	if len(o.Confidence) == 0 {
		o.Confidence = []float64{0.95, 0.99}
	}
	if o.Seed == 0 {
		o.Seed = 1
	}
	return o
}

// ModelSummary holds the statistics of one model.
type ModelSummary struct {
	Name string `json:"name"`
	// Spectrum[l] is the degree power of dlnVs, l = 0..LMax, in the
	// definition of sh.Coeffs.PowerSpectrum.
	Spectrum []float64 `json:"spectrum"`
	// RMS is the root-mean-square of dlnVs over the sphere without degree 0
	// (fraction).
	RMS float64 `json:"rms"`
	// Mean is degree 0 expressed as the spherical mean of dlnVs (fraction).
	Mean float64 `json:"mean"`
	// Level is the dlnVs of the outline (fraction).
	Level float64 `json:"level"`
	// SlowFraction is the fraction of the sphere below Level.
	SlowFraction float64 `json:"slow_fraction"`
	// Regions are the slow regions below Level, largest first.
	Regions []Region `json:"regions"`
	// Antipodality is the angular distance of the centroids of the two
	// largest regions in degrees (NaN-free: 0 with HasAntipodality false
	// when there are fewer than two regions).
	Antipodality    float64 `json:"antipodality_deg"`
	HasAntipodality bool    `json:"has_antipodality"`
	// Cluster holds the k-means label of every grid point (0 = slowest).
	Cluster []int `json:"-"`
}

// DegreeR is the correlation of a pair of models at one degree.
type DegreeR struct {
	L int     `json:"l"`
	R float64 `json:"r"`
	// Defined is false where a model has no power at degree L (R is then
	// reported as 0).
	Defined bool `json:"defined"`
	// Confidence is the one-sided confidence level at which R is
	// significantly positive (Significance).
	Confidence float64 `json:"confidence"`
}

// Pair holds the correlations of two models.
type Pair struct {
	A, B     string    `json:"-"`
	Names    [2]string `json:"models"`
	ByDegree []DegreeR `json:"by_degree"`
	// Total is the correlation over degrees 1..LMax (Becker & Boschi 2002).
	Total float64 `json:"total"`
	// TotalConfidence is the one-sided confidence at which Total is
	// significantly positive, treating the (LMax+1)^2 - 1 coefficients as
	// independent pairs (SignificanceN; common practice, optimistic when the
	// spectra are red).
	TotalConfidence float64 `json:"total_confidence"`
	// Weighted is the mean of the degree correlations weighted by
	// sqrt(P_a(l) P_b(l)), the geometric mean of the degree powers.
	Weighted float64 `json:"power_weighted_mean"`
}

// Critical holds significance curves at one confidence level.
type Critical struct {
	Confidence float64   `json:"confidence"`
	L          []int     `json:"l"`
	OneSided   []float64 `json:"one_sided"`
	TwoSided   []float64 `json:"two_sided"`
}

// Result is a full comparison.
type Result struct {
	LMax     int            `json:"lmax"`
	Models   []ModelSummary `json:"models"`
	Pairs    []Pair         `json:"pairs"`
	Critical []Critical     `json:"critical"`
	// Grid is the map grid; Fields[k] is model k on it (dlnVs fraction).
	Grid   Grid        `json:"-"`
	Fields [][]float64 `json:"-"`
	// Mean and Std are the mean model and the spread across models.
	Mean []float64 `json:"-"`
	Std  []float64 `json:"-"`
	// Votes counts, per point, the models that place it in their slowest
	// VoteFraction of the area; ClusterVotes those that place it in their
	// slowest k-means cluster.
	Votes        []int   `json:"-"`
	ClusterVotes []int   `json:"-"`
	VoteFraction float64 `json:"vote_fraction"`
	// MeanModel summarises the mean model like any other; MeanCoeffs is its
	// expansion (canonical convention, the average of the models'
	// coefficients).
	MeanModel  ModelSummary `json:"mean_model"`
	MeanCoeffs *sh.Coeffs   `json:"-"`
	// Options are the options with defaults resolved.
	Options Options `json:"-"`
}

// Analyze compares two or more models.
func Analyze(models []Model, opt Options) (*Result, error) {
	if len(models) < 2 {
		return nil, fmt.Errorf("compare: need at least two models, got %d", len(models))
	}
	opt = opt.withDefaults(models)
	canon := make([]*sh.Coeffs, len(models))
	for k, m := range models {
		if m.Coeffs == nil {
			return nil, fmt.Errorf("compare: model %q has no coefficients", m.Name)
		}
		if m.Coeffs.LMax < opt.LMax {
			return nil, fmt.Errorf("compare: model %q reaches degree %d, below the common lmax %d; lower lmax", m.Name, m.Coeffs.LMax, opt.LMax)
		}
		c, err := m.Coeffs.Truncate(opt.LMax).Convert(sh.Canonical)
		if err != nil {
			return nil, fmt.Errorf("compare: model %q: %w", m.Name, err)
		}
		canon[k] = c
	}
	res := &Result{LMax: opt.LMax, VoteFraction: opt.VoteFraction, Options: opt}

	// Maps on a node grid with the poles.
	nlat := int(math.Round(180/opt.Step)) + 1
	nlon := int(math.Round(360 / opt.Step))
	colat := make([]float64, nlat)
	for i := range colat {
		colat[i] = math.Pi * float64(i) / float64(nlat-1)
	}
	g := sh.NewRings(colat, nlon, 0)
	tr := sh.NewTransform(opt.LMax, g)
	res.Grid = Grid{Lon: make([]float64, nlon), Lat: make([]float64, nlat)}
	for j := range res.Grid.Lon {
		res.Grid.Lon[j] = 360 * float64(j) / float64(nlon)
	}
	for i := range res.Grid.Lat {
		res.Grid.Lat[i] = 90 - 180*float64(i)/float64(nlat-1)
	}
	w := res.Grid.AreaWeights()
	for _, c := range canon {
		res.Fields = append(res.Fields, tr.Synthesis(nil, c))
	}
	var err error
	if res.Mean, res.Std, err = MeanAndSpread(res.Fields); err != nil {
		return nil, err
	}
	if res.Votes, err = VoteMap(res.Fields, w, opt.VoteFraction); err != nil {
		return nil, err
	}
	res.ClusterVotes = make([]int, len(w))
	for k, m := range models {
		var prof [][]float64
		for d, pc := range m.Profile {
			c, err := pc.Truncate(min(opt.LMax, pc.LMax)).Convert(sh.Canonical)
			if err != nil {
				return nil, fmt.Errorf("compare: model %q, profile layer %d: %w", m.Name, d, err)
			}
			prof = append(prof, tr.Synthesis(nil, c.Truncate(opt.LMax)))
		}
		s, err := summarize(m.Name, canon[k], res.Fields[k], prof, res.Grid, w, opt)
		if err != nil {
			return nil, err
		}
		for i, lab := range s.Cluster {
			if lab == 0 {
				res.ClusterVotes[i]++
			}
		}
		res.Models = append(res.Models, *s)
	}
	meanC := sh.NewCoeffs(opt.LMax, sh.Canonical)
	for _, c := range canon {
		for i := range c.C {
			meanC.C[i] += c.C[i] / float64(len(canon))
			meanC.S[i] += c.S[i] / float64(len(canon))
		}
	}
	ms, err := summarize("mean", meanC, res.Mean, nil, res.Grid, w, opt)
	if err != nil {
		return nil, err
	}
	res.MeanModel = *ms
	res.MeanCoeffs = meanC

	for a := 0; a < len(canon); a++ {
		for b := a + 1; b < len(canon); b++ {
			res.Pairs = append(res.Pairs, pairStats(models[a].Name, models[b].Name, canon[a], canon[b]))
		}
	}
	for _, conf := range opt.Confidence {
		cr := Critical{Confidence: conf}
		for l := 1; l <= opt.LMax; l++ {
			one, err := CriticalR(l, conf, false)
			if err != nil {
				return nil, err
			}
			two, _ := CriticalR(l, conf, true)
			cr.L = append(cr.L, l)
			cr.OneSided = append(cr.OneSided, one)
			cr.TwoSided = append(cr.TwoSided, two)
		}
		res.Critical = append(res.Critical, cr)
	}
	return res, nil
}

// Field returns values on g as a contour.Field (rows north to south).
func (g Grid) Field(values []float64) contour.Field {
	return contour.Field{Lon0: g.Lon[0], NLon: len(g.Lon), Lat: g.Lat, Values: values}
}

func summarize(name string, c *sh.Coeffs, field []float64, profile [][]float64, g Grid, w []float64, opt Options) (*ModelSummary, error) {
	s := &ModelSummary{Name: name, Spectrum: c.PowerSpectrum(nil)}
	if c.LMax >= 1 {
		s.RMS = c.RMS(1, c.LMax)
	}
	// Orthonormal harmonics: the mean of f over the sphere is
	// C_00 Y_00 = C_00 / sqrt(4 pi).
	s.Mean = c.C[0] / math.Sqrt(4*math.Pi)
	f := g.Field(field)
	s.Level = opt.Level
	if opt.AreaFraction > 0 {
		lev, err := LevelForFraction(f, opt.AreaFraction)
		if err != nil {
			return nil, fmt.Errorf("compare: model %q: %w", name, err)
		}
		s.Level = lev
	}
	surf, err := contour.NewSurface(f)
	if err != nil {
		return nil, err
	}
	s.SlowFraction = surf.FractionBelow(s.Level)
	if s.Regions, err = SlowRegions(f, s.Level); err != nil {
		return nil, err
	}
	s.Antipodality, s.HasAntipodality = Antipodality(s.Regions)
	pts := make([][]float64, len(field))
	for i, v := range field {
		if len(profile) == 0 {
			pts[i] = []float64{v}
			continue
		}
		pts[i] = make([]float64, len(profile))
		for d, layer := range profile {
			pts[i][d] = layer[i]
		}
	}
	km, err := KMeans(pts, w, opt.K, 4, opt.Seed)
	if err != nil {
		return nil, fmt.Errorf("compare: model %q: %w", name, err)
	}
	s.Cluster = km.Labels
	return s, nil
}

func pairStats(a, b string, ca, cb *sh.Coeffs) Pair {
	p := Pair{A: a, B: b, Names: [2]string{a, b}}
	r := sh.DegreeCorrelation(nil, ca, cb)
	pa, pb := ca.PowerSpectrum(nil), cb.PowerSpectrum(nil)
	var num, den float64
	for l := 1; l < len(r); l++ {
		if math.IsNaN(r[l]) {
			// One of the models has no power at this degree.
			p.ByDegree = append(p.ByDegree, DegreeR{L: l})
			continue
		}
		p.ByDegree = append(p.ByDegree, DegreeR{L: l, R: r[l], Defined: true, Confidence: Significance(l, r[l])})
		wl := math.Sqrt(pa[l] * pb[l])
		num += wl * r[l]
		den += wl
	}
	if den > 0 {
		p.Weighted = num / den
	}
	if ca.LMax >= 1 {
		p.Total = sh.TotalCorrelation(ca, cb, 1, ca.LMax)
		if math.IsNaN(p.Total) {
			p.Total = 0
		} else if n := (ca.LMax+1)*(ca.LMax+1) - 1; n >= 3 {
			p.TotalConfidence = SignificanceN(n, p.Total)
		}
	}
	return p
}
