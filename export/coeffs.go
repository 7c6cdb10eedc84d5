package export

import (
	"bufio"
	"bytes"
	"encoding/csv"
	"encoding/json"
	"fmt"
	"io"
	"math"
	"path/filepath"
	"strconv"
	"strings"

	"cmbflux/flux/sh"
)

// Format names a file format written and read by this package.
type Format string

// The formats. Coefficient tables come as FormatText, FormatCSV and
// FormatJSON; grids as FormatText, FormatCSV and FormatNetCDF.
const (
	FormatText   Format = "text"
	FormatCSV    Format = "csv"
	FormatJSON   Format = "json"
	FormatNetCDF Format = "netcdf"
)

// FormatFromPath picks the format from a file name extension: .txt, .dat
// and .tab give FormatText, .csv FormatCSV, .json FormatJSON and .nc
// FormatNetCDF. Other extensions give an error naming the accepted ones.
func FormatFromPath(path string) (Format, error) {
	switch strings.ToLower(filepath.Ext(path)) {
	case ".txt", ".dat", ".tab":
		return FormatText, nil
	case ".csv":
		return FormatCSV, nil
	case ".json":
		return FormatJSON, nil
	case ".nc":
		return FormatNetCDF, nil
	}
	return "", fmt.Errorf("export: cannot tell the format of %q from its extension (want .txt, .dat, .tab, .csv, .json or .nc)", path)
}

// RowOrder is the order of the rows in a coefficient table.
type RowOrder int

const (
	// LMajor lists degree by degree: l ascending, then m ascending.
	LMajor RowOrder = iota
	// MMajor lists order by order: m ascending, then l ascending.
	MMajor
)

// String returns "l-major" or "m-major", the values of the row_order key.
func (o RowOrder) String() string {
	if o == MMajor {
		return "m-major"
	}
	return "l-major"
}

// CoeffOptions selects how coefficients are written. The zero value writes
// the real cos/sin form in sh.Canonical, degree 0 included, l-major.
type CoeffOptions struct {
	// Conv is the convention written; the coefficients are converted to it
	// through flux/sh when they carry another one. The zero value is
	// sh.Canonical.
	Conv sh.Convention
	// Complex writes the complex form (columns l m re im) instead of the
	// real cos/sin form.
	Complex bool
	// NegativeOrders writes m = -l..l in the complex form; otherwise only
	// m = 0..l (the negative orders of a real field follow from them; the
	// header says how). Ignored for the real form.
	NegativeOrders bool
	// OmitDegree0 leaves out the rows of degree 0 (the mean).
	OmitDegree0 bool
	// Order is the row order.
	Order RowOrder
}

// row is one data row: degree, order and the two numbers (cos, sin or re, im).
type row struct {
	l, m int
	a, b float64
}

// coeffTable is the content common to the three coefficient formats.
type coeffTable struct {
	header  []kv
	columns [4]string
	rows    []row
}

func legendreText(cs bool) string {
	if cs {
		return "P_l^m(x) = (-1)^m (1 - x^2)^(m/2) d^m/dx^m P_l(x), Condon-Shortley phase included"
	}
	return "P_l^m(x) = (1 - x^2)^(m/2) d^m/dx^m P_l(x), no Condon-Shortley phase"
}

func normText(n sh.Normalization, complexForm bool) string {
	d := "(2 - delta_m0) "
	if complexForm {
		d = ""
	}
	switch n {
	case sh.Orthonormal:
		return "N_lm = sqrt(" + d + "(2l+1)/(4 pi) (l-m)!/(l+m)!)"
	case sh.FourPi:
		return "N_lm = sqrt(" + d + "(2l+1) (l-m)!/(l+m)!)"
	case sh.Schmidt:
		return "N_lm = sqrt(" + d + "(l-m)!/(l+m)!)"
	case sh.Unnormalized:
		return "N_lm = 1"
	}
	panic(fmt.Sprintf("export: unknown normalization %v", n))
}

func csText(cs bool) string {
	if cs {
		return "included"
	}
	return "excluded"
}

