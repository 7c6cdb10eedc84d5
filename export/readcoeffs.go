package export

import (
	"bufio"
	"bytes"
	"encoding/csv"
	"encoding/json"
	"errors"
	"fmt"
	"io"
	"math"
	"os"
	"strconv"
	"strings"

	"cmbflux/flux/sh"
)

// CoeffReadOptions tells ReadCoeffs what it cannot learn from the file. The
// zero value detects the format and requires a cmbflux header.
type CoeffReadOptions struct {
	// Format is "" (detect: JSON if the content starts with '{', CSV if
	// the first data line has a comma, text otherwise) or one of
	// FormatText, FormatCSV, FormatJSON.
	Format Format
	// Conv declares the convention of a table without a cmbflux header
	// (a plain "l m cos sin" table made elsewhere); such a table is
	// refused when Conv is nil. For a file with a cmbflux header, a
	// non-nil Conv must agree with the header.
	Conv *sh.Convention
	// Complex declares that a table without a cmbflux header holds the
	// complex form "l m re im" (m = 0..l, or -l..l with
	// c_l,-m = s_m conj(c_lm), s_m = (-1)^m with the Condon-Shortley phase
	// and 1 without) in the convention of Conv (see the package
	// documentation).
	Complex bool
}

// CoeffTable is a coefficient file as read.
type CoeffTable struct {
	// Coeffs holds the real cos/sin coefficients in the file's
	// convention (Coeffs.Conv); complex tables are turned into this form.
	Coeffs *sh.Coeffs
	// Meta holds the header's quantity, units, sign, reference radius and
	// provenance (zero for a plain table).
	Meta Meta
	// Header holds every "key = value" header line of a text or CSV file
	// (repeated keys joined with "\n"); nil for a plain table.
	Header map[string]string
	// Complex says the file held the complex form.
	Complex bool
	// Declared says the convention came from CoeffReadOptions.Conv, not
	// from the file.
	Declared bool
	// Warnings lists suspicious but usable content, each "file:line: text"
	// or "file: text".
	Warnings []string
}

// ReadCoeffsFile reads the coefficient file at path (see ReadCoeffs).
func ReadCoeffsFile(path string, opt *CoeffReadOptions) (*CoeffTable, error) {
	f, err := os.Open(path)
	if err != nil {
		return nil, err
	}
	defer f.Close()
	return ReadCoeffs(f, path, opt)
}

// maxReadLMax bounds the degree accepted from a file, so that a corrupt
// file cannot ask for an enormous allocation: 2700, the degree to which the
// Legendre recursions of flux/sh are stable (Holmes & Featherstone 2002).
// Fuzz targets lower it.
var maxReadLMax = 2700

// ReadCoeffs reads a coefficient table written by WriteCoeffsText,
// WriteCoeffsCSV or WriteCoeffsJSON, or a plain "l m cos sin" table (no
// header, "#" comment lines, or non-numeric heading lines before the data)
// whose convention opt.Conv declares. name is used in error messages.
//
// Errors (of type *InputError, wrapping ErrBadInput) name the file, the line
// and the cause: non-numeric fields, a wrong number of columns, l < 0,
// m > l, a duplicate (l, m), a nonzero sine (or imaginary part) at m = 0,
// values that are not finite, a header that contradicts the data or the
// declared convention. Pairs (l, m) up to lmax that the file lacks are read
// as zero with a warning.
func ReadCoeffs(r io.Reader, name string, opt *CoeffReadOptions) (*CoeffTable, error) {
	if opt == nil {
		opt = &CoeffReadOptions{}
	}
	data, err := io.ReadAll(r)
	if err != nil {
		return nil, fmt.Errorf("%s: %w", name, err)
	}
	f := opt.Format
	if f == "" {
		f = detectCoeffFormat(data)
	}
	var p *parsed
	switch f {
	case FormatText:
		p, err = parseCoeffText(data, name)
	case FormatCSV:
		p, err = parseCoeffCSV(data, name)
	case FormatJSON:
		p, err = parseCoeffJSON(data, name)
	default:
		return nil, fmt.Errorf("export: coefficients cannot be read as %q (want text, csv or json)", f)
	}
	if err != nil {
		return nil, err
	}
	return p.assemble(name, opt)
}

