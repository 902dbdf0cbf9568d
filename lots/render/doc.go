// Package render writes lotproof results as aligned text tables, CSV or
// JSON. Every command builds its result as a plain struct; the JSON form is
// that struct, and the table and CSV forms are Tables built from it, so the
// three never disagree.
package render
