// Package phys holds the physical constants fickfit uses, each written
// once with its source.
package phys

// R is the molar gas constant in J mol⁻¹ K⁻¹: N_A·k, exact in the SI since
// the 2019 redefinition (CODATA 2018).
const R = 8.314462618

// Faraday is the Faraday constant N_A·e in C/mol, exact in the SI since
// 2019 (CODATA 2018). It converts an energy per mole to electronvolts per
// particle: 1 eV per particle = Faraday J/mol ≈ 96 485.332 J/mol.
const Faraday = 6.02214076e23 * 1.602176634e-19
