// Command lotproof judges incoming metal heats and composite batches
// against their purchase specifications, derives A- and B-basis design
// values from test campaigns and trends supplier quality.
package main
