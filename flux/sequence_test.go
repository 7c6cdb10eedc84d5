package flux

import (
	"math"
	"testing"

	"cmbflux/flux/contour"
	"cmbflux/flux/sh"
)

func TestSpinAboutGeographicPole(t *testing.T) {
	// Y_1^1c is proportional to sin(colat) cos(lon) (Abramowitz & Stegun ch.
	// 8, closed form): maximum on the equator at lon 0. Turned east by
	// alpha about the north pole it peaks at lon alpha.
	p, err := Ideal(nil, Term{L: 1, M: 1, Weight: 1})
	if err != nil {
		t.Fatal(err)
	}
	ref := Reference{QMean: 0.06}
	frames, err := SpinSequence(p, Spin{PoleLon: 0, PoleLat: 90, Rate: 10}, []float64{0, 1, 2.5, 20}, func(q *Pattern) (*Result, error) { return q.WithQStar(1.5, ref) })
	if err != nil {
		t.Fatal(err)
	}
	for _, f := range frames {
		d := f.Result.Diagnostics
		want := math.Mod(10*f.Time+180, 360) - 180
		if math.Abs(d.QMaxLonLat[0]-want) > 1e-4 || math.Abs(d.QMaxLonLat[1]) > 1e-4 {
			t.Errorf("t = %g: maximum at %v, want (%g, 0)", f.Time, d.QMaxLonLat, want)
		}
		c, _ := f.Result.Coeffs(HeatFlux)
		v := c.Evaluate(math.Pi/2, want/rad2deg)
		if !near(v*1e3, d.QMax, 1e-10) {
			t.Errorf("t = %g: exported field at the moved maximum %g, want %g", f.Time, v*1e3, d.QMax)
		}
		if !near(d.QStar, 1.5, 1e-12) {
			t.Errorf("t = %g: q* = %g, want 1.5 in every frame", f.Time, d.QStar)
		}
	}
}

func TestRotateAboutEquatorialAxis(t *testing.T) {
	// Y_1^0 peaks at the north pole. A right-handed quarter turn about the
	// axis through (0, 0) takes z to -y (Rodrigues' formula, closed form):
	// the maximum moves to (-90, 0) and the minimum to (90, 0). At q* = 4
	// the negative region is the cap within 60 deg of the minimum, area
	// fraction (1 - 2/4)/2 = 1/4 (see TestZonalY10ClosedForms); its outline
	// must be centred on the minimum.
	p, err := Ideal(nil, Term{L: 1, M: 0, Weight: 1})
	if err != nil {
		t.Fatal(err)
	}
	q, err := p.Rotate(0, 0, 90)
	if err != nil {
		t.Fatal(err)
	}
	r, err := q.WithQStar(4, Reference{QMean: 0.05})
	if err != nil {
		t.Fatal(err)
	}
	d := r.Diagnostics
	if contour.Distance(d.QMaxLonLat[0], d.QMaxLonLat[1], -90, 0) > 1e-4 || contour.Distance(d.QMinLonLat[0], d.QMinLonLat[1], 90, 0) > 1e-4 {
		t.Errorf("extrema at %v and %v, want (-90, 0) and (90, 0)", d.QMaxLonLat, d.QMinLonLat)
	}
	if math.Abs(d.AreaFractionNegative-0.25) > tolArea {
		t.Errorf("negative fraction %g, want 0.25", d.AreaFractionNegative)
	}
	c, _ := r.Coeffs(FluxRelative)
	if v := c.Evaluate(math.Pi/2, -math.Pi/2); !near(v, 3, 1e-10) {
		t.Errorf("q/q_mean at the moved maximum = %g, want 1 + q*/2 = 3", v)
	}
	o := r.Outlines()
	if len(o.Negative) != 1 {
		t.Fatalf("%d negative rings, want 1", len(o.Negative))
	}
	lon, lat, ok := contour.Centroid(o.Negative)
	if !ok || contour.Distance(lon, lat, 90, 0) > 0.05 {
		t.Errorf("outline centroid (%g, %g), want (90, 0)", lon, lat)
	}
	if a := contour.RegionArea(o.Negative) / (4 * math.Pi); math.Abs(a-0.25) > 1e-3 {
		t.Errorf("outline area fraction %g, want 0.25", a)
	}
}