// buildCoeffTable converts c as asked and lays out header and rows.
func buildCoeffTable(c *sh.Coeffs, meta *Meta, opt *CoeffOptions) (*coeffTable, error) {
	if c == nil {
		panic("export: nil coefficients")
	}
	if meta == nil {
		meta = &Meta{}
	}
	if opt == nil {
		opt = &CoeffOptions{}
	}
	if err := meta.check(); err != nil {
		return nil, err
	}
	if opt.Conv.Norm < sh.Orthonormal || opt.Conv.Norm > sh.Unnormalized {
		return nil, fmt.Errorf("export: unknown normalization %v", opt.Conv.Norm)
	}
	cc, err := convertCoeffs(c, opt.Conv)
	if err != nil {
		return nil, err
	}
	t := &coeffTable{}
	form, orders, expansion := "real", "0..l", "f(theta, phi) = sum_{l} sum_{m=0..l} N_lm P_l^m(cos theta) [cos_lm cos(m phi) + sin_lm sin(m phi)]"
	t.columns = [4]string{"l", "m", "cos", "sin"}
	var cx *sh.ComplexCoeffs
	if opt.Complex {
		cx = toComplex(cc)
		form, expansion = "complex", complexExpansion(opt.Conv.CondonShortley)
		orders = "0..l; " + complexNegativeRule(opt.Conv.CondonShortley)
		if opt.NegativeOrders {
			orders = "-l..l"
		}
		t.columns = [4]string{"l", "m", "re", "im"}
	}
	lmin := 0
	if opt.OmitDegree0 {
		lmin = 1
	}
	d0 := "included"
	if opt.OmitDegree0 {
		d0 = "omitted"
	}
	nrows := 0
	mmin := func(l int) int { return 0 }
	if opt.Complex && opt.NegativeOrders {
		mmin = func(l int) int { return -l }
	}
	add := func(l, m int) error {
		var r row
		if cx != nil {
			a := cx.At(l, m)
			r.a, r.b = real(a), imag(a)
		} else {
			r.a, r.b = cc.At(l, m)
		}
		r.l, r.m = l, m
		// A negative zero (from a sign change of a zero) is written as 0.
		r.a, r.b = r.a+0, r.b+0
		if !finite(r.a) || !finite(r.b) {
			return fmt.Errorf("export: coefficient (l, m) = (%d, %d) is not finite: %v, %v", l, m, r.a, r.b)
		}
		t.rows = append(t.rows, r)
		nrows++
		return nil
	}
	switch opt.Order {
	case LMajor:
		for l := lmin; l <= cc.LMax; l++ {
			for m := mmin(l); m <= l; m++ {
				if err := add(l, m); err != nil {
					return nil, err
				}
			}
		}
	case MMajor:
		lo := 0
		if opt.Complex && opt.NegativeOrders {
			lo = -cc.LMax
		}
		for m := lo; m <= cc.LMax; m++ {
			for l := max(lmin, abs(m)); l <= cc.LMax; l++ {
				if err := add(l, m); err != nil {
					return nil, err
				}
			}
		}
	default:
		return nil, fmt.Errorf("export: unknown row order %d", int(opt.Order))
	}
	t.header = []kv{
		{"format", "cmbflux-coefficients/" + strconv.Itoa(FormatVersion)},
		{"quantity", orUnspecified(meta.Quantity)},
		{"units", orUnspecified(meta.Units)},
		{"sign", orUnspecified(meta.Sign)},
		{"form", form},
		{"normalization", opt.Conv.Norm.String()},
		{"condon_shortley_phase", csText(opt.Conv.CondonShortley)},
		{"expansion", expansion},
		{"normalization_factor", normText(opt.Conv.Norm, opt.Complex)},
		{"legendre", legendreText(opt.Conv.CondonShortley)},
		{"colatitude", "theta = 0 at the north pole, pi at the south pole"},
		{"longitude_origin", "phi = 0 at the Greenwich meridian"},
		{"longitude_direction", "phi increases eastward"},
		{"reference_radius_km", fmtFloat(meta.radiusKm())},
		{"lmax", strconv.Itoa(cc.LMax)},
		{"degree_0", d0},
		{"orders", orders},
		{"row_order", opt.Order.String()},
		{"rows", strconv.Itoa(nrows)},
		{"columns", strings.Join(t.columns[:], " ")},
	}
	t.header = append(t.header, meta.provenance()...)
	return t, nil
}

