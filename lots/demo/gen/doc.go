// Command gen writes lotproof's embedded demo scenario files from the
// fixed seed demo.Seed into lots/demo/data (run from the repository root:
// go run ./lots/demo/gen).
package main