func TestBlend(t *testing.T) {
	// Y_1^0 and Y_1^1c are N z and N x with the same N (closed forms), so
	// their equal blend peaks towards (x + z)/sqrt 2: lon 0, lat 45; at
	// weight w the peak lies at lat atan((1 - w)/w).
	a, _ := Ideal(nil, Term{L: 1, M: 0, Weight: 1})
	b, _ := Ideal(nil, Term{L: 1, M: 1, Weight: 1})
	ref := Reference{QMean: 0.05}
	frames, err := BlendSequence(a, b, 10, 20, []float64{10, 12.5, 15, 20}, func(p *Pattern) (*Result, error) { return p.WithQStar(1, ref) })
	if err != nil {
		t.Fatal(err)
	}
	for _, f := range frames {
		w := (f.Time - 10) / 10
		want := math.Atan2(1-w, w) * rad2deg
		d := f.Result.Diagnostics
		if math.Abs(d.QMaxLonLat[1]-want) > 1e-4 || (want < 89.99 && math.Abs(d.QMaxLonLat[0]) > 1e-4) {
			t.Errorf("t = %g: maximum at %v, want lat %g on lon 0", f.Time, d.QMaxLonLat, want)
		}
	}
	if _, err := BlendSequence(a, b, 10, 20, []float64{25}, func(p *Pattern) (*Result, error) { return p.WithQStar(1, ref) }); err == nil {
		t.Error("a time outside the blend interval must be refused")
	}
}

func TestMeasuredOnGrid(t *testing.T) {
	// Y_2^2c = N sin^2 cos 2lon (closed form). On a grid with longitudes
	// 15, 45, ... and the equator the extremes are +-N cos 30 deg, so the
	// continuous field reaches q*/cos 30 deg.
	p, _ := Ideal(nil, Term{L: 2, M: 2, Weight: 1})
	g := &SampleGrid{Name: "offset 30-degree grid", Lat: []float64{-60, -30, 0, 30, 60}}
	for lon := 15.0; lon < 360; lon += 30 {
		g.Lon = append(g.Lon, lon)
	}
	pg, err := p.MeasuredOn(g)
	if err != nil {
		t.Fatal(err)
	}
	r, err := pg.WithQStar(2, Reference{QMean: 0.05})
	if err != nil {
		t.Fatal(err)
	}
	d := r.Diagnostics
	if d.QStarMeasuredOn != g.Name || !near(d.QStar, 2, 1e-12) || !near(d.QStarContinuous, 2/math.Cos(30/rad2deg), 1e-8) {
		t.Errorf("measured on %q: q* %g, continuous %g, want 2 and %g", d.QStarMeasuredOn, d.QStar, d.QStarContinuous, 2/math.Cos(30/rad2deg))
	}
	if !hasWarning(r, "measured on grid") {
		t.Errorf("no warning about the grid measure: %q", r.Warnings)
	}
}

func TestDegreeWarnings(t *testing.T) {
	in := randomDlnVs(5, 8)
	p, err := NewPattern(in, &PatternOptions{LMax: 12})
	if err != nil {
		t.Fatal(err)
	}
	if len(p.Warnings()) != 1 || !contains(p.Warnings()[0], "above the input's degree") {
		t.Errorf("lmax above the input: warnings %q", p.Warnings())
	}
	p, _ = NewPattern(in, &PatternOptions{LMax: 8, ResolvedLMax: 6})
	r, _ := p.WithQStar(1, Reference{QMean: 0.05})
	if !hasWarning(r, "resolves") {
		t.Errorf("lmax above the resolved degree: warnings %q", r.Warnings)
	}
	if _, err := NewPattern(in, &PatternOptions{LMax: 8, Weights: []float64{1, 1}}); err == nil {
		t.Error("a short taper must be refused")
	}
	zero := in.Clone()
	for k := range zero.C {
		zero.C[k], zero.S[k] = 0, 0
	}
	zero.C[0] = 1
	if _, err := NewPattern(zero, nil); err == nil {
		t.Error("a pattern without power above degree 0 must be refused")
	}
	if _, err := p.WithQStar(1, Reference{}); err == nil {
		t.Error("a build without mean flux must be refused")
	}
}

