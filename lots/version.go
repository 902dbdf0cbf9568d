package lots

// Version is the tool version written into every audit trail and report.
// Release builds may set it with -ldflags "-X lotproof/lots.Version=...".
var Version = "0.1.0"

// Caution is the statement that accompanies every result that feeds design
// or acceptance.
const Caution = "Statistical values support, and never replace, the governing specification, regulations, local codes and licensed engineering judgement."

// ExtraCautions returns the cautions of xs other than the general one
// (Caution), without empty or repeated entries, in their first order.
func ExtraCautions(xs []string) []string {
	seen := map[string]bool{Caution: true}
	var out []string
	for _, x := range xs {
		if x != "" && !seen[x] {
			seen[x] = true
			out = append(out, x)
		}
	}
	return out
}
