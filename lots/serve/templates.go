package serve

import (
	"html/template"
	"math"
	"net/url"
	"strconv"

	"lotproof/lots"
	"lotproof/lots/render"
	"lotproof/lots/report"
	"lotproof/lots/trend"
)

var funcs = template.FuncMap{
	"num":  func(v lots.Float, sig int) string { return render.Num(float64(v), sig) },
	"rule": trend.RuleLabel,
	"lotURL": func(u, id string) string {
		return "/lot/" + url.PathEscape(id) + u
	},
	"supURL": func(u, name string) string { return "/supplier/" + url.PathEscape(name) + u },
	"supPeriodURL": func(u, name, period string) string {
		q := url.Values{"period": {period}}
		if u != "" {
			q.Set("units", "us")
		}
		return "/supplier/" + url.PathEscape(name) + "?" + q.Encode()
	},
	"searchURL": func(u, text string) string {
		q := url.Values{"q": {text}}
		if u != "" {
			q.Set("units", "us")
		}
		return "/search?" + q.Encode()
	},
	"verdictClass": func(v string) string {
		switch v {
		case "conforming":
			return "st-ok"
		case "nonconforming":
			return "st-fail"
		case "undecided":
			return "st-undecided"
		}
		return ""
	},
	"verdictMark": func(v string) string {
		switch v {
		case "conforming":
			return "✓"
		case "nonconforming":
			return "✗"
		case "undecided":
			return "?"
		}
		return ""
	},
	"ppkClass": func(v lots.Float) string {
		switch x := float64(v); {
		case math.IsNaN(x):
			return ""
		case x < 1:
			return "st-fail"
		case x < report.PpkTarget:
			return "st-warn"
		}
		return "st-ok"
	},
	"ppkMark": func(v lots.Float) string {
		switch x := float64(v); {
		case math.IsNaN(x):
			return ""
		case x < 1:
			return "✗"
		case x < report.PpkTarget:
			return "!"
		}
		return "✓"
	},
	"plural": func(n int, word string) string {
		if n == 1 {
			return "1 " + word
		}
		return strconv.Itoa(n) + " " + word + "s"
	},
	"short": func(s string) string {
		if len(s) > 12 {
			return s[:12]
		}
		return s
	},
	"maxHits": func() int { return MaxHits },
	"target":  func() string { return strconv.FormatFloat(report.PpkTarget, 'f', 2, 64) },
}

var pages = template.Must(template.New("pages").Funcs(funcs).Parse(layoutTemplate + pageTemplates))

// layoutTemplate is the frame of every page. The policy in the meta tag is
// the report's; the server sends a stricter one as a header as well.
const layoutTemplate = `{{define "layout"}}<!DOCTYPE html>
<html lang="en">
<head>
<meta charset="utf-8">
<meta http-equiv="Content-Security-Policy" content="` + report.ContentSecurityPolicy + `">
<meta name="viewport" content="width=device-width, initial-scale=1">
<meta name="generator" content="lotproof {{.Version}}">
<meta name="referrer" content="no-referrer">
<link rel="icon" href="data:,">
<title>{{.Title}} · lotproof</title>
<style>` + report.Stylesheet + serveCSS + `</style>
</head>
<body>
<div class="bar">
<nav aria-label="site"><a class="home" href="/{{.U}}">lotproof · lot history</a></nav>
<form action="/search" method="get" role="search">
<label for="q">Lot, heat or specimen</label>
<input id="q" name="q" type="search" value="{{.Query}}" maxlength="200">
{{- if .U}}<input type="hidden" name="units" value="us">{{end}}
<button type="submit">Search</button>
</form>
</div>
<main class="doc wide">
<header class="masthead">
<p class="kicker">lotproof serve · read-only view</p>
<h1>{{.Title}}</h1>
<p class="subtitle">Units: {{.Units}} · <a href="{{.Other}}">show in {{.OtherSys}}</a> · <a href="{{.JSON}}">this page as JSON</a></p>
</header>
<aside class="cautions" aria-label="caution">
<ul>{{range .Cautions}}<li>{{.}}</li>{{end}}</ul>
</aside>
{{.Body}}
<footer class="colophon">
<p>lotproof {{.Version}} · read-only view of {{.Where}} · nothing on these pages changes the history.</p>
</footer>
</main>
</body>
</html>
{{end}}`

