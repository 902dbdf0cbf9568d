// Package serve is the read-only web view of the lot history behind
// lotproof serve: an overview of suppliers by period, a page per supplier
// (trend charts, signals, latest lots), a page per lot (specimens, values,
// verdicts, the specification limits and the import it came from) and a
// search by lot, heat or specimen id. Every page is also JSON at the same
// URL with ?format=json, and follows ?units=si|us.
//
// Pages are built with html/template, carry the report's stylesheet and
// content security policy (no scripts, no network requests), and draw
// their figures with the report's plotting code. The database is opened
// read-only and every query is parameterised. The trend, which needs the
// whole history, is computed once per state of the database and cached; a
// cheap query on the imports table tells when it changed.
package serve