func detectCoeffFormat(data []byte) Format {
	t := bytes.TrimLeft(data, " \t\r\n\ufeff")
	if len(t) > 0 && t[0] == '{' {
		return FormatJSON
	}
	sc := bufio.NewScanner(bytes.NewReader(data))
	sc.Buffer(nil, 1<<20)
	for sc.Scan() {
		line := strings.TrimSpace(sc.Text())
		if line == "" || line[0] == '#' {
			continue
		}
		if strings.Contains(line, ",") {
			return FormatCSV
		}
		return FormatText
	}
	return FormatText
}

// rowAt is a data row with the line it came from.
type rowAt struct {
	row
	line int
}

// hval is a header value with its line (0 for JSON members).
type hval struct {
	v    string
	line int
}

// parsed is what a format parser hands to assemble.
type parsed struct {
	header   map[string]hval // cmbflux header keys, nil if none
	raw      map[string]string
	inputs   []Input
	params   map[string]string
	rows     []rowAt
	warnings []string
}

const formatPrefix = "cmbflux-coefficients/"

// parseHeaderLine splits "# key = value". ok is false for lines without '='.
func parseHeaderLine(line string) (k, v string, ok bool) {
	s := strings.TrimSpace(strings.TrimPrefix(line, "#"))
	i := strings.IndexByte(s, '=')
	if i <= 0 {
		return "", "", false
	}
	return strings.TrimSpace(s[:i]), strings.TrimSpace(s[i+1:]), true
}

// addHeader records a header line; it returns an error for a malformed
// provenance line.
func (p *parsed) addHeader(name string, line int, k, v string) error {
	if p.raw == nil {
		p.raw = map[string]string{}
		p.header = map[string]hval{}
		p.params = map[string]string{}
	}
	if old, ok := p.raw[k]; ok {
		p.raw[k] = old + "\n" + v
	} else {
		p.raw[k] = v
	}
	switch {
	case k == "input":
		sum, file, _ := strings.Cut(v, " ")
		p.inputs = append(p.inputs, Input{Name: strings.TrimSpace(file), SHA256: sum})
	case strings.HasPrefix(k, "param."):
		if _, dup := p.params[k[len("param."):]]; dup {
			return inputErr(name, line, "parameter %q given twice", k[len("param."):])
		}
		p.params[k[len("param."):]] = v
	default:
		if old, dup := p.header[k]; dup {
			return inputErr(name, line, "header key %q given twice (first at line %d)", k, old.line)
		}
		p.header[k] = hval{v, line}
	}
	return nil
}

func (p *parsed) ours() bool {
	f, ok := p.header["format"]
	return ok && strings.HasPrefix(f.v, formatPrefix)
}

// parseNumber parses a float, accepting Fortran's D exponent marker.
func parseNumber(s string) (float64, error) {
	v, err := strconv.ParseFloat(s, 64)
	if err != nil {
		if t := strings.NewReplacer("D", "e", "d", "e").Replace(s); t != s {
			if v2, err2 := strconv.ParseFloat(t, 64); err2 == nil {
				return v2, nil
			}
		}
		var ne *strconv.NumError
		if errors.As(err, &ne) && ne.Err == strconv.ErrRange {
			return 0, fmt.Errorf("%q is out of the float64 range", s)
		}
		return 0, fmt.Errorf("%q is not a number", s)
	}
	return v, nil
}

