// Package sizing turns an allowable stress into the cross-section an axial
// member needs, and a section into the largest axial load it may carry:
// the uniform-stress relation sigma = P / A of elementary strength of
// materials (for example Beer, Johnston et al., Mechanics of Materials,
// chapter 1; Timoshenko and Gere, Mechanics of Materials, section 1.2),
// with the allowable stress taken as a design value divided by a factor of
// safety. It covers axial tension of straight members only: no buckling,
// stress concentration, fatigue or combined loading.
package sizing
