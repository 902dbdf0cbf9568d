// Package units knows the physical quantities lotproof handles, the units
// a user may write for each, and the conversion to the one internal unit
// per quantity (MPa for stress, fraction for strain, MJ/m^3 for energy per
// volume, J for energy) and back to the unit shown in the chosen system.
//
// Conversion factors are exact by definition where a definition exists:
// 1 lbf = 4.4482216152605 N and 1 in = 25.4 mm (NIST SP 811, 2008,
// appendix B), so 1 psi = 6894.757293168361 Pa.
package units
