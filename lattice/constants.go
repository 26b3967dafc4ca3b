package lattice

import "math"

// Physical constants, CODATA 2018 recommended values (E. Tiesinga et al., Rev. Mod. Phys. 93,
// 025010 (2021); NIST SP 961). e, h and k_B are exact since the 2019 SI redefinition.
const (
	// ElementaryCharge is e in coulomb (exact).
	ElementaryCharge = 1.602176634e-19
	// Planck is h in J s (exact).
	Planck = 6.62607015e-34
	// Hbar is h/(2π) in J s.
	Hbar = Planck / (2 * math.Pi)
	// HbarEVs is h/(2π) in eV s.
	HbarEVs = Hbar / ElementaryCharge
	// Epsilon0 is the vacuum permittivity in F/m (CODATA 2018: 8.8541878128(13)e-12).
	Epsilon0 = 8.8541878128e-12
	// ElectronMass is the electron rest mass in kg (CODATA 2018: 9.1093837015(28)e-31).
	ElectronMass = 9.1093837015e-31
	// Boltzmann is k_B in J/K (exact).
	Boltzmann = 1.380649e-23
	// BoltzmannEV is k_B in eV/K.
	BoltzmannEV = Boltzmann / ElementaryCharge
)

// Derived constants in the library's units (eV, nm, V/nm).
const (
	// CoulombEVnm is e^2/(4π ε0) in eV nm (about 1.44 eV nm).
	CoulombEVnm = ElementaryCharge / (4 * math.Pi * Epsilon0) * 1e9
	// ChargeOverEps0 is e/ε0 in V nm: a sheet of n electrons per nm^2 changes D/ε0 by
	// ChargeOverEps0·n V/nm (about 18.1 V nm, so 10^12 cm^-2 gives 0.181 V/nm).
	ChargeOverEps0 = ElementaryCharge / Epsilon0 * 1e9
	// Per1e12cm2 converts a density in units of 10^12 cm^-2 to nm^-2 (1 nm^-2 = 10^14 cm^-2).
	Per1e12cm2 = 0.01
	// HbarSqOverMe is ħ^2/m_e in eV nm^2 (about 0.0762 eV nm^2).
	HbarSqOverMe = Hbar * Hbar / ElectronMass / ElementaryCharge * 1e18
)

// Default geometry.
const (
	// DefaultA is the in-plane lattice constant in nm (graphite: a = 0.2464(2) nm, Trucano &
	// Chen, Nature 258, 136 (1975); 0.246 nm is the common rounded value).
	DefaultA = 0.246
	// DefaultD is the interlayer spacing in nm (graphite c/2 = 0.3355 nm, same source).
	DefaultD = 0.335
)

// HbarV returns ħv in eV nm for the Dirac velocity v = √3 a γ0 / (2ħ) of a layer with
// nearest-neighbour hopping gamma0 (eV) and lattice constant a (nm).
func HbarV(gamma0, a float64) float64 { return math.Sqrt(3) / 2 * a * gamma0 }
