/**
 * Atomic data for the model standards: elements (abundance, ionisation energies, partition
 * functions) and the absorption lines drawn into the spectra.
 *
 * Sources, per value group:
 * - Abundances: Asplund, Grevesse, Sauval & Scott (2009, ARA&A 47, 481), photospheric, as
 *   log ε with log ε(H) = 12 (from memory).
 * - Ionisation energies: NIST Atomic Spectra Database, ionisation-energy tables (from memory, eV).
 * - Partition functions: values at 5000 K and 10000 K rounded from the tabulations reproduced in
 *   Gray, "The Observation and Analysis of Stellar Photospheres" (3rd ed. 2005), appendix D
 *   (from memory); interpolated linearly in log U against log T, held constant outside.
 * - Hydrogen oscillator strengths: Wiese, Smith & Glennon (1966) / Wiese & Fuhr (2009), as listed
 *   in the NIST ASD (from memory). He II: hydrogenic values from the same tables.
 * - Other lines: wavelengths (air, Å), lower-level excitation energies (eV) and log gf from the
 *   NIST ASD where remembered; values marked `memory: true` are from memory with less confidence
 *   (multiplet sums, blends).
 */

/** One chemical element with what Saha–Boltzmann needs. */
export interface Element {
  symbol: string
  /** log ε = log10(N_el / N_H) + 12. */
  logAbundance: number
  /** Atomic mass, u. */
  mass: number
  /** Ionisation energies of stages I, II, …, eV (stage k → k+1). */
  ionisation: readonly number[]
  /** Partition functions of stages I, II, …, at [5000 K, 10000 K]; one entry more than `ionisation`. */
  partition: ReadonlyArray<readonly [number, number]>
}

/** Elements by symbol. Hydrogen's partition function is its ground term, g = 2 (levels n ≥ 2 add < 1 % below 12000 K). */
// prettier-ignore
export const ELEMENTS = {
  H: { symbol: 'H', logAbundance: 12, mass: 1.008, ionisation: [13.598], partition: [[2, 2], [1, 1]] },
  He: { symbol: 'He', logAbundance: 10.93, mass: 4.003, ionisation: [24.587, 54.418], partition: [[1, 1], [2, 2], [1, 1]] },
  C: { symbol: 'C', logAbundance: 8.43, mass: 12.011, ionisation: [11.26, 24.383, 47.888], partition: [[9.3, 10.0], [5.9, 6.0], [1, 1], [2, 2]] },
  N: { symbol: 'N', logAbundance: 7.83, mass: 14.007, ionisation: [14.534, 29.601, 47.445], partition: [[4.0, 4.1], [8.9, 9.2], [5.9, 6.0], [1, 1]] },
  O: { symbol: 'O', logAbundance: 8.69, mass: 15.999, ionisation: [13.618, 35.121, 54.936], partition: [[8.7, 9.1], [4.0, 4.2], [8.9, 9.2], [5.9, 6.0]] },
  Na: { symbol: 'Na', logAbundance: 6.24, mass: 22.99, ionisation: [5.139, 47.286], partition: [[2.0, 2.6], [1, 1], [6, 6]] },
  Mg: { symbol: 'Mg', logAbundance: 7.6, mass: 24.305, ionisation: [7.646, 15.035, 80.144], partition: [[1.0, 1.2], [2.0, 2.0], [1, 1], [6, 6]] },
  Al: { symbol: 'Al', logAbundance: 6.45, mass: 26.982, ionisation: [5.986, 18.829], partition: [[5.8, 6.0], [1, 1], [2, 2]] },
  Si: { symbol: 'Si', logAbundance: 7.51, mass: 28.086, ionisation: [8.152, 16.346, 33.493, 45.142], partition: [[9.4, 11.0], [5.6, 5.8], [1, 1], [2, 2], [1, 1]] },
  K: { symbol: 'K', logAbundance: 5.03, mass: 39.098, ionisation: [4.341, 31.63], partition: [[2.1, 3.5], [1, 1], [6, 6]] },
  Ca: { symbol: 'Ca', logAbundance: 6.34, mass: 40.078, ionisation: [6.113, 11.872, 50.913], partition: [[1.1, 2.5], [2.1, 2.9], [1, 1], [6, 6]] },
  Ti: { symbol: 'Ti', logAbundance: 4.95, mass: 47.867, ionisation: [6.828, 13.576, 27.492], partition: [[25, 60], [50, 75], [20, 25], [15, 15]] },
  Cr: { symbol: 'Cr', logAbundance: 5.64, mass: 51.996, ionisation: [6.767, 16.486, 30.96], partition: [[7.2, 12], [6.0, 8.0], [20, 25], [15, 15]] },
  Mn: { symbol: 'Mn', logAbundance: 5.43, mass: 54.938, ionisation: [7.434, 15.64, 33.668], partition: [[6.0, 8.0], [7.1, 8.5], [10, 10], [10, 10]] },
  Fe: { symbol: 'Fe', logAbundance: 7.5, mass: 55.845, ionisation: [7.902, 16.188, 30.652], partition: [[25, 60], [40, 60], [25, 28], [20, 20]] },
  Sr: { symbol: 'Sr', logAbundance: 2.87, mass: 87.62, ionisation: [5.695, 11.03, 42.89], partition: [[1.1, 3.0], [2.0, 2.4], [1, 1], [4, 4]] },
  Y: { symbol: 'Y', logAbundance: 2.21, mass: 88.906, ionisation: [6.217, 12.224, 20.52], partition: [[8, 15], [12, 20], [10, 10], [1, 1]] },
} as const satisfies Record<string, Element>

