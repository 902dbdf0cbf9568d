// Package input is the one way lotproof opens a file a user names: results
// files (CSV and xlsx), specification YAML, raw tensile records, and the
// JSON of an allowables result. It accepts regular files, and standard
// input when the name is "-"; it refuses FIFOs, devices, sockets and
// (unless the caller reads folders itself) directories before reading a
// byte, so that nothing can hang or read without end. Each kind of input
// has a size cap (Kind.MaxBytes); a file beyond it is refused with a
// message naming the file and the limit.
//
// The package also keeps the temporary files and folders a read makes
// (Temp) so that the command can remove them when it is interrupted
// (RemoveTemps from a SIGINT or SIGTERM handler).
package input
