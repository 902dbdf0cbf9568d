package lots

// Version is the tool version written into every audit trail and report.
// Release builds may set it with -ldflags "-X lotproof/lots.Version=...".
var Version = "0.1.0"

// Caution is the statement that accompanies every result that feeds design
// or acceptance.
const Caution = "Statistical values support, and never replace, the governing specification, regulations, local codes and licensed engineering judgement."