// parseRow parses the four fields of a data row.
func parseRow(name string, line int, f []string, cols [4]string) (rowAt, error) {
	if len(f) != 4 {
		return rowAt{}, inputErr(name, line, "%d columns, want 4 (%s)", len(f), strings.Join(cols[:], " "))
	}
	var r rowAt
	r.line = line
	var err error
	if r.l, err = strconv.Atoi(f[0]); err != nil {
		return r, inputErr(name, line, "degree l: %q is not an integer", f[0])
	}
	if r.m, err = strconv.Atoi(f[1]); err != nil {
		return r, inputErr(name, line, "order m: %q is not an integer", f[1])
	}
	if r.a, err = parseNumber(f[2]); err != nil {
		return r, inputErr(name, line, "%s: %v", cols[2], err)
	}
	if r.b, err = parseNumber(f[3]); err != nil {
		return r, inputErr(name, line, "%s: %v", cols[3], err)
	}
	return r, nil
}

func isInt(s string) bool {
	_, err := strconv.Atoi(s)
	return err == nil
}

func parseCoeffText(data []byte, name string) (*parsed, error) {
	p := &parsed{}
	sc := bufio.NewScanner(bytes.NewReader(data))
	sc.Buffer(nil, 1<<20)
	line := 0
	cols := [4]string{"l", "m", "value 1", "value 2"}
	for sc.Scan() {
		line++
		s := strings.TrimSpace(sc.Text())
		if line == 1 {
			s = strings.TrimPrefix(s, "\ufeff")
		}
		if s == "" {
			continue
		}
		if s[0] == '#' {
			if len(p.rows) > 0 {
				continue // a comment among the data
			}
			if k, v, ok := parseHeaderLine(s); ok {
				if err := p.addHeader(name, line, k, v); err != nil {
					return nil, err
				}
			}
			continue
		}
		f := strings.Fields(s)
		if len(p.rows) == 0 && !isInt(f[0]) && !p.ours() {
			p.warnings = append(p.warnings, fmt.Sprintf("%s:%d: skipped as a heading line: %q", name, line, s))
			continue
		}
		r, err := parseRow(name, line, f, cols)
		if err != nil {
			return nil, err
		}
		p.rows = append(p.rows, r)
	}
	if err := sc.Err(); err != nil {
		return nil, inputErr(name, line+1, "%v", err)
	}
	return p, nil
}

func parseCoeffCSV(data []byte, name string) (*parsed, error) {
	p := &parsed{}
	// The header lines come first; csv.Reader skips them as comments but
	// keeps counting lines, so FieldPos stays true to the file.
	sc := bufio.NewScanner(bytes.NewReader(data))
	sc.Buffer(nil, 1<<20)
	line := 0
	for sc.Scan() {
		line++
		s := strings.TrimSpace(sc.Text())
		if line == 1 {
			s = strings.TrimPrefix(s, "\ufeff")
		}
		if s == "" {
			continue
		}
		if s[0] != '#' {
			break
		}
		if k, v, ok := parseHeaderLine(s); ok {
			if err := p.addHeader(name, line, k, v); err != nil {
				return nil, err
			}
		}
	}
	cols := [4]string{"l", "m", "value 1", "value 2"}
	err := eachCSVRecord(name, bytes.TrimPrefix(data, []byte("\ufeff")), func(ln int, rec []string) error {
		for i := range rec {
			rec[i] = strings.TrimSpace(rec[i])
		}
		if len(p.rows) == 0 && len(rec) > 0 && !isInt(rec[0]) {
			if p.ours() {
				want := p.header["columns"].v
				if got := strings.Join(rec, " "); got != want {
					return inputErr(name, ln, "heading %q does not match the header's columns %q", strings.Join(rec, ","), want)
				}
			} else {
				p.warnings = append(p.warnings, fmt.Sprintf("%s:%d: skipped as a heading line: %q", name, ln, strings.Join(rec, ",")))
			}
			return nil
		}
		r, err := parseRow(name, ln, rec, cols)
		if err != nil {
			return err
		}
		p.rows = append(p.rows, r)
		return nil
	})
	if err != nil {
		return nil, err
	}
	return p, nil
}