func finite(v float64) bool { return !math.IsNaN(v) && !math.IsInf(v, 0) }

func abs(i int) int {
	if i < 0 {
		return -i
	}
	return i
}

// writeHeader writes "# key = value" lines after a title line. The second
// line, header_lines, counts every '#' line (title included), so that tools
// which do not skip comments can be told how many lines to skip.
func writeHeader(w *bufio.Writer, title string, h []kv) {
	w.WriteString("# " + title + "\n")
	w.WriteString("# header_lines = " + strconv.Itoa(len(h)+2) + "\n")
	for _, e := range h {
		w.WriteString("# " + e.k + " = " + e.v + "\n")
	}
}

// WriteCoeffsText writes c as a plain-text table: a header of "# key =
// value" lines (see the package documentation), then one row per (l, m):
// "l m cos sin" (real form) or "l m re im" (complex form), separated by one
// space, numbers printed with the fewest digits that read back exactly.
func WriteCoeffsText(w io.Writer, c *sh.Coeffs, meta *Meta, opt *CoeffOptions) error {
	t, err := buildCoeffTable(c, meta, opt)
	if err != nil {
		return err
	}
	bw := bufio.NewWriter(w)
	writeHeader(bw, "cmbflux spherical-harmonic coefficients", t.header)
	var b []byte
	for _, r := range t.rows {
		b = b[:0]
		b = strconv.AppendInt(b, int64(r.l), 10)
		b = append(b, ' ')
		b = strconv.AppendInt(b, int64(r.m), 10)
		b = append(b, ' ')
		b = strconv.AppendFloat(b, r.a, 'g', -1, 64)
		b = append(b, ' ')
		b = strconv.AppendFloat(b, r.b, 'g', -1, 64)
		b = append(b, '\n')
		bw.Write(b)
	}
	return bw.Flush()
}

// WriteCoeffsCSV writes c as CSV (RFC 4180): the same "# key = value" header
// lines as the text table, then a heading record "l,m,cos,sin" (or
// "l,m,re,im") and one record per (l, m). Readers that do not skip "#" lines
// can be told to skip the header lines, whose count is fixed by the content
// (header_lines says how many there are).
func WriteCoeffsCSV(w io.Writer, c *sh.Coeffs, meta *Meta, opt *CoeffOptions) error {
	t, err := buildCoeffTable(c, meta, opt)
	if err != nil {
		return err
	}
	bw := bufio.NewWriter(w)
	writeHeader(bw, "cmbflux spherical-harmonic coefficients", t.header)
	cw := csv.NewWriter(bw)
	cw.Write(t.columns[:])
	rec := make([]string, 4)
	for _, r := range t.rows {
		rec[0], rec[1] = strconv.Itoa(r.l), strconv.Itoa(r.m)
		rec[2], rec[3] = fmtFloat(r.a), fmtFloat(r.b)
		cw.Write(rec)
	}
	cw.Flush()
	if err := cw.Error(); err != nil {
		return err
	}
	return bw.Flush()
}

// coeffJSON is the layout of a JSON coefficient file. Header values are the
// text header's values; lmax, reference_radius_km and rows are numbers.
type coeffJSON struct {
	Format              string            `json:"format"`
	Quantity            string            `json:"quantity"`
	Units               string            `json:"units"`
	Sign                string            `json:"sign"`
	Form                string            `json:"form"`
	Normalization       string            `json:"normalization"`
	CondonShortleyPhase string            `json:"condon_shortley_phase"`
	Expansion           string            `json:"expansion"`
	NormalizationFactor string            `json:"normalization_factor"`
	Legendre            string            `json:"legendre"`
	Colatitude          string            `json:"colatitude"`
	LongitudeOrigin     string            `json:"longitude_origin"`
	LongitudeDirection  string            `json:"longitude_direction"`
	ReferenceRadiusKm   json.Number       `json:"reference_radius_km"`
	LMax                json.Number       `json:"lmax"`
	Degree0             string            `json:"degree_0"`
	Orders              string            `json:"orders"`
	RowOrder            string            `json:"row_order"`
	Rows                json.Number       `json:"rows"`
	Columns             []string          `json:"columns"`
	Version             string            `json:"cmbflux_version"`
	Inputs              []Input           `json:"inputs"`
	Params              map[string]string `json:"parameters"`
}

