package allowables

import (
	"strings"
	"unicode"
)

// paramWords names the parameters the stats package reports with a bound,
// in words for the audit trail (the JSON keys are paramKey's snake_case).
var paramWords = map[string]string{
	"mean":               "mean",
	"sd":                 "SD",
	"logMean":            "mean of the logarithms",
	"logSD":              "SD of the logarithms",
	"logBound":           "bound on the logarithms",
	"grandMean":          "grand mean",
	"MSB":                "between-lot mean square",
	"MSW":                "within-lot mean square",
	"F":                  "ANOVA F statistic",
	"pANOVA":             "ANOVA p-value",
	"groups":             "lots",
	"effectiveGroupSize": "effective lot size",
	"shape":              "Weibull shape",
	"scale":              "Weibull scale",
	"C":                  "Monte Carlo constant C",
	"q":                  "fitted percentile",
	"sims":               "Monte Carlo samples",
	"seed":               "seed",
	"rank":               "rank",
	"x1":                 "smallest value",
	"xr":                 "value of that rank",
	"achievedConfidence": "achieved confidence",
	"minN":               "fewest values for the order statistic",
	"minNOrderStatistic": "fewest values for the order statistic",
	"lotMeanAverage":     "average of the lot means",
	"withinSS":           "within-lot sum of squares",
	"lotMeanSS":          "sum of squares of the lot means",
	"harmonicLotSize":    "harmonic mean lot size",
	"withinDF":           "within-lot degrees of freedom",
}

// paramWord is a parameter's name in words: from paramWords, else the
// identifier split at its capitals ("someNewName" -> "some new name").
func paramWord(k string) string {
	if w, ok := paramWords[k]; ok {
		return w
	}
	return strings.ReplaceAll(paramKey(k), "_", " ")
}

// paramKey is a parameter's JSON key: snake_case ("grandMean" ->
// "grand_mean", "MSB" -> "msb", "pANOVA" -> "p_anova").
func paramKey(k string) string {
	var b strings.Builder
	rs := []rune(k)
	for i, r := range rs {
		if unicode.IsUpper(r) && i > 0 {
			prevLower := unicode.IsLower(rs[i-1]) || unicode.IsDigit(rs[i-1])
			nextLower := i+1 < len(rs) && unicode.IsLower(rs[i+1])
			if prevLower || (nextLower && unicode.IsUpper(rs[i-1])) {
				b.WriteByte('_')
			}
		}
		b.WriteRune(unicode.ToLower(r))
	}
	return b.String()
}