func TestUnitWarnings(t *testing.T) {
	// Unit slips a user is likely to make: mW/m^2 given as W/m^2, km as m,
	// percent per kelvin as a fraction per kelvin.
	p, _ := Ideal(nil, Term{L: 2, M: 0, Weight: 1})
	r, _ := p.WithQStar(1, Reference{QMean: 80})
	if !hasWarning(r, "units:") {
		t.Errorf("q_mean 80 W/m^2: no unit warning in %q", r.Warnings)
	}
	r, _ = p.WithPhysical(Physical{Conductivity: 10, Thickness: 200, DlnVsDT: -2e-5}, Reference{QMean: 0.08})
	if !hasWarning(r, "metres") {
		t.Errorf("thickness 200 m: no warning in %q", r.Warnings)
	}
	r, _ = p.WithPhysical(Physical{Conductivity: 10, Thickness: 2e5, DlnVsDT: -0.002}, Reference{QMean: 0.08})
	if !hasWarning(r, "percent") {
		t.Errorf("dlnVs/dT -0.002: no warning in %q", r.Warnings)
	}
	r, _ = p.WithPhysical(Physical{Conductivity: 10, Thickness: 2e5, DlnVsDT: -2e-5}, Reference{QMean: 0.08})
	for _, w := range r.Warnings {
		if contains(w, "units") || contains(w, "metres") || contains(w, "percent") {
			t.Errorf("usual settings drew a unit warning: %q", w)
		}
	}
	if _, err := NewPattern(randomDlnVs(1, 4), &PatternOptions{Weights: []float64{1, 1, -1, 1, 1}}); err == nil {
		t.Error("a negative taper weight must be refused")
	}
}

func TestConcurrentBuilds(t *testing.T) {
	// A Pattern is shared by the workers of a sweep: builds and outlines
	// from several goroutines must agree with the serial ones (run with
	// -race to check for data races).
	p, err := NewPattern(randomDlnVs(9, 12), nil)
	if err != nil {
		t.Fatal(err)
	}
	ref := Reference{QMean: 0.06, QAd: 0.045}
	want := make([]float64, 16)
	for k := range want {
		r, _ := p.WithQStar(1+0.3*float64(k), ref)
		want[k] = r.Diagnostics.AreaFractionNegative + *r.Diagnostics.AreaFractionSubadiabatic
	}
	errs := make(chan string, len(want))
	for k := range want {
		go func() {
			r, _ := p.WithQStar(1+0.3*float64(k), ref)
			_ = r.Outlines()
			if got := r.Diagnostics.AreaFractionNegative + *r.Diagnostics.AreaFractionSubadiabatic; got != want[k] {
				errs <- "concurrent build differs"
				return
			}
			errs <- ""
		}()
	}
	for range want {
		if e := <-errs; e != "" {
			t.Error(e)
		}
	}
}

func TestParseTerm(t *testing.T) {
	for s, want := range map[string]Term{
		"2:2":         {L: 2, M: 2, Weight: 1},
		"3:1:sin":     {L: 3, M: 1, Sin: true, Weight: 1},
		"1:0:cos:0.5": {L: 1, M: 0, Weight: 0.5},
		" 4:3:s:-2 ":  {L: 4, M: 3, Sin: true, Weight: -2},
	} {
		got, err := ParseTerm(s)
		if err != nil || got != want {
			t.Errorf("ParseTerm(%q) = %+v, %v; want %+v", s, got, err, want)
		}
	}
	for _, s := range []string{"", "2", "0:0", "2:3", "2:0:sin", "2:1:tan", "a:b", "1:1:cos:nan"} {
		if _, err := ParseTerm(s); err == nil {
			t.Errorf("ParseTerm(%q): no error", s)
		}
	}
}