// WriteCoeffsJSON writes c as one JSON object (RFC 8259) whose members carry
// the text header's keys (inputs as a list of {name, sha256}, parameters as an
// object with sorted keys) and "data", a list of [l, m, cos, sin] (or [l, m,
// re, im]) arrays. Numbers read back exactly.
func WriteCoeffsJSON(w io.Writer, c *sh.Coeffs, meta *Meta, opt *CoeffOptions) error {
	t, err := buildCoeffTable(c, meta, opt)
	if err != nil {
		return err
	}
	if meta == nil {
		meta = &Meta{}
	}
	h := map[string]string{}
	for _, e := range t.header {
		h[e.k] = e.v
	}
	j := coeffJSON{
		Format: h["format"], Quantity: h["quantity"], Units: h["units"], Sign: h["sign"],
		Form: h["form"], Normalization: h["normalization"], CondonShortleyPhase: h["condon_shortley_phase"],
		Expansion: h["expansion"], NormalizationFactor: h["normalization_factor"], Legendre: h["legendre"],
		Colatitude: h["colatitude"], LongitudeOrigin: h["longitude_origin"], LongitudeDirection: h["longitude_direction"],
		ReferenceRadiusKm: json.Number(h["reference_radius_km"]), LMax: json.Number(h["lmax"]),
		Degree0: h["degree_0"], Orders: h["orders"], RowOrder: h["row_order"], Rows: json.Number(h["rows"]),
		Columns: t.columns[:], Version: meta.Version, Inputs: meta.Inputs, Params: meta.Params,
	}
	if j.Inputs == nil {
		j.Inputs = []Input{}
	}
	if j.Params == nil {
		j.Params = map[string]string{}
	}
	b, err := json.MarshalIndent(&j, "", " ")
	if err != nil {
		return err
	}
	// The rows go one per line after the header members.
	b = bytes.TrimSuffix(bytes.TrimSpace(b), []byte("}"))
	b = bytes.TrimRight(b, " \n")
	b = append(b, ",\n \"data\": ["...)
	for i, r := range t.rows {
		if i > 0 {
			b = append(b, ',')
		}
		b = append(b, "\n  ["...)
		b = strconv.AppendInt(b, int64(r.l), 10)
		b = append(b, ", "...)
		b = strconv.AppendInt(b, int64(r.m), 10)
		b = append(b, ", "...)
		// 'g' with the shortest digits is a valid JSON number
		// (RFC 8259 section 6) that reads back exactly.
		b = strconv.AppendFloat(b, r.a, 'g', -1, 64)
		b = append(b, ", "...)
		b = strconv.AppendFloat(b, r.b, 'g', -1, 64)
		b = append(b, ']')
	}
	b = append(b, "\n ]\n}\n"...)
	_, err = w.Write(b)
	return err
}

// WriteCoeffs writes c in the given format (FormatText, FormatCSV or
// FormatJSON).
func WriteCoeffs(w io.Writer, f Format, c *sh.Coeffs, meta *Meta, opt *CoeffOptions) error {
	switch f {
	case FormatText:
		return WriteCoeffsText(w, c, meta, opt)
	case FormatCSV:
		return WriteCoeffsCSV(w, c, meta, opt)
	case FormatJSON:
		return WriteCoeffsJSON(w, c, meta, opt)
	}
	return fmt.Errorf("export: coefficients cannot be written as %q (want text, csv or json)", f)
}

// WriteCoeffsFile writes c atomically to path in the format its extension
// names (see FormatFromPath).
func WriteCoeffsFile(path string, c *sh.Coeffs, meta *Meta, opt *CoeffOptions) error {
	f, err := FormatFromPath(path)
	if err != nil {
		return err
	}
	return WriteFile(path, func(w io.Writer) error { return WriteCoeffs(w, f, c, meta, opt) })
}