export type ElementSymbol = keyof typeof ELEMENTS

/** Elements in a fixed order, so every loop over them (and every output byte) is reproducible. */
export const ELEMENT_ORDER: readonly ElementSymbol[] = ['H', 'He', 'C', 'N', 'O', 'Na', 'Mg', 'Al', 'Si', 'K', 'Ca', 'Ti', 'Cr', 'Mn', 'Fe', 'Sr', 'Y']

/** How the pressure (collisional) width of a line is computed. */
export type Broadening =
  /** Hydrogenic linear Stark effect in the Holtsmark field (H I, He II). */
  | { kind: 'linear-stark'; lowerN: number; upperN: number; charge: number }
  /** Van der Waals with Unsöld's C6, plus a quadratic-Stark term log(γ4/Ne). */
  | { kind: 'van-der-waals'; logStarkPerElectron?: number }

/** One absorption line. */
export interface AtomicLine {
  /** Air wavelength, Å. */
  wavelength: number
  element: ElementSymbol
  /** 0 = neutral (I), 1 = singly ionised (II), … */
  stage: number
  /** Excitation energy of the lower level, eV. */
  lowerEnergy: number
  /** log10(g_lower · f). */
  logGf: number
  broadening: Broadening
  /** Where the numbers come from. */
  source: string
}

const NIST = 'NIST ASD (from memory)'
const NIST_SUM = 'NIST ASD, multiplet components summed (from memory)'
const vdw = (logStarkPerElectron?: number): Broadening => (logStarkPerElectron === undefined ? { kind: 'van-der-waals' } : { kind: 'van-der-waals', logStarkPerElectron })

/**
 * Balmer lines Hα … H16 (lower level n = 2, g = 8). Wavelengths: NIST ASD air values for
 * Hα … H9 (the project's reference sheet); H10 … H16 from the Rydberg formula with
 * R_H = 109 677.58 cm⁻¹ converted to air (computed in {@link balmerAirWavelength}).
 * Absorption oscillator strengths f(2 → n): Wiese et al., NIST ASD (from memory).
 */
export const BALMER_OSCILLATOR_STRENGTHS: ReadonlyArray<readonly [number, number]> = [
  [3, 0.6407],
  [4, 0.1193],
  [5, 0.04467],
  [6, 0.02209],
  [7, 0.0127],
  [8, 0.008036],
  [9, 0.005429],
  [10, 0.003851],
  [11, 0.002835],
  [12, 0.002151],
  [13, 0.001672],
  [14, 0.001326],
  [15, 0.00107],
  [16, 0.000877],
]

const BALMER_AIR: Readonly<Record<number, number>> = {
  3: 6562.8,
  4: 4861.33,
  5: 4340.47,
  6: 4101.74,
  7: 3970.07,
  8: 3889.05,
  9: 3835.38,
}

