// Package report lays out lotproof results as one self-contained HTML
// file: inline CSS, inline SVG figures, no scripts and no network
// requests, readable on screen and printable on A4 or Letter paper.
//
// A report is a Document of numbered Sections, each a list of Blocks
// (paragraphs, bullet lists, key-value lists, tables with per-cell status,
// figures and audit trails). The package knows nothing about the analyses
// that fill it: plot functions take plain numbers and labels, and thin
// adapters (adapt_*.go) turn analysis results into blocks. Every string a
// user can influence is escaped by html/template, and plot text by the
// SVG canvas; embedded SVG is checked and its ids are namespaced.
package report