// eachCSVRecord calls fn with the 1-based line and the fields of every
// record of the CSV text data (RFC 4180 quoting, '#' comment lines, any
// number of fields per record, leading spaces trimmed); a CSV syntax error
// becomes an InputError at its line, and fn's error stops the reading.
func eachCSVRecord(name string, data []byte, fn func(line int, rec []string) error) error {
	cr := csv.NewReader(bytes.NewReader(data))
	cr.Comment = '#'
	cr.FieldsPerRecord = -1
	cr.TrimLeadingSpace = true
	for {
		rec, err := cr.Read()
		if err == io.EOF {
			return nil
		}
		if err != nil {
			var pe *csv.ParseError
			if errors.As(err, &pe) {
				return inputErr(name, pe.Line, "%v", pe.Err)
			}
			return fmt.Errorf("%s: %w", name, err)
		}
		ln, _ := cr.FieldPos(0)
		if err := fn(ln, rec); err != nil {
			return err
		}
	}
}

// lineAt returns the 1-based line of byte offset off in data.
func lineAt(data []byte, off int64) int {
	if off > int64(len(data)) {
		off = int64(len(data))
	}
	return 1 + bytes.Count(data[:off], []byte("\n"))
}

func parseCoeffJSON(data []byte, name string) (*parsed, error) {
	p := &parsed{}
	dec := json.NewDecoder(bytes.NewReader(data))
	dec.UseNumber()
	syntax := func(err error) error {
		var se *json.SyntaxError
		if errors.As(err, &se) {
			// The decoder's offsets are relative to the value being
			// decoded; a whole-text parse gives the absolute one.
			var v any
			if e := json.Unmarshal(data, &v); errors.As(e, &se) {
				return inputErr(name, lineAt(data, se.Offset), "invalid JSON: %v", se)
			}
			return inputErr(name, lineAt(data, se.Offset), "invalid JSON: %v", se)
		}
		if err == io.EOF || errors.Is(err, io.ErrUnexpectedEOF) {
			return inputErr(name, lineAt(data, int64(len(data))), "unexpected end of the JSON text")
		}
		return inputErr(name, lineAt(data, dec.InputOffset()), "%v", err)
	}
	tok, err := dec.Token()
	if err != nil {
		return nil, syntax(err)
	}
	if d, ok := tok.(json.Delim); !ok || d != '{' {
		return nil, inputErr(name, 1, "want a JSON object")
	}
	members := map[string]json.RawMessage{}
	lines := map[string]int{}
	sawData := false
	// nextLine finds the line of the next value after the decoder's offset.
	nextLine := func() int {
		off := dec.InputOffset()
		for off < int64(len(data)) && strings.IndexByte(" \t\r\n,:", data[off]) >= 0 {
			off++
		}
		return lineAt(data, off)
	}
	for dec.More() {
		tok, err := dec.Token()
		if err != nil {
			return nil, syntax(err)
		}
		key, _ := tok.(string)
		ln := nextLine()
		if _, dup := lines[key]; dup || (key == "data" && sawData) {
			return nil, inputErr(name, ln, "member %q given twice", key)
		}
		lines[key] = ln
		if key != "data" {
			var raw json.RawMessage
			if err := dec.Decode(&raw); err != nil {
				return nil, syntax(err)
			}
			members[key] = raw
			continue
		}
		sawData = true
		tok, err = dec.Token()
		if err != nil {
			return nil, syntax(err)
		}
		if d, ok := tok.(json.Delim); !ok || d != '[' {
			return nil, inputErr(name, ln, "data: want a list of [l, m, a, b] rows")
		}
		for dec.More() {
			rl := nextLine()
			var rec []any
			if err := dec.Decode(&rec); err != nil {
				var ute *json.UnmarshalTypeError
				if errors.As(err, &ute) {
					return nil, inputErr(name, rl, "data row %d: want a list of 4 numbers", len(p.rows)+1)
				}
				return nil, syntax(err)
			}
			f := make([]string, len(rec))
			for i, n := range rec {
				num, ok := n.(json.Number)
				if !ok {
					return nil, inputErr(name, rl, "data row %d: want a list of 4 numbers", len(p.rows)+1)
				}
				f[i] = num.String()
			}
			r, err := parseRow(name, rl, f, [4]string{"l", "m", "value 1", "value 2"})
			if err != nil {
				return nil, err
			}
			p.rows = append(p.rows, r)
		}
		if _, err := dec.Token(); err != nil {
			return nil, syntax(err)
		}
	}
	if _, err := dec.Token(); err != nil {
		return nil, syntax(err)
	}
	if _, err := dec.Token(); err != io.EOF {
		return nil, inputErr(name, nextLine(), "text after the JSON object")
	}
	// Header members: strings, except the numbers and the two lists.
	p.raw = map[string]string{}
	p.header = map[string]hval{}
	p.params = map[string]string{}
	for _, k := range sortedKeys(members) {
		raw := members[k]
		switch k {
		case "inputs":
			if err := json.Unmarshal(raw, &p.inputs); err != nil {
				return nil, inputErr(name, lines[k], "inputs: want a list of {\"name\", \"sha256\"} objects")
			}
			continue
		case "parameters":
			if err := json.Unmarshal(raw, &p.params); err != nil {
				return nil, inputErr(name, lines[k], "parameters: want an object of strings")
			}
			continue
		case "columns":
			var cols []string
			if err := json.Unmarshal(raw, &cols); err != nil {
				return nil, inputErr(name, lines[k], "columns: want a list of strings")
			}
			p.header[k] = hval{strings.Join(cols, " "), lines[k]}
			p.raw[k] = p.header[k].v
			continue
		}
		var v any
		d := json.NewDecoder(bytes.NewReader(raw))
		d.UseNumber()
		if err := d.Decode(&v); err != nil {
			return nil, inputErr(name, lines[k], "%s: %v", k, err)
		}
		var s string
		switch x := v.(type) {
		case string:
			s = x
		case json.Number:
			s = x.String()
		default:
			continue // unknown structured members are ignored
		}
		p.header[k] = hval{s, lines[k]}
		p.raw[k] = s
	}
	if p.params == nil {
		p.params = map[string]string{}
	}
	return p, nil
}

