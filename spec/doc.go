// Package spec reads and validates purchase-specification files (YAML):
// the specification id and revision, the material, per-property minimums
// and maximums with their units, and the acceptance rule. It knows units
// and limits, not statistics. Errors are located as file:line:column.
package spec