/**
 * Air wavelength of the Balmer line 2 → n, Å: NIST values where listed, else the Rydberg formula
 * 1/λ_vac = R_H (1/4 − 1/n²) converted to air with Morton's (2000) formula.
 */
export function balmerAirWavelength(upperN: number, vacuumToAir: (v: number) => number): number {
  const listed = BALMER_AIR[upperN]
  if (listed !== undefined) return listed
  const rydberg = 109677.58 // cm⁻¹, from memory
  return vacuumToAir(1e8 / (rydberg * (0.25 - 1 / (upperN * upperN))))
}

/** Hydrogen n = 2 excitation energy, eV: 13.598 (1 − 1/4). */
export const HYDROGEN_N2_ENERGY = 13.598 * 0.75

/**
 * Lines other than the Balmer series. Kept compact; one line per entry:
 * [λ air Å, element, stage, χ_low eV, log gf, log(γ4/Ne) or undefined, source].
 */
type Row = readonly [number, ElementSymbol, number, number, number, number | undefined, string]

const ROWS: readonly Row[] = [
  // He I (singlets and triplets from 2s/2p); quadratic Stark log(γ4/Ne) ≈ −4.5 for the diffuse series (from memory).
  [3819.61, 'He', 0, 20.964, -0.92, -4.5, NIST_SUM],
  [4009.26, 'He', 0, 21.218, -1.47, -4.5, NIST],
  [4026.19, 'He', 0, 20.964, -0.37, -4.5, NIST_SUM],
  [4120.81, 'He', 0, 20.964, -1.75, -5.0, NIST_SUM],
  [4143.76, 'He', 0, 21.218, -1.2, -4.5, NIST],
  [4387.93, 'He', 0, 21.218, -0.88, -4.5, NIST],
  [4437.55, 'He', 0, 21.218, -2.03, -5.0, NIST],
  [4471.48, 'He', 0, 20.964, 0.05, -4.5, NIST_SUM],
  [4713.15, 'He', 0, 20.964, -1.23, -5.0, NIST_SUM],
  [4921.93, 'He', 0, 21.218, -0.44, -4.7, NIST],
  [5015.68, 'He', 0, 20.616, -0.82, -5.0, NIST],
  [5875.62, 'He', 0, 20.964, 0.74, -5.0, NIST_SUM],
  [6678.15, 'He', 0, 21.218, 0.33, -5.0, NIST],
  // C II, N II, O II: the strongest early-B lines in the region.
  [3995.0, 'N', 1, 18.498, 0.21, -5.0, NIST],
  [4267.2, 'C', 1, 18.046, 0.56, -5.0, NIST_SUM],
  [4649.13, 'O', 1, 22.999, 0.31, -5.0, NIST],
  [4661.63, 'O', 1, 22.979, -0.28, -5.0, NIST],
  // Silicon, the B-star temperature ladder Si II / Si III / Si IV.
  [3856.02, 'Si', 1, 6.859, -0.49, undefined, NIST],
  [3862.6, 'Si', 1, 6.857, -0.76, undefined, NIST],
  [4128.05, 'Si', 1, 9.837, 0.36, undefined, NIST],
  [4130.88, 'Si', 1, 9.839, 0.55, undefined, NIST_SUM],
  [6347.11, 'Si', 1, 8.121, 0.15, undefined, NIST],
  [6371.37, 'Si', 1, 8.121, -0.08, undefined, NIST],
  [4552.62, 'Si', 2, 19.016, 0.29, -5.0, NIST],
  [4567.84, 'Si', 2, 19.016, 0.07, -5.0, NIST],
  [4574.76, 'Si', 2, 19.016, -0.41, -5.0, NIST],
  [4088.86, 'Si', 3, 24.05, 0.2, -5.0, NIST],
  [4116.1, 'Si', 3, 24.05, -0.1, -5.0, NIST],
  // Magnesium.
  [4481.2, 'Mg', 1, 8.864, 0.98, undefined, NIST_SUM],
  [3838.29, 'Mg', 0, 2.717, 0.41, undefined, NIST_SUM],
  [4702.99, 'Mg', 0, 4.346, -0.44, undefined, NIST],
  [5167.32, 'Mg', 0, 2.709, -0.87, undefined, NIST],
  [5172.68, 'Mg', 0, 2.712, -0.39, undefined, NIST],
  [5183.6, 'Mg', 0, 2.717, -0.17, undefined, NIST],
  // Calcium.
  [3933.66, 'Ca', 1, 0, 0.13, undefined, NIST],
  [3968.47, 'Ca', 1, 0, -0.17, undefined, NIST],
  [4226.73, 'Ca', 0, 0, 0.24, undefined, NIST],
  [4302.53, 'Ca', 0, 1.9, 0.28, undefined, NIST],
  [4318.65, 'Ca', 0, 1.9, -0.21, undefined, NIST],
  [4454.78, 'Ca', 0, 1.9, 0.26, undefined, NIST],
  [6122.22, 'Ca', 0, 1.886, -0.32, undefined, NIST],
  [6162.17, 'Ca', 0, 1.9, -0.09, undefined, NIST],
  [6439.08, 'Ca', 0, 2.526, 0.39, undefined, NIST],
  // Strontium, yttrium.
  [4077.71, 'Sr', 1, 0, 0.15, undefined, NIST],
  [4215.52, 'Sr', 1, 0, -0.17, undefined, NIST],
  [4607.33, 'Sr', 0, 0, 0.28, undefined, NIST],
  [4374.94, 'Y', 1, 0.409, 0.16, undefined, NIST],
  // Sodium D.
  [5889.95, 'Na', 0, 0, 0.11, undefined, NIST],
  [5895.92, 'Na', 0, 0, -0.19, undefined, NIST],
  // Titanium, chromium, manganese.
  [4300.05, 'Ti', 1, 1.18, -0.44, undefined, NIST],
  [4395.03, 'Ti', 1, 1.084, -0.54, undefined, NIST],
  [4443.79, 'Ti', 1, 1.08, -0.72, undefined, NIST],
  [4501.27, 'Ti', 1, 1.116, -0.77, undefined, NIST],
  [4533.97, 'Ti', 1, 1.237, -0.77, undefined, NIST],
  [4563.76, 'Ti', 1, 1.221, -0.69, undefined, NIST],
  [4571.97, 'Ti', 1, 1.572, -0.31, undefined, NIST],
  [4981.73, 'Ti', 0, 0.848, 0.57, undefined, NIST],
  [4991.07, 'Ti', 0, 0.836, 0.45, undefined, NIST],
  [4999.5, 'Ti', 0, 0.826, 0.31, undefined, NIST],
  [4254.33, 'Cr', 0, 0, -0.11, undefined, NIST],
  [4274.8, 'Cr', 0, 0, -0.23, undefined, NIST],
  [4289.72, 'Cr', 0, 0, -0.36, undefined, NIST],
  [4030.75, 'Mn', 0, 0, -0.47, undefined, NIST],
  [4033.06, 'Mn', 0, 0, -0.62, undefined, NIST],
  [4034.48, 'Mn', 0, 0, -0.81, undefined, NIST],
  // Fe II, prominent in A and F stars.
  [4173.46, 'Fe', 1, 2.583, -2.18, undefined, NIST],
  [4178.86, 'Fe', 1, 2.583, -2.51, undefined, NIST],
  [4233.17, 'Fe', 1, 2.583, -1.81, undefined, NIST],
  [4351.77, 'Fe', 1, 2.704, -2.1, undefined, NIST],
  [4549.47, 'Fe', 1, 2.828, -1.75, undefined, NIST],
  [4583.84, 'Fe', 1, 2.807, -1.74, undefined, NIST],
  [4923.93, 'Fe', 1, 2.891, -1.21, undefined, NIST],
  [5018.44, 'Fe', 1, 2.891, -1.22, undefined, NIST],
  [5169.03, 'Fe', 1, 2.891, -0.87, undefined, NIST],
  // Fe I, 3700–5450 Å: the metallic-line blends of F–M stars.
  [3719.93, 'Fe', 0, 0, -0.43, undefined, NIST],
  [3734.86, 'Fe', 0, 0.859, 0.32, undefined, NIST],
  [3737.13, 'Fe', 0, 0.052, -0.57, undefined, NIST],
  [3749.49, 'Fe', 0, 0.915, 0.16, undefined, NIST],
  [3758.23, 'Fe', 0, 0.958, -0.03, undefined, NIST],
  [3820.43, 'Fe', 0, 0.859, 0.12, undefined, NIST],
  [3825.88, 'Fe', 0, 0.915, -0.04, undefined, NIST],
  [3834.22, 'Fe', 0, 0.958, -0.3, undefined, NIST],
  [3840.44, 'Fe', 0, 0.99, -0.51, undefined, NIST],
  [3856.37, 'Fe', 0, 0.052, -1.29, undefined, NIST],
  [3859.91, 'Fe', 0, 0, -0.71, undefined, NIST],
  [3878.57, 'Fe', 0, 0.087, -1.38, undefined, NIST],
  [3886.28, 'Fe', 0, 0.052, -1.08, undefined, NIST],
  [3899.71, 'Fe', 0, 0.087, -1.53, undefined, NIST],
  [3902.95, 'Fe', 0, 1.558, -0.47, undefined, NIST],
  [3920.26, 'Fe', 0, 0.121, -1.75, undefined, NIST],
  [3922.91, 'Fe', 0, 0.052, -1.65, undefined, NIST],
  [3927.92, 'Fe', 0, 0.11, -1.52, undefined, NIST],
  [3930.3, 'Fe', 0, 0.087, -1.49, undefined, NIST],
  [4005.24, 'Fe', 0, 1.557, -0.61, undefined, NIST],
  [4045.81, 'Fe', 0, 1.485, 0.28, undefined, NIST],
  [4063.59, 'Fe', 0, 1.557, 0.06, undefined, NIST],
  [4071.74, 'Fe', 0, 1.608, -0.02, undefined, NIST],
  [4132.06, 'Fe', 0, 1.608, -0.68, undefined, NIST],
  [4143.87, 'Fe', 0, 1.557, -0.51, undefined, NIST],
  [4181.75, 'Fe', 0, 2.831, -0.37, undefined, NIST],
  [4191.43, 'Fe', 0, 2.469, -0.67, undefined, NIST],
  [4202.03, 'Fe', 0, 1.485, -0.71, undefined, NIST],
  [4250.79, 'Fe', 0, 1.557, -0.71, undefined, NIST],
  [4260.47, 'Fe', 0, 2.4, 0.08, undefined, NIST],
  [4271.76, 'Fe', 0, 1.485, -0.16, undefined, NIST],
  [4307.9, 'Fe', 0, 1.557, -0.07, undefined, NIST],
  [4325.76, 'Fe', 0, 1.608, 0.01, undefined, NIST],
  [4375.93, 'Fe', 0, 0, -3.03, undefined, NIST],
  [4383.55, 'Fe', 0, 1.485, 0.2, undefined, NIST],
  [4404.75, 'Fe', 0, 1.557, -0.14, undefined, NIST],
  [4415.12, 'Fe', 0, 1.608, -0.62, undefined, NIST],
  [4427.31, 'Fe', 0, 0.052, -2.92, undefined, NIST],
  [4459.12, 'Fe', 0, 2.176, -1.28, undefined, NIST],
  [4461.65, 'Fe', 0, 0.087, -3.21, undefined, NIST],
  [4494.56, 'Fe', 0, 2.198, -1.14, undefined, NIST],
  [4528.61, 'Fe', 0, 2.176, -0.82, undefined, NIST],
  [4531.15, 'Fe', 0, 1.485, -2.15, undefined, NIST],
  [4890.76, 'Fe', 0, 2.875, -0.39, undefined, NIST],
  [4891.49, 'Fe', 0, 2.851, -0.11, undefined, NIST],
  [4918.99, 'Fe', 0, 2.865, -0.34, undefined, NIST],
  [4920.5, 'Fe', 0, 2.832, 0.07, undefined, NIST],
  [4957.6, 'Fe', 0, 2.808, 0.23, undefined, NIST],
  [5269.54, 'Fe', 0, 0.859, -1.32, undefined, NIST],
  [5328.04, 'Fe', 0, 0.915, -1.47, undefined, NIST],
  [5371.49, 'Fe', 0, 0.958, -1.65, undefined, NIST],
  [5397.13, 'Fe', 0, 0.915, -1.99, undefined, NIST],
  [5405.77, 'Fe', 0, 0.99, -1.84, undefined, NIST],
  [5429.7, 'Fe', 0, 0.958, -1.88, undefined, NIST],
  [5446.92, 'Fe', 0, 0.99, -1.91, undefined, NIST],
]

