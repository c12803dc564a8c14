/**
 * Exact SI defining constants (SI Brochure, 9th ed., 2019) as listed in
 * CODATA 2018: Tiesinga, Mohr, Newell & Taylor, Rev. Mod. Phys. 93, 025010 (2021).
 */
export const BOLTZMANN = 1.380649e-23; // k_B, J/K, exact
export const ELEMENTARY_CHARGE = 1.602176634e-19; // e, C, exact
export const PLANCK = 6.62607015e-34; // h, J s, exact
export const HBAR = PLANCK / (2 * Math.PI); // ħ, J s (exact value, not a finite decimal)

/** Sommerfeld value of the Lorenz number, L0 = (π²/3)(k_B/e)², in W Ω K⁻² (Sommerfeld 1928; Ashcroft & Mermin ch. 2). */
export const LORENZ_SOMMERFELD = (Math.PI ** 2 / 3) * (BOLTZMANN / ELEMENTARY_CHARGE) ** 2;
