package acceptance

import (
	"fmt"
	"regexp"
	"strings"
)

// retestRule matches the retest allowance a lot's reasons end with; the
// tables state it once per specification instead of in every row.
var retestRule = regexp.MustCompile(`^(.+ allows \d+ retest\(s\) on \d+ times the specimens) \(\d+ specimens\)$`)

// DecisiveReasons words why a lot got its verdict, for a table or a list:
// the decisive reason first (too few specimens; for each limit that set the
// verdict, its property, side and first reason, one reason given once for
// several limits), then the lot's other reasons; the retest allowance is
// left out and returned separately, to be stated once.
func DecisiveReasons(l LotResult, minN int) (text, retest string) {
	var out []string
	if l.Verdict == Nonconforming || l.Verdict == Undecided {
		if l.N < minN {
			word := "specimens"
			if l.N == 1 {
				word = "specimen"
			}
			out = append(out, fmt.Sprintf("%d %s, fewer than the %d required", l.N, word, minN))
		}
		// The same reason for several limits is given once, after them all.
		var whys []string
		limits := map[string][]string{}
		for _, p := range l.Properties {
			if p.Verdict != l.Verdict || len(p.Reasons) == 0 {
				continue
			}
			why := p.Reasons[0]
			if _, ok := limits[why]; !ok {
				whys = append(whys, why)
			}
			limits[why] = append(limits[why], p.Property+" ("+p.Side+")")
		}
		for _, why := range whys {
			out = append(out, strings.Join(limits[why], ", ")+": "+why)
		}
	}
	for _, r := range l.Reasons {
		if strings.Contains(r, " allows ") { // (the regular expression only where it can match)
			if m := retestRule.FindStringSubmatch(r); m != nil {
				retest = m[1]
				continue
			}
		}
		if len(out) > 0 && (strings.HasPrefix(r, "nonconforming: ") || strings.HasPrefix(r, "undecided: ")) {
			continue // the per-limit reasons above say it in full
		}
		out = append(out, r)
	}
	return strings.Join(out, "; "), retest
}

// MinSpecimens is the fewest specimens the lot's specification asks for (0
// when the lot was not judged).
func (r *Result) MinSpecimens(label string) int {
	for _, s := range r.Specs {
		if s.ID+" rev "+s.Revision == label {
			return s.MinN
		}
	}
	return 0
}
