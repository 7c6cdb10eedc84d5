package report

import (
	"bytes"
	"crypto/sha256"
	"embed"
	"encoding/base64"
	"encoding/hex"
	"fmt"
	"html/template"
	"image/png"
	"io"
	"math"
	"os"
	"path/filepath"
	"regexp"
	"strconv"
	"strings"
)

// Report is the content of one report. Empty fields are left out.
type Report struct {
	// Title is the page title and main heading; empty means
	// "<Generator> report".
	Title string
	// Summary is the job summary, one string per paragraph.
	Summary []string
	// Warnings are shown in a highlighted box at the top, before anything
	// else, one item per warning.
	Warnings []string
	// Figures are shown after the summary.
	Figures []Figure
	// Parameters, Conventions and Diagnostics are the standard tables,
	// shown in this order after the figures.
	Parameters, Conventions, Diagnostics *Table
	// Sections follow the standard tables, in order.
	Sections []Section
	// Files lists the output files with their sizes and sha256 sums.
	Files []File
	// Generator names the program that wrote the report, for the footer
	// and the generator meta tag; empty means "cmbflux".
	Generator string
}

// Section is a titled part of a report.
type Section struct {
	// Heading is the section title.
	Heading string
	// Text holds paragraphs.
	Text []string
	// Figures are shown after the text.
	Figures []Figure
	// Tables are shown after the figures.
	Tables []Table
}

// Figure is an image shown inline.
type Figure struct {
	// Caption is shown under the image.
	Caption string
	// Alt is the text alternative of the image; empty means Caption.
	Alt string
	// MIME is the media type of Data: "image/png" or "image/svg+xml".
	MIME string
	// Data is the encoded image.
	Data []byte
}

// Table is a table with an optional caption and header row.
type Table struct {
	// Caption is shown above the table.
	Caption string
	// Header holds the column titles; empty means no header row.
	Header []string
	// Rows hold the cells, row by row.
	Rows [][]string
}

// File is one output file in the report's file list.
type File struct {
	// Name is the file name relative to the output folder.
	Name string
	// Size is the size in bytes.
	Size int64
	// SHA256 is the hex-encoded sha256 sum of the contents.
	SHA256 string
}

// KeyValues returns a two-column table of name-value pairs with the given
// column titles, such as ("parameter", "value").
func KeyValues(caption, keyTitle, valueTitle string, pairs ...[2]string) *Table {
	t := &Table{Caption: caption, Header: []string{keyTitle, valueTitle}}
	for _, p := range pairs {
		t.Rows = append(t.Rows, []string{p[0], p[1]})
	}
	return t
}

// HashBytes returns the File entry of data stored under name.
func HashBytes(name string, data []byte) File {
	s := sha256.Sum256(data)
	return File{Name: name, Size: int64(len(data)), SHA256: hex.EncodeToString(s[:])}
}

// HashFile returns the File entry of the file at path, listed as name.
func HashFile(path, name string) (File, error) {
	f, err := os.Open(path)
	if err != nil {
		return File{}, err
	}
	defer f.Close()
	h := sha256.New()
	n, err := io.Copy(h, f)
	if err != nil {
		return File{}, fmt.Errorf("report: hashing %s: %w", path, err)
	}
	return File{Name: name, Size: n, SHA256: hex.EncodeToString(h.Sum(nil))}, nil
}

//go:embed report.html.tmpl report.css
var assets embed.FS

var page = template.Must(template.New("report.html.tmpl").Funcs(template.FuncMap{
	"css":  func() template.CSS { return template.CSS(css) },
	"size": humanSize,
}).ParseFS(assets, "report.html.tmpl"))

var css = func() string {
	b, err := assets.ReadFile("report.css")
	if err != nil {
		panic("report: " + err.Error())
	}
	return string(b)
}()

// figureView is a figure ready for the template.
type figureView struct {
	Number        int
	Caption, Alt  string
	Src           template.URL
	Width, Height int
}

type sectionView struct {
	Heading string
	ID      string
	Text    []string
	Figures []figureView
	Tables  []Table
}

type pageView struct {
	Title     string
	Summary   []string
	Warnings  []string
	Sections  []sectionView
	Files     []File
	Generator string
}

// view checks the figures and lays the report out as sections.
func (r *Report) view() (*pageView, error) {
	v := &pageView{Title: r.Title, Summary: r.Summary, Warnings: r.Warnings, Files: r.Files, Generator: r.Generator}
	if v.Generator == "" {
		v.Generator = "cmbflux"
	}
	if strings.TrimSpace(v.Title) == "" {
		v.Title = v.Generator + " report" // HTML requires a non-empty title
	}
	ids := map[string]int{}
	nfig := 0
	add := func(s Section) error {
		sv := sectionView{Heading: s.Heading, Text: s.Text, Tables: s.Tables, ID: anchor(s.Heading, ids)}
		for i, f := range s.Figures {
			fv, err := figureOf(f)
			if err != nil {
				return fmt.Errorf("report: section %q, figure %d: %w", s.Heading, i+1, err)
			}
			nfig++
			fv.Number = nfig
			sv.Figures = append(sv.Figures, fv)
		}
		v.Sections = append(v.Sections, sv)
		return nil
	}
	if len(r.Figures) > 0 {
		if err := add(Section{Heading: "Figures", Figures: r.Figures}); err != nil {
			return nil, err
		}
	}
	for _, t := range []struct {
		h string
		t *Table
	}{{"Parameters", r.Parameters}, {"Conventions", r.Conventions}, {"Diagnostics", r.Diagnostics}} {
		if t.t != nil {
			if err := add(Section{Heading: t.h, Tables: []Table{*t.t}}); err != nil {
				return nil, err
			}
		}
	}
	for _, s := range r.Sections {
		if err := add(s); err != nil {
			return nil, err
		}
	}
	return v, nil
}

