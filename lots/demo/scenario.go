package demo

import (
	"embed"
	"io/fs"
)

// Files holds the embedded scenario: receipts.csv (the incoming-lot
// history), campaign.csv (the qualification campaign), the invented
// purchase specifications (spec-*.yaml) and raw tensile records (raw/).
//
//go:embed data
var files embed.FS

// FS returns the embedded scenario files, rooted at the data folder.
func FS() fs.FS {
	sub, err := fs.Sub(files, "data")
	if err != nil {
		panic(err) // the embedded tree is fixed at build time
	}
	return sub
}

// Read returns one embedded file.
func Read(name string) ([]byte, error) { return fs.ReadFile(FS(), name) }
