// Package demo holds lotproof's invented demonstration scenario, embedded
// in the binary, and the seeded generator that made it.
//
// Orrin Hollow Pumpworks, an invented maker of pump shafts and casings,
// buys quenched-and-tempered alloy steel bar (QT bar OH-S42) to its
// purchase specification OHP-MS-101 from three invented mills (Brackwater
// Steel, Coldmere Forge, Sallow Ridge Mills) and heat-treated aluminium
// plate (Plate OH-A61) to OHP-MS-205 from two (Lumen Flats Aluminium,
// Quillbrook Rolling). Over eight quarters, 2025-Q1 to 2026-Q4, it receives
// 64 lots of five tensile specimens each. Coldmere Forge's strength drifts
// downward from 2026-Q2; lot SR-2503-2 was rolled with a low temper and is
// clearly bad; specimen BW-2504-1-5 had a machining flaw and is an
// outlier. A qualification campaign of ten lots of Quillbrook's plate in a
// new gauge, four specimens per lot at room temperature and four at 120 C,
// serves the design values.
//
// Every company, material and specification name is invented. The data is
// for demonstration only and is never used as a test reference.
//
// Regenerate with: go run ./lots/demo/gen
package demo