/** He II Pickering (n = 4 → m) and 4686 (3 → 4) lines: hydrogenic f-values (Wiese et al., from memory). */
const HE_II: ReadonlyArray<readonly [number, number, number, number]> = [
  // [λ air Å, lower n, upper n, f]
  [4685.68, 3, 4, 0.8421],
  [5411.52, 4, 7, 0.06549],
  [4859.32, 4, 8, 0.0323],
  [4541.59, 4, 9, 0.0187],
  [4338.67, 4, 10, 0.01196],
  [4199.83, 4, 11, 0.00819],
]

/** Every non-Balmer atomic line, in wavelength order within groups (order is fixed for reproducibility). */
export const ATOMIC_LINES: readonly AtomicLine[] = [
  ...ROWS.map(([wavelength, element, stage, lowerEnergy, logGf, logStark, source]) => ({
    wavelength,
    element,
    stage,
    lowerEnergy,
    logGf,
    broadening: vdw(logStark),
    source,
  })),
  ...HE_II.map(([wavelength, lowerN, upperN, f]) => ({
    wavelength,
    element: 'He' as const,
    stage: 1,
    lowerEnergy: 54.418 * (1 - 1 / (lowerN * lowerN)),
    logGf: Math.log10(2 * lowerN * lowerN * f),
    broadening: { kind: 'linear-stark' as const, lowerN, upperN, charge: 2 },
    source: 'hydrogenic f-values, Wiese et al. (NIST ASD, from memory)',
  })),
]

