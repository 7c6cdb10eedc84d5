// Package report writes the self-contained HTML report of a build, a
// sweep or a comparison: title, job summary, warnings at the top, figures
// inline as data URIs, parameter, convention and diagnostics tables, free
// sections and the list of output files with their sha256 sums.
//
// The report is one HTML5 file that needs nothing else to be read: no
// external style sheet, script, font or image, and a content security
// policy that forbids loading any. All text is escaped by html/template.
// The same Report gives the same bytes.
package report
