package report

import (
	"bytes"
	"encoding/base64"
	"fmt"
	"html"
	"os"
	"path/filepath"
	"regexp"
	"strings"
	"testing"

	"cmbflux/export/figure"
)

// demoField is an invented scenario: a mean flux of 65 mW/m² with two
// antipodal equatorial lows.
func demoField(lon, lat float64) float64 {
	d := func(l0 float64) float64 {
		dl := lon - l0
		for dl > 180 {
			dl -= 360
		}
		for dl < -180 {
			dl += 360
		}
		return (dl*dl + lat*lat) / (30 * 30)
	}
	return 65 - 30/(1+d(15)) - 28/(1+d(195))
}

func demoReport(t testing.TB) *Report {
	t.Helper()
	m := &figure.Map{Title: "Heat flux, invented scenario", Field: demoField, Center: 65, Label: "q", Units: "mW/m²", Width: 900, Height: 540}
	mapPNG, err := figure.PNG(m)
	if err != nil {
		t.Fatal(err)
	}
	sp := &figure.Spectrum{Title: "Power", YLabel: "power", Series: []figure.Series{{Label: "demo", Y: []float64{1, 4, 9, 3, 1, 0.5}}}}
	specSVG, err := figure.SVG(sp)
	if err != nil {
		t.Fatal(err)
	}
	mapSVG, err := figure.SVG(m)
	if err != nil {
		t.Fatal(err)
	}
	return &Report{
		Title:    "Build report: demo scenario <q* = 1.2> & friends",
		Summary:  []string{"An invented scenario for testing; no real tomography model."},
		Warnings: []string{"q_min is below the adiabatic flux over 12 % of the CMB", "lmax 40 exceeds what the 5° grid resolves <check>"},
		Figures: []Figure{
			{Caption: "Heat flux at the CMB", MIME: "image/png", Data: mapPNG},
			{Caption: "Degree power spectrum", MIME: "image/svg+xml", Data: specSVG},
			{Caption: "Heat flux at the CMB, as SVG", MIME: "image/svg+xml", Data: mapSVG},
		},
		Parameters:  KeyValues("Run parameters", "parameter", "value", [2]string{"q*", "1.2"}, [2]string{"lmax", "12"}),
		Conventions: KeyValues("Coefficient conventions", "property", "value", [2]string{"normalization", "orthonormal"}, [2]string{"phase", "no Condon-Shortley phase"}),
		Diagnostics: KeyValues("Diagnostics", "quantity", "value", [2]string{"q_min", "21.4 mW/m²"}),
		Sections:    []Section{{Heading: "Notes", Text: []string{"Cells like <b>this</b> are text."}, Tables: []Table{{Header: []string{"a", "b"}, Rows: [][]string{{"1", "<i>2</i>"}}}}}},
		Files:       []File{HashBytes("flux.png", mapPNG), HashBytes("spectrum.svg", specSVG)},
	}
}

func render(t testing.TB, r *Report) string {
	t.Helper()
	var b bytes.Buffer
	if err := r.Write(&b); err != nil {
		t.Fatal(err)
	}
	return b.String()
}

// TestEscaping checks that text is escaped as HTML text (HTML Living
// Standard, character references): markup in any field stays text.
func TestEscaping(t *testing.T) {
	r := demoReport(t)
	r.Title = `<script>alert("x")</script> & more`
	s := render(t, r)
	for _, bad := range []string{"<script", "<b>this</b>", "<i>2</i>", "<check>", "<q*"} {
		if strings.Contains(s, bad) {
			t.Errorf("output contains unescaped %q", bad)
		}
	}
	for _, good := range []string{"&lt;script&gt;", "&lt;b&gt;this&lt;/b&gt;", "&amp;", "&lt;check&gt;"} {
		if !strings.Contains(s, good) {
			t.Errorf("output lacks escaped %q", good)
		}
	}
}

// TestStructure checks the HTML5 frame (doctype, language, character
// encoding first in head: HTML Living Standard 4.2.5.4), that nothing is
// loaded from elsewhere, that warnings come first, and that each figure's
// data URI (RFC 2397) carries the figure's bytes.
func TestStructure(t *testing.T) {
	r := demoReport(t)
	s := render(t, r)
	if !strings.HasPrefix(s, "<!DOCTYPE html>\n<html lang=\"en\">\n<head>\n<meta charset=\"utf-8\">") {
		t.Errorf("bad document start: %q", s[:min(len(s), 80)])
	}
	if !strings.HasSuffix(strings.TrimSpace(s), "</html>") {
		t.Error("document does not end with </html>")
	}
	if regexp.MustCompile(`(?i)(src|href)="(https?:)?//`).MatchString(s) || strings.Contains(s, "@import") || strings.Contains(s, "url(") {
		t.Error("report refers to an outside resource")
	}
	iw, is, ifig := strings.Index(s, `id="warnings"`), strings.Index(s, `id="summary"`), strings.Index(s, "<figure>")
	if iw < 0 || is < iw || ifig < is {
		t.Errorf("order: warnings at %d, summary at %d, figures at %d", iw, is, ifig)
	}
	for i := range r.Figures {
		if !strings.Contains(s, fmt.Sprintf(`<span class="fignum">Figure %d.</span>`, i+1)) {
			t.Errorf("figure %d not numbered", i+1)
		}
	}
	if !strings.Contains(s, "2 warnings: read them") {
		t.Error("warning count missing from the header")
	}
	// Attribute values may hold character references (html/template
	// writes + and = as &#43; and &#61;); unescape before decoding.
	srcs := regexp.MustCompile(`src="data:(image/[a-z+]+);base64,([A-Za-z0-9+/=]+)"`).FindAllStringSubmatch(html.UnescapeString(s), -1)
	if len(srcs) != len(r.Figures) {
		t.Fatalf("found %d data URIs, want %d", len(srcs), len(r.Figures))
	}
	for i, m := range srcs {
		data, err := base64.StdEncoding.DecodeString(m[2])
		if err != nil {
			t.Fatal(err)
		}
		if m[1] != r.Figures[i].MIME || !bytes.Equal(data, r.Figures[i].Data) {
			t.Errorf("figure %d: data URI does not carry the figure", i)
		}
	}
	if strings.Count(s, `width="900" height="540"`) != 2 || !strings.Contains(s, `width="900" height="440"`) {
		t.Error("figures lack their sizes (PNG pixels, SVG points)")
	}
	for _, f := range r.Files {
		if !strings.Contains(s, f.SHA256) {
			t.Errorf("hash of %s missing", f.Name)
		}
	}
	// No warnings: the header says so and no warning box is drawn.
	r.Warnings = nil
	s = render(t, r)
	if strings.Contains(s, `id="warnings"`) || !strings.Contains(s, "No warnings.") {
		t.Error("report without warnings shows a warning box or no all-clear")
	}
}

