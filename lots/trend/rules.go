package trend

import "strings"

// ruleLabels are the words tables and the report show for the signal codes
// (the codes stay in JSON and CSV). The run rules are the Western Electric
// rules (Western Electric, Statistical Quality Control Handbook, 1956;
// Montgomery, Introduction to Statistical Quality Control, §5.3.6).
var ruleLabels = map[string]string{
	"we1":         "beyond 3 sigma",
	"we2":         "2 of 3 beyond 2 sigma",
	"we3":         "4 of 5 beyond 1 sigma",
	"we4":         "8 on one side",
	"ewma":        "EWMA",
	"s_chart":     "S chart",
	"shift_welch": "period shift",
}

// RuleLabel returns the plain-words name of a signal code, or the code
// itself when it has none.
func RuleLabel(code string) string {
	if l, ok := ruleLabels[code]; ok {
		return l
	}
	return code
}

// RuleLabels joins the labels of codes for a table cell, in the order given.
func RuleLabels(codes []string) string {
	out := make([]string, len(codes))
	for i, c := range codes {
		out[i] = RuleLabel(c)
	}
	return strings.Join(out, "; ")
}
