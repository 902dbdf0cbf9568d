package report

import "lotproof/lots/trend"

// What other lotproof pages (lotproof serve) share with the report, so
// that they look the same, carry the same policy and draw and check their
// figures with the same code.

// ContentSecurityPolicy is the policy of every report page: no scripts, no
// network requests; styles, images and fonts only inline.
const ContentSecurityPolicy = "default-src 'none'; style-src 'unsafe-inline'; img-src data:; font-src data:"

// Stylesheet is the report's CSS.
const Stylesheet = css

// EmbedSVG checks a figure's SVG as the report does (no scripts, no event
// handlers, no external references) and returns the <svg> element ready to
// place inline, its ids prefixed with prefix.
func EmbedSVG(svg []byte, prefix string) ([]byte, error) { return embedSVG(svg, prefix) }

// SeriesFigures draws the individuals chart and the EWMA chart of lot
// means and the S chart of lot SDs of one trend series, with the report's
// titles and captions.
func SeriesFigures(r *trend.Result, s trend.Series) ([]*Figure, error) {
	blocks, err := seriesCharts(r, s, nil)
	if err != nil {
		return nil, err
	}
	var out []*Figure
	for _, b := range blocks {
		if f, ok := b.(*Figure); ok {
			out = append(out, f)
		}
	}
	return out, nil
}
