// Package campaign plans test campaigns before they are run: for each
// candidate plan (so many lots of so many specimens) it simulates many
// campaigns from an assumed population, runs the project's own design-value
// procedure (lots/allowables) on each, and reports how often the A- and
// B-basis values lie below the population's true percentiles (their
// coverage), how much strength sampling gives away (the design value as a
// fraction of the true percentile), how often each method is chosen and
// what the plan costs.
//
// The simulation is deterministic for a seed whatever the number of
// workers: run i of plan j always draws from its own generator seeded by
// (seed, j, i).
package campaign
