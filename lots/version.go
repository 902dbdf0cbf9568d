package lots

// Version is the tool version written into every audit trail and report.
// Release builds may set it with -ldflags "-X lotproof/lots.Version=...".
var Version = "0.1.0"