const serveCSS = `
.bar{display:flex;flex-wrap:wrap;gap:.6rem 1.5rem;align-items:center;justify-content:space-between;padding:.5rem 1rem;border-bottom:1px solid var(--rule);background:#f4f6f8}
.bar a.home{font-weight:700;color:var(--band);text-decoration:none}
.bar form{display:flex;gap:.4rem;align-items:center;font-size:.85rem}
.bar input{font:inherit;padding:.15rem .3rem;min-width:14rem}
.bar button{font:inherit;padding:.15rem .6rem}
.doc.wide{max-width:none;width:min(100%,1280px)}
a{color:var(--band)}
.grid td.cell{min-width:7.5rem;white-space:normal}
.grid td.cell a{display:block;color:inherit;text-decoration:none}
.grid td.cell a:hover,.grid td.cell a:focus{text-decoration:underline}
.grid .lots{font-weight:700}
.grid .sub{display:block;font-size:.78rem;color:var(--muted)}
.grid .sub.st-fail{color:var(--fail)}
.grid .sub.st-warn{color:var(--warn)}
.grid .sub.st-ok{color:var(--ok)}
.empty{color:var(--muted)}
.reasons{margin:.2rem 0 .8rem;padding-left:1.2rem;font-size:.85rem}
.note{font-size:.85rem;color:var(--muted)}
`