// anchor returns a unique fragment identifier for a heading.
func anchor(h string, seen map[string]int) string {
	var b strings.Builder
	for _, c := range strings.ToLower(h) {
		switch {
		case c >= 'a' && c <= 'z', c >= '0' && c <= '9':
			b.WriteRune(c)
		case b.Len() > 0 && !strings.HasSuffix(b.String(), "-"):
			b.WriteByte('-')
		}
	}
	id := strings.Trim(b.String(), "-")
	if id == "" {
		id = "section"
	}
	seen[id]++
	if n := seen[id]; n > 1 {
		id += "-" + strconv.Itoa(n)
	}
	return id
}

// figureOf checks a figure's type against its bytes and makes its data URI.
func figureOf(f Figure) (figureView, error) {
	fv := figureView{Caption: f.Caption, Alt: f.Alt}
	if fv.Alt == "" {
		fv.Alt = f.Caption
	}
	switch f.MIME {
	case "image/png":
		cfg, err := png.DecodeConfig(bytes.NewReader(f.Data))
		if err != nil {
			return fv, fmt.Errorf("data is not a PNG image: %v", err)
		}
		fv.Width, fv.Height = cfg.Width, cfg.Height
	case "image/svg+xml":
		head := strings.TrimSpace(string(f.Data[:min(len(f.Data), 512)]))
		if !strings.HasPrefix(head, "<?xml") && !strings.HasPrefix(head, "<svg") {
			return fv, fmt.Errorf("data is not an SVG document")
		}
		fv.Width, fv.Height = svgSize(f.Data)
	default:
		return fv, fmt.Errorf("media type %q, want image/png or image/svg+xml", f.MIME)
	}
	// The media type is one of two fixed strings and the payload is
	// base64, so the URL cannot break out of its attribute.
	fv.Src = template.URL("data:" + f.MIME + ";base64," + base64.StdEncoding.EncodeToString(f.Data))
	return fv, nil
}

var (
	svgRoot   = regexp.MustCompile(`<svg\s[^>]*>`)
	svgWidth  = regexp.MustCompile(`\swidth="([0-9.]+)(pt|px)?"`)
	svgHeight = regexp.MustCompile(`\sheight="([0-9.]+)(pt|px)?"`)
)

// svgSize returns the width and height given on the root element of an
// SVG document in points or pixels, as whole numbers, or zeros. The
// report shows one point as one CSS pixel, the scale at which the PNG
// figures of package figure are drawn, so that a figure has the same size
// in either format.
func svgSize(data []byte) (w, h int) {
	root := svgRoot.Find(data[:min(len(data), 4096)])
	mw, mh := svgWidth.FindSubmatch(root), svgHeight.FindSubmatch(root)
	if mw == nil || mh == nil {
		return 0, 0
	}
	fw, err1 := strconv.ParseFloat(string(mw[1]), 64)
	fh, err2 := strconv.ParseFloat(string(mh[1]), 64)
	if err1 != nil || err2 != nil || fw <= 0 || fh <= 0 {
		return 0, 0
	}
	return int(math.Round(fw)), int(math.Round(fh))
}

// humanSize formats a byte count.
func humanSize(n int64) string {
	switch {
	case n < 1024:
		return strconv.FormatInt(n, 10) + " B"
	case n < 1024*1024:
		return strconv.FormatFloat(float64(n)/1024, 'f', 1, 64) + " KiB"
	}
	return strconv.FormatFloat(float64(n)/(1024*1024), 'f', 1, 64) + " MiB"
}

// Write writes the report as one HTML5 document.
func (r *Report) Write(w io.Writer) error {
	v, err := r.view()
	if err != nil {
		return err
	}
	return page.Execute(w, v)
}

// WriteFile writes the report to path through a temporary file in the
// same folder, synced and renamed into place, so that path holds either
// the whole report or what it held before.
func (r *Report) WriteFile(path string) error {
	var b bytes.Buffer
	if err := r.Write(&b); err != nil {
		return err
	}
	dir := filepath.Dir(path)
	f, err := os.CreateTemp(dir, "."+filepath.Base(path)+".tmp*")
	if err != nil {
		return err
	}
	tmp := f.Name()
	_, err = f.Write(b.Bytes())
	if err == nil {
		err = f.Sync()
	}
	if cerr := f.Close(); err == nil {
		err = cerr
	}
	if err == nil {
		err = os.Chmod(tmp, 0o644)
	}
	if err == nil {
		err = os.Rename(tmp, path)
	}
	if err != nil {
		os.Remove(tmp)
		return fmt.Errorf("report: writing %s: %w", path, err)
	}
	return nil
}
