// Package lots is the domain of lotproof: specimens, properties with
// units, lots and heats, test conditions and suppliers. It reads specimen
// results files (CSV or xlsx), validates them and groups specimens by lot
// or heat. Analyses that serve the domain (reduction of raw records,
// acceptance, design values, history and trend, rendering, the demo
// scenario) live in sub-packages and share the result types defined here:
// plain structs that carry their own warnings and audit steps.
package lots