const pageTemplates = `
{{define "error"}}<section class="major"><h2>{{.Msg}}</h2>
<p><a href="/">Back to the overview</a></p></section>{{end}}

{{define "overview"}}
<section class="summary" aria-labelledby="ov-h">
<h2 id="ov-h">Suppliers by {{.Every}}</h2>
{{- if .Suppliers}}
<p class="note">Each cell: lots tested in the {{.Every}}, lots rejected of those judged, trend signals, and the Ppk against the specification minimum of the weakest property (the lowest lower confidence bound, given after ≥). Ppk marks: ✓ at or above {{target}}, ! from 1.00 to {{target}}, ✗ below 1.00 (common practice). Each cell opens the supplier's page for that {{.Every}}.</p>
<div class="tablewrap">
<table class="grid">
<thead><tr><th scope="col">supplier</th><th scope="col" class="n">all lots</th><th scope="col" class="n">all signals</th>{{range .Periods}}<th scope="col">{{.}}</th>{{end}}</tr></thead>
<tbody>
{{- $u := .U}}
{{- range .Suppliers}}{{$s := .Supplier}}
<tr><th scope="row"><a href="{{supURL $u $s}}">{{$s}}</a><span class="sub">{{range $i, $m := .Materials}}{{if $i}}, {{end}}{{$m}}{{end}}</span></th>
<td class="n">{{.Lots}}</td><td class="n">{{.Signals}}</td>
{{- range .Cells}}
{{- if .Lots}}
<td class="cell"><a href="{{supPeriodURL $u $s .Period}}"><span class="lots">{{plural .Lots "lot"}}</span>
<span class="sub{{if .LotsRejected}} st-fail{{end}}">{{.LotsRejected}} rejected of {{.LotsJudged}}</span>
<span class="sub{{if .Signals}} st-warn{{end}}">{{plural .Signals "signal"}}</span>
{{- if .Property}}
<span class="sub {{ppkClass .Ppk}}">{{with ppkMark .Ppk}}<span class="mark">{{.}}</span>{{end}}Ppk {{num .Ppk 3}} (≥ {{num .PpkLower 3}}) {{.Property}}</span>
{{- end}}</a></td>
{{- else}}
<td class="cell empty">no lots</td>
{{- end}}
{{- end}}
</tr>
{{- end}}
</tbody>
</table>
</div>
{{- else}}
<p>The history holds no dated lots yet: record results files with lotproof record.</p>
{{- end}}
</section>
{{- if .Warnings}}
<div class="list"><h3>Warnings</h3><ul>{{range .Warnings}}<li>{{.}}</li>{{end}}</ul></div>
{{- end}}
<div class="list"><h3>Methods</h3><ul>{{range .Methods}}<li>{{.}}</li>{{end}}</ul></div>
<p class="note">{{.Caution}}</p>
{{end}}

{{define "supplier"}}
{{- $u := .U}}{{$s := .Supplier}}
<dl class="kv">
<dt>Materials</dt><dd>{{range $i, $m := .Materials}}{{if $i}}, {{end}}{{$m}}{{end}}</dd>
<dt>Lots</dt><dd>{{.LotsTotal}}{{if .Period}} in {{.Period}} · <a href="{{supURL $u $s}}">every {{.Every}}</a>{{end}}</dd>
</dl>
<section class="major" id="periods">
<h2>Periods</h2>
<div class="tablewrap"><table>
<thead><tr><th scope="col">property</th><th scope="col">period</th><th class="n" scope="col">lots</th><th class="n" scope="col">specimens</th><th class="n" scope="col">mean</th><th class="n" scope="col">SD</th><th class="n" scope="col">minimum</th><th class="n" scope="col">Ppk</th><th class="n" scope="col">Ppk lower bound</th><th class="n" scope="col">ppm below</th><th class="n" scope="col">rejected</th></tr></thead>
<tbody>
{{- range .Periods}}
<tr{{if eq .Period $.Period}} class="st-info"{{end}}><td>{{.Property}}{{if .Unit}} [{{.Unit}}]{{end}}</td><td><a href="{{supPeriodURL $u $s .Period}}">{{.Period}}</a>{{if .Baseline}} (baseline){{end}}</td><td class="n">{{.Lots}}</td><td class="n">{{.Specimens}}</td><td class="n">{{num .Mean 4}}</td><td class="n">{{num .SD 3}}</td><td class="n">{{num .Minimum 4}}</td><td class="n {{ppkClass .Ppk}}">{{with ppkMark .Ppk}}<span class="mark">{{.}}</span> {{end}}{{num .Ppk 3}}</td><td class="n">{{num .PpkLower 3}}</td><td class="n">{{num .PPMBelow 3}}</td><td class="n{{if .LotsRejected}} st-fail{{end}}">{{.LotsRejected}} of {{.LotsJudged}}</td></tr>
{{- end}}
</tbody></table></div>
</section>
<section class="major" id="signals">
<h2>Signals{{if .Period}} in {{.Period}}{{end}}</h2>
{{- if .Signals}}
<div class="tablewrap"><table>
<thead><tr><th scope="col">rule</th><th scope="col">property</th><th scope="col">period</th><th scope="col">lot</th><th class="n" scope="col">value</th><th class="n" scope="col">limit</th><th scope="col">detail</th></tr></thead>
<tbody>
{{- range .Signals}}
<tr><td class="st-warn"><span class="mark">!</span> {{rule .Rule}}</td><td>{{.Property}}</td><td>{{.Period}}</td><td>{{if .Lot}}<a href="{{lotURL $u .Lot}}">{{.Lot}}</a>{{end}}</td><td class="n">{{num .Value 4}}</td><td class="n">{{num .Limit 4}}</td><td>{{.Detail}}</td></tr>
{{- end}}
</tbody></table></div>
{{- else}}
<p>No rule signalled.</p>
{{- end}}
</section>
<section class="major" id="lots">
<h2>{{if .Period}}Lots of {{.Period}}{{else}}Latest lots{{end}}</h2>
<div class="tablewrap"><table>
<thead><tr><th scope="col">lot</th><th scope="col">material</th><th scope="col">tested</th><th scope="col">period</th><th class="n" scope="col">specimens</th><th scope="col">verdict</th><th class="n" scope="col">signals</th></tr></thead>
<tbody>
{{- range .Lots}}
<tr><td><a href="{{lotURL $u .Lot}}">{{.Lot}}</a></td><td>{{.Material}}</td><td>{{.Tested}}</td><td>{{.Period}}</td><td class="n">{{.Specimens}}</td><td class="{{verdictClass .Verdict}}">{{with verdictMark .Verdict}}<span class="mark">{{.}}</span> {{end}}{{.Verdict}}</td><td class="n">{{.Signals}}</td></tr>
{{- end}}
</tbody></table></div>
{{- if gt .LotsTotal (len .Lots)}}<p class="note">The latest {{len .Lots}} of {{.LotsTotal}} lots; choose a period above for its lots.</p>{{end}}
</section>
{{- range .Figures}}
<section class="major">
<h2>{{.Title}}</h2>
{{- range .Notes}}<p class="note">{{.}}</p>{{end}}
{{- range .Figures}}
<figure id="fig-{{.Num}}">
{{.SVG}}
<figcaption><span class="label">Figure {{.Num}}</span> {{.Title}}{{with .Caption}}<span class="cap"> {{.}}</span>{{end}}</figcaption>
</figure>
{{- end}}
</section>
{{- end}}
<div class="list"><h3>Methods</h3><ul>{{range .Methods}}<li>{{.}}</li>{{end}}</ul></div>
{{- if .Warnings}}<div class="list"><h3>Warnings</h3><ul>{{range .Warnings}}<li>{{.}}</li>{{end}}</ul></div>{{end}}
<p class="note">{{.Caution}}</p>
{{end}}

{{define "lot"}}
{{- $u := .U}}
<dl class="kv">
<dt>Supplier</dt><dd><a href="{{supURL $u .Supplier}}">{{.Supplier}}</a></dd>
<dt>Material</dt><dd>{{.Material}}</dd>
<dt>Recorded by</dt><dd>{{.Import.Source}}, {{.Import.ImportedAt}} by {{.Import.User}}<br><span class="digest">SHA-256 {{.Import.Digest}}</span></dd>
</dl>
<section class="major" id="verdicts">
<h2>Verdicts</h2>
{{- if .Verdicts}}
{{- range .Verdicts}}
<h3 class="{{verdictClass .Verdict}}">{{with verdictMark .Verdict}}<span class="mark">{{.}}</span> {{end}}{{.Verdict}} against {{.Spec}}{{if not .InForce}} (superseded by a later import){{end}}</h3>
<p class="note">Recorded {{.ImportedAt}}, import <span class="digest">{{short .Import}}</span></p>
<ul class="reasons">{{range .Reasons}}<li>{{.}}</li>{{end}}</ul>
{{- end}}
{{- else}}
<p>No verdict was recorded for this lot.</p>
{{- end}}
<p class="note">{{.Note}}</p>
</section>
<section class="major" id="specimens">
<h2>Specimens</h2>
<div class="tablewrap"><table>
<thead><tr><th scope="col">specimen</th><th scope="col">heat</th><th scope="col">tested</th><th scope="col">condition</th>{{range .Properties}}<th class="n" scope="col">{{.Property}}{{if .Unit}} [{{.Unit}}]{{end}}</th>{{end}}</tr></thead>
<tbody>
{{- range .Specimens}}
<tr><td>{{.Specimen}}</td><td>{{if .Heat}}<a href="{{searchURL $u .Heat}}">{{.Heat}}</a>{{end}}</td><td>{{.Tested}}</td><td>{{.Condition}}</td>{{range .Cells}}<td class="n{{if .Status}} st-fail{{end}}">{{if .Status}}<span class="mark">✗</span> {{end}}{{.Text}}</td>{{end}}</tr>
{{- end}}
</tbody>
<tfoot>
<tr><th scope="row" colspan="4">mean</th>{{range .Properties}}<td class="n">{{num .Mean 5}}</td>{{end}}</tr>
<tr><th scope="row" colspan="4">SD</th>{{range .Properties}}<td class="n">{{num .SD 3}}</td>{{end}}</tr>
</tfoot>
</table></div>
<p class="note">✗ marks a value outside a specification limit in force.</p>
</section>
<section class="major" id="limits">
<h2>Specification limits in force for {{.Material}}</h2>
{{- if .SpecLimits}}
<div class="tablewrap"><table>
<thead><tr><th scope="col">specification</th><th scope="col">property</th><th class="n" scope="col">minimum</th><th class="n" scope="col">maximum</th><th scope="col">unit</th><th scope="col">recorded with import</th></tr></thead>
<tbody>
{{- range .SpecLimits}}
<tr><td>{{.Spec}}</td><td>{{.Property}}</td><td class="n">{{num .Minimum 5}}</td><td class="n">{{num .Maximum 5}}</td><td>{{.Unit}}</td><td><span class="digest">{{short .Import}}</span></td></tr>
{{- end}}
</tbody></table></div>
{{- else}}
<p>No specification limits are recorded for this material.</p>
{{- end}}
</section>
<section class="major" id="imports">
<h2>Imports</h2>
<div class="tablewrap"><table>
<thead><tr><th scope="col">file</th><th scope="col">imported</th><th scope="col">by</th><th scope="col">lotproof</th><th scope="col">SHA-256</th></tr></thead>
<tbody>
{{- range .Imports}}
<tr><td>{{.Source}}</td><td>{{.ImportedAt}}</td><td>{{.User}}</td><td>{{.ToolVersion}}</td><td class="digest">{{.Digest}}</td></tr>
{{- end}}
</tbody></table></div>
</section>
{{end}}

{{define "search"}}
{{- $u := .U}}
{{- if .Query}}
{{- if .Hits}}
<div class="tablewrap"><table>
<caption>Lots, heats and specimens whose id starts with “{{.Query}}” (letter case matters)</caption>
<thead><tr><th scope="col">found</th><th scope="col">id</th><th scope="col">lot</th><th scope="col">supplier</th><th scope="col">material</th><th scope="col">tested</th></tr></thead>
<tbody>
{{- range .Hits}}
<tr><td>{{.Kind}}</td><td>{{.Key}}</td><td><a href="{{lotURL $u .Lot}}">{{.Lot}}</a></td><td><a href="{{supURL $u .Supplier}}">{{.Supplier}}</a></td><td>{{.Material}}</td><td>{{.Tested}}</td></tr>
{{- end}}
</tbody></table></div>
{{- range .Truncated}}<p class="note">More {{.}}s match than the {{maxHits}} shown: type more of the id.</p>{{end}}
{{- else}}
<p>Nothing in the history starts with “{{.Query}}”.</p>
{{- end}}
{{- else}}
<p>Type the beginning of a lot, heat or specimen id in the box above.</p>
{{- end}}
{{end}}
`