// assemble checks the rows against the header and builds the table.
func (p *parsed) assemble(name string, opt *CoeffReadOptions) (*CoeffTable, error) {
	t := &CoeffTable{Warnings: p.warnings}
	var conv sh.Convention
	complexForm := false
	lmax := -1
	wantRows := -1
	degree0 := true
	hdrErr := func(k, format string, args ...any) error {
		return inputErr(name, p.header[k].line, "header %s: "+format, append([]any{k}, args...)...)
	}
	if p.ours() {
		h := p.header
		ver, err := strconv.Atoi(strings.TrimPrefix(h["format"].v, formatPrefix))
		if err != nil || ver < 1 {
			return nil, hdrErr("format", "%q is not a cmbflux coefficient format version", h["format"].v)
		}
		if ver > FormatVersion {
			return nil, hdrErr("format", "version %d is newer than this cmbflux reads (%d)", ver, FormatVersion)
		}
		for _, k := range []string{"form", "normalization", "condon_shortley_phase"} {
			if _, ok := h[k]; !ok {
				return nil, inputErr(name, 0, "the cmbflux header lacks the key %q", k)
			}
		}
		switch h["form"].v {
		case "real":
		case "complex":
			complexForm = true
		default:
			return nil, hdrErr("form", "%q, want real or complex", h["form"].v)
		}
		if conv.Norm, err = sh.ParseNormalization(h["normalization"].v); err != nil {
			return nil, hdrErr("normalization", "%v", err)
		}
		switch h["condon_shortley_phase"].v {
		case "included":
			conv.CondonShortley = true
		case "excluded":
		default:
			return nil, hdrErr("condon_shortley_phase", "%q, want included or excluded", h["condon_shortley_phase"].v)
		}
		if v, ok := h["lmax"]; ok {
			if lmax, err = strconv.Atoi(v.v); err != nil || lmax < 0 || lmax > maxReadLMax {
				return nil, hdrErr("lmax", "%q is not a degree in 0..%d", v.v, maxReadLMax)
			}
		}
		if v, ok := h["rows"]; ok {
			if wantRows, err = strconv.Atoi(v.v); err != nil || wantRows < 0 {
				return nil, hdrErr("rows", "%q is not a row count", v.v)
			}
		}
		if v, ok := h["degree_0"]; ok {
			switch v.v {
			case "included":
			case "omitted":
				degree0 = false
			default:
				return nil, hdrErr("degree_0", "%q, want included or omitted", v.v)
			}
		}
		if v, ok := h["columns"]; ok {
			want := "l m cos sin"
			if complexForm {
				want = "l m re im"
			}
			if v.v != want {
				return nil, hdrErr("columns", "%q, want %q for the %s form", v.v, want, h["form"].v)
			}
		}
		if v, ok := h["reference_radius_km"]; ok {
			rk, err := strconv.ParseFloat(v.v, 64)
			if err != nil || !(rk > 0) || math.IsInf(rk, 0) {
				return nil, hdrErr("reference_radius_km", "%q is not a positive number", v.v)
			}
			t.Meta.RadiusKm = rk
		}
		if opt.Conv != nil && *opt.Conv != conv {
			return nil, inputErr(name, h["normalization"].line, "the file declares %v but %v was asked for", conv, *opt.Conv)
		}
		t.Meta.Quantity, t.Meta.Units, t.Meta.Sign = h["quantity"].v, h["units"].v, h["sign"].v
		t.Meta.Version = h["cmbflux_version"].v
		t.Meta.Inputs = p.inputs
		if len(p.params) > 0 {
			t.Meta.Params = p.params
		}
		t.Header = p.raw
	} else {
		if opt.Conv == nil {
			return nil, &InputError{File: name, Err: errors.New("no cmbflux header: declare the table's normalization and Condon-Shortley phase")}
		}
		conv = *opt.Conv
		complexForm = opt.Complex
		t.Declared = true
		form := "real cos/sin"
		if complexForm {
			form = "complex"
		}
		t.Warnings = append(t.Warnings, fmt.Sprintf("%s: no cmbflux header: read as %s coefficients in the declared convention (%v)", name, form, conv))
	}
	t.Complex = complexForm
	// Check the rows.
	maxL := 0
	for _, r := range p.rows {
		switch {
		case r.l < 0:
			return nil, inputErr(name, r.line, "degree l = %d is negative", r.l)
		case r.l > maxReadLMax:
			return nil, inputErr(name, r.line, "degree l = %d is above %d", r.l, maxReadLMax)
		case lmax >= 0 && r.l > lmax:
			return nil, inputErr(name, r.line, "degree l = %d is above the header's lmax = %d", r.l, lmax)
		case abs(r.m) > r.l:
			return nil, inputErr(name, r.line, "order m = %d is above degree l = %d", r.m, r.l)
		case r.m < 0 && !complexForm:
			return nil, inputErr(name, r.line, "order m = %d is negative in a real cos/sin table", r.m)
		case !finite(r.a) || !finite(r.b):
			return nil, inputErr(name, r.line, "value is not finite")
		case r.m == 0 && r.b != 0 && complexForm:
			return nil, inputErr(name, r.line, "imaginary part %v at m = 0: a real field has real c_l0", r.b)
		case r.m == 0 && r.b != 0:
			return nil, inputErr(name, r.line, "sine coefficient %v at m = 0 must be zero", r.b)
		}
		maxL = max(maxL, r.l)
	}
	if len(p.rows) == 0 {
		return nil, &InputError{File: name, Err: errors.New("no coefficient rows")}
	}
	if lmax < 0 {
		lmax = maxL
	}
	c := sh.NewCoeffs(lmax, conv)
	// pos[Index(l, m)] and neg[Index(l, m)] hold 1 + the row of (l, m)
	// and (l, -m), or 0.
	pos := make([]int32, sh.NumCoeffs(lmax))
	var neg []int32
	if complexForm {
		neg = make([]int32, sh.NumCoeffs(lmax))
	}
	for k, r := range p.rows {
		at := pos
		if r.m < 0 {
			at = neg
		}
		i := sh.Index(r.l, abs(r.m))
		if first := at[i]; first > 0 {
			return nil, inputErr(name, r.line, "duplicate (l, m) = (%d, %d), first at line %d", r.l, r.m, p.rows[first-1].line)
		}
		at[i] = int32(k + 1)
	}
	if wantRows >= 0 && wantRows != len(p.rows) {
		return nil, inputErr(name, p.header["rows"].line, "header rows = %d but the file has %d data rows", wantRows, len(p.rows))
	}
	var z *sh.ComplexCoeffs
	if complexForm {
		z = sh.NewComplexCoeffs(lmax, conv)
	}
	for _, r := range p.rows {
		i := sh.Index(r.l, abs(r.m))
		switch {
		case !complexForm:
			c.C[i], c.S[i] = r.a, r.b
		case r.m >= 0:
			z.Set(r.l, r.m, complex(r.a, r.b))
			if r.m > 0 && neg[i] == 0 {
				// Only m >= 0 given: A_l,-m = s_m conj(A_lm).
				sm := phaseSign(r.m, conv.CondonShortley)
				z.Set(r.l, -r.m, complex(sm*r.a, -sm*r.b))
			}
		default:
			z.Set(r.l, r.m, complex(r.a, r.b))
			k := pos[i] - 1
			if k < 0 {
				// Only the negative order given: A_lm = s_m conj(A_l,-m).
				sm := phaseSign(r.m, conv.CondonShortley)
				z.Set(r.l, -r.m, complex(sm*r.a, -sm*r.b))
				continue
			}
			sm := phaseSign(r.m, conv.CondonShortley)
			if q := p.rows[k]; r.a != sm*q.a || r.b != -sm*q.b {
				return nil, inputErr(name, r.line, "c_%d,%d = (%v, %v) is not %s of c_%d,%d = (%v, %v) at line %d, as a real field needs (%s)",
					r.l, r.m, r.a, r.b, map[bool]string{true: "-conj", false: "conj"}[sm < 0], r.l, -r.m, q.a, q.b, q.line, complexNegativeRule(conv.CondonShortley))
			}
		}
	}
	if complexForm {
		c = fromComplex(z)
	}
	// Missing pairs are zeros, with a warning.
	var missing []string
	nmiss := 0
	for l := 0; l <= lmax; l++ {
		if l == 0 && !degree0 {
			continue
		}
		var ms []int
		for m := 0; m <= l; m++ {
			i := sh.Index(l, m)
			if pos[i] == 0 && !(complexForm && neg[i] > 0) {
				ms = append(ms, m)
			}
		}
		nmiss += len(ms)
		if len(ms) == 0 || len(missing) >= 8 {
			continue
		}
		if len(ms) == l+1 {
			missing = append(missing, fmt.Sprintf("degree %d (all orders)", l))
		} else {
			for _, m := range ms {
				missing = append(missing, fmt.Sprintf("(%d, %d)", l, m))
			}
		}
	}
	if nmiss > 0 {
		more := ""
		if len(missing) > 8 {
			missing = missing[:8]
			more = ", ..."
		}
		t.Warnings = append(t.Warnings, fmt.Sprintf("%s: %d (l, m) pairs up to lmax = %d are missing and read as zero: %s%s", name, nmiss, lmax, strings.Join(missing, ", "), more))
	}
	t.Coeffs = c
	return t, nil
}