/**
 * Molecular bands drawn as band-head + degraded absorption. Dissociation energies D0 (eV):
 * Huber & Herzberg (1979) values as commonly quoted (from memory). Heads, air Å: common practice
 * (TiO α and γ′ systems, MgH A–X near 4780, CH A–X "G band" near 4300).
 */
export interface MolecularBand {
  molecule: 'TiO' | 'MgH' | 'CH'
  /** Band-head wavelength, Å. */
  head: number
  /** +1 when the band is degraded to the red (absorption extends redward of the head), −1 to the blue. */
  direction: 1 | -1
  /** e-folding length of the absorption away from the head, Å. */
  length: number
  /** Relative strength of this band within its molecule's set. */
  weight: number
}

export interface Molecule {
  name: 'TiO' | 'MgH' | 'CH'
  atoms: readonly [ElementSymbol, ElementSymbol]
  /** Dissociation energy D0, eV (Huber & Herzberg 1979, from memory). */
  dissociationEnergy: number
}

export const MOLECULES: readonly Molecule[] = [
  { name: 'TiO', atoms: ['Ti', 'O'], dissociationEnergy: 6.87 },
  { name: 'MgH', atoms: ['Mg', 'H'], dissociationEnergy: 1.34 },
  { name: 'CH', atoms: ['C', 'H'], dissociationEnergy: 3.47 },
]

export const MOLECULAR_BANDS: readonly MolecularBand[] = [
  { molecule: 'TiO', head: 4761.1, direction: 1, length: 40, weight: 0.6 },
  { molecule: 'TiO', head: 4954.6, direction: 1, length: 45, weight: 0.8 },
  { molecule: 'TiO', head: 5166.9, direction: 1, length: 50, weight: 1.0 },
  { molecule: 'TiO', head: 5448.0, direction: 1, length: 50, weight: 0.9 },
  { molecule: 'TiO', head: 5597.0, direction: 1, length: 50, weight: 0.8 },
  { molecule: 'TiO', head: 5847.0, direction: 1, length: 60, weight: 0.9 },
  { molecule: 'TiO', head: 6158.8, direction: 1, length: 70, weight: 1.1 },
  { molecule: 'TiO', head: 6651.3, direction: 1, length: 80, weight: 1.2 },
  { molecule: 'MgH', head: 4780.0, direction: -1, length: 25, weight: 1.0 },
  { molecule: 'MgH', head: 5211.0, direction: -1, length: 40, weight: 0.7 },
  { molecule: 'CH', head: 4314.0, direction: -1, length: 12, weight: 1.0 },
]
