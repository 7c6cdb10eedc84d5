package report_test

import (
	"bytes"
	"fmt"
	"regexp"

	"cmbflux/export/report"
)

// A report of an invented build: one warning, the standard tables and
// the list of output files. The example prints the section headings in
// the order the page shows them.
func ExampleReport_Write() {
	coeffs := []byte("# l m cos sin\n0 0 65.0 0.0\n")
	r := &report.Report{
		Title:    "Heat-flux build: invented scenario",
		Summary:  []string{"Linear mapping of an invented lowermost-mantle layer to CMB heat flux, q* = 1.2."},
		Warnings: []string{"flux below the adiabat over 12 % of the CMB"},
		Parameters: report.KeyValues("", "parameter", "value",
			[2]string{"q*", "1.2"}, [2]string{"lmax", "12"}),
		Conventions: report.KeyValues("", "property", "value",
			[2]string{"normalization", "orthonormal"}, [2]string{"units", "mW/m²"}),
		Diagnostics: report.KeyValues("", "quantity", "value",
			[2]string{"q_min", "21.4 mW/m²"}),
		Files: []report.File{report.HashBytes("coefficients.txt", coeffs)},
	}
	var b bytes.Buffer
	if err := r.Write(&b); err != nil {
		fmt.Println(err)
		return
	}
	for _, m := range regexp.MustCompile(`<h2[^>]*>([^<]*)</h2>`).FindAllStringSubmatch(b.String(), -1) {
		fmt.Println(m[1])
	}
	// Output:
	// Warnings
	// Summary
	// Parameters
	// Conventions
	// Diagnostics
	// Output files
}