// TestBadFigure checks that a figure whose bytes do not match its media
// type, or of another type, is refused.
func TestBadFigure(t *testing.T) {
	for _, f := range []Figure{
		{MIME: "image/png", Data: []byte("<svg></svg>")},
		{MIME: "image/svg+xml", Data: []byte("\x89PNG...")},
		{MIME: "text/html", Data: []byte("<p>")},
	} {
		r := &Report{Title: "x", Figures: []Figure{f}}
		if err := r.Write(&bytes.Buffer{}); err == nil {
			t.Errorf("figure %q accepted", f.MIME)
		}
	}
}

// TestDeterministic checks that the same report gives the same bytes.
func TestDeterministic(t *testing.T) {
	a, b := render(t, demoReport(t)), render(t, demoReport(t))
	if a != b {
		t.Error("two renderings differ")
	}
}

// TestHash checks HashBytes and HashFile against the FIPS 180-2 example
// (sha256 of "abc", FIPS PUB 180-2 appendix B.1).
func TestHash(t *testing.T) {
	const want = "ba7816bf8f01cfea414140de5dae2223b00361a396177a9cb410ff61f20015ad"
	if f := HashBytes("abc.txt", []byte("abc")); f.SHA256 != want || f.Size != 3 {
		t.Errorf("HashBytes = %+v", f)
	}
	p := filepath.Join(t.TempDir(), "abc.txt")
	if err := os.WriteFile(p, []byte("abc"), 0o644); err != nil {
		t.Fatal(err)
	}
	f, err := HashFile(p, "abc.txt")
	if err != nil || f.SHA256 != want || f.Size != 3 || f.Name != "abc.txt" {
		t.Errorf("HashFile = %+v, %v", f, err)
	}
	if _, err := HashFile(filepath.Join(t.TempDir(), "missing"), "m"); err == nil {
		t.Error("HashFile of a missing file: no error")
	}
}

// TestWriteFile checks that WriteFile leaves the report and no temporary
// file, and leaves the old file in place when rendering fails.
func TestWriteFile(t *testing.T) {
	dir := t.TempDir()
	p := filepath.Join(dir, "report.html")
	r := demoReport(t)
	if err := r.WriteFile(p); err != nil {
		t.Fatal(err)
	}
	got, err := os.ReadFile(p)
	if err != nil || string(got) != render(t, r) {
		t.Fatalf("file differs from Write output (%v)", err)
	}
	bad := &Report{Figures: []Figure{{MIME: "image/png"}}}
	if err := bad.WriteFile(p); err == nil {
		t.Error("bad report written")
	}
	if again, _ := os.ReadFile(p); !bytes.Equal(again, got) {
		t.Error("failed write changed the old file")
	}
	ents, _ := os.ReadDir(dir)
	if len(ents) != 1 {
		t.Errorf("folder holds %d entries, want only the report", len(ents))
	}
}

// TestEmptyReport checks that a report with nothing in it is still a
// complete page with a non-empty title (HTML Living Standard 4.2.2: the
// title element must not be empty or whitespace only, per the W3C
// validator's rule; from memory).
func TestEmptyReport(t *testing.T) {
	s := render(t, &Report{})
	if !strings.Contains(s, "<title>cmbflux report</title>") || !strings.Contains(s, "No warnings.") {
		t.Errorf("empty report:\n%s", s)
	}
	if strings.Contains(s, "<nav") || strings.Contains(s, "<table") {
		t.Error("empty report has a contents list or tables")
	}
}

// TestAnchors checks the fragment identifiers made from headings.
func TestAnchors(t *testing.T) {
	seen := map[string]int{}
	for _, c := range [][2]string{{"Degree power", "degree-power"}, {"Degree power", "degree-power-2"}, {"q* sweep (lmax)", "q-sweep-lmax"}, {"???", "section"}} {
		if got := anchor(c[0], seen); got != c[1] {
			t.Errorf("anchor(%q) = %q, want %q", c[0], got, c[1])
		}
	}
}