func TestSampleGridOf(t *testing.T) {
	// On a Gauss-Legendre grid with 2 longitudes per 90 degrees the Y_2^2
	// extremes (lon 0, 90, ...) are sampled, so grid and continuous q*
	// agree up to the latitude of the ring nearest the equator.
	p, _ := Ideal(nil, Term{L: 2, M: 2, Weight: 1})
	g := sh.NewGaussLegendre(9, 16) // odd: the equator is a ring
	pg, err := p.MeasuredOn(SampleGridOf("gauss:9", g))
	if err != nil {
		t.Fatal(err)
	}
	r, _ := pg.WithQStar(2, Reference{QMean: 0.05})
	if !near(r.Diagnostics.QStarContinuous, 2, 1e-9) || r.Diagnostics.QStarMeasuredOn != "gauss:9" {
		t.Errorf("q* continuous %g on %q, want 2 on gauss:9", r.Diagnostics.QStarContinuous, r.Diagnostics.QStarMeasuredOn)
	}
}

func TestTaper(t *testing.T) {
	// A cut taper at degree 2 removes the Y_3^0 term, leaving Y_1^0 with its
	// closed-form extrema q_mean (1 +- q*/2) at the poles (see
	// TestZonalY10ClosedForms); a cosine taper cos:1:3 halves degree 2
	// ((1 + cos(pi/2))/2 = 1/2, the raised-cosine formula of sh.Taper).
	c, _ := Harmonics(Term{L: 1, M: 0, Weight: 1}, Term{L: 3, M: 0, Weight: 5})
	tp, err := sh.ParseTaper("cut:2")
	if err != nil {
		t.Fatal(err)
	}
	p, err := NewPattern(c, &PatternOptions{Taper: tp})
	if err != nil {
		t.Fatal(err)
	}
	r, _ := p.WithQStar(2, Reference{QMean: 0.05})
	d := r.Diagnostics
	if d.Taper != "cut:2" || !near(d.QMax, 100, tolRel) || !near(d.QMin, 0, 1e-6) || math.Abs(d.QMaxLonLat[1]-90) > 1e-4 {
		t.Errorf("cut:2: taper %q, q_max %g at %v, q_min %g; want cut:2, 100 at the north pole, 0", d.Taper, d.QMax, d.QMaxLonLat, d.QMin)
	}
	c2, _ := Harmonics(Term{L: 2, M: 0, Weight: 1})
	tp, _ = sh.ParseTaper("cos:1:3")
	p2, _ := NewPattern(c2, &PatternOptions{Taper: tp})
	if got := p2.Coeffs().C[sh.Index(2, 0)]; !near(got, 0.5, 1e-12) {
		t.Errorf("cos:1:3 weight at degree 2 = %g, want 0.5", got)
	}
	if _, err := NewPattern(c, &PatternOptions{Taper: tp, Weights: []float64{1, 1, 1, 1}}); err == nil {
		t.Error("a taper and custom weights together must be refused")
	}
}

func TestSweep(t *testing.T) {
	p, _ := NewPattern(randomDlnVs(4, 10), nil)
	ref := Reference{QMean: 0.06, QAd: 0.04}
	vals := []float64{0.5, 1, 2, 3, 5, 8}
	rs, err := p.Sweep(PeakToPeak, vals, ref, 3)
	if err != nil {
		t.Fatal(err)
	}
	for k, v := range vals {
		want, _ := p.WithQStar(v, ref)
		if rs[k].Diagnostics.QStar != want.Diagnostics.QStar || rs[k].Diagnostics.AreaFractionNegative != want.Diagnostics.AreaFractionNegative {
			t.Errorf("point %d differs from the serial build", k)
		}
	}
	if _, err := p.Sweep(PeakToPeak, []float64{1, -1}, ref, 2); err == nil {
		t.Error("a negative q* in a sweep must be refused")
	}
}
