package reduce

import _ "embed"

// FormatDoc is the description of the raw record format (FORMAT.md), for
// lotproof reduce --record-format.
//
//go:embed FORMAT.md
var FormatDoc string
