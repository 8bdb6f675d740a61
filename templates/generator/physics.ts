/**
 * The physics of the model standards: Saha–Boltzmann populations, continuous opacity, a
 * one-layer hydrostatic photosphere, Planck continuum with the Balmer jump, and the Voigt
 * function. All cgs; wavelengths in Å unless a name says otherwise.
 *
 * Main reference: Gray, "The Observation and Analysis of Stellar Photospheres" (3rd ed. 2005),
 * chapters 1 (Saha, Boltzmann), 8 (continuous opacity), 9 (the grey atmosphere, hydrostatic
 * pressure), 11 (line broadening) and 16 (curve of growth).
 */
import { ELEMENTS, ELEMENT_ORDER, type Element, type ElementSymbol } from './atomic'

// CODATA 2018, cgs.
export const BOLTZMANN = 1.380649e-16 // erg K⁻¹
export const BOLTZMANN_EV = 8.617333262e-5 // eV K⁻¹
export const PLANCK = 6.62607015e-27 // erg s
export const LIGHT_SPEED = 2.99792458e10 // cm s⁻¹
export const ELECTRON_MASS = 9.1093837015e-28 // g
export const ELECTRON_CHARGE = 4.80320471e-10 // esu
export const ATOMIC_MASS_UNIT = 1.6605390666e-24 // g
export const BOHR_RADIUS = 5.29177210903e-9 // cm
export const THOMSON_CROSS_SECTION = 6.6524587321e-25 // cm²
/** hc/k in Å K, so that hν/kT = HC_OVER_K / (λ T). */
const HC_OVER_K = 1.438776877e8
/** πe²/(m_e c), cm² s⁻¹: the classical line absorption cross-section per unit f. */
const CLASSICAL_CROSS_SECTION = (Math.PI * ELECTRON_CHARGE ** 2) / (ELECTRON_MASS * LIGHT_SPEED)

/** Number abundance of an element relative to hydrogen. */
export function abundanceRelativeToHydrogen(symbol: ElementSymbol): number {
  return 10 ** (ELEMENTS[symbol].logAbundance - 12)
}

const TOTAL_NUCLEI_PER_H = ELEMENT_ORDER.reduce((s, el) => s + abundanceRelativeToHydrogen(el), 0)
/** Mass per hydrogen nucleus, g (about 1.4 m_H for the solar mix). */
const MASS_PER_H = ELEMENT_ORDER.reduce((s, el) => s + abundanceRelativeToHydrogen(el) * ELEMENTS[el].mass, 0) * ATOMIC_MASS_UNIT

/**
 * Partition function U(T) of an ionisation stage: log U interpolated linearly in log T
 * between the tabulated 5000 K and 10000 K values (Gray 2005, app. D; see atomic.ts), held
 * constant outside that range.
 */
export function partitionFunction(element: Element, stage: number, temperature: number): number {
  const pair = element.partition[stage]
  if (!pair) throw new RangeError(`no partition function for ${element.symbol} stage ${stage}`)
  const t = Math.min(1, Math.max(0, Math.log10(temperature / 5000) / Math.log10(2)))
  return 10 ** ((1 - t) * Math.log10(pair[0]) + t * Math.log10(pair[1]))
}

/**
 * Fractions of an element in each ionisation stage by the Saha equation,
 * N_{j+1}/N_j = (2 U_{j+1}/U_j) (2π m_e kT/h²)^{3/2} (kT/P_e) exp(−χ_j/kT) (Gray 2005, eq. 1.20).
 * @param temperature K
 * @param electronPressure P_e, dyn cm⁻²
 * @returns one fraction per stage I, II, …, summing to 1
 */
export function sahaIonisationFractions(element: Element, temperature: number, electronPressure: number): Float64Array {
  const stages = element.ionisation.length + 1
  const logRatio = new Float64Array(stages) // ln(N_j / N_0)
  const kT = BOLTZMANN * temperature
  const thermal = 1.5 * Math.log((2 * Math.PI * ELECTRON_MASS * kT) / (PLANCK * PLANCK)) + Math.log(kT / electronPressure)
  for (let j = 1; j < stages; j++) {
    const u0 = partitionFunction(element, j - 1, temperature)
    const u1 = partitionFunction(element, j, temperature)
    logRatio[j] = logRatio[j - 1]! + Math.log((2 * u1) / u0) + thermal - element.ionisation[j - 1]! / (BOLTZMANN_EV * temperature)
  }
  let max = -Infinity
  for (let j = 0; j < stages; j++) max = Math.max(max, logRatio[j]!)
  let sum = 0
  const out = new Float64Array(stages)
  for (let j = 0; j < stages; j++) {
    out[j] = Math.exp(logRatio[j]! - max)
    sum += out[j]!
  }
  for (let j = 0; j < stages; j++) out[j] = out[j]! / sum
  return out
}

/**
 * Fraction of all hydrogen (neutral + ionised) in the neutral level n, by Saha and then
 * Boltzmann, N_n/N_I = 2n² exp(−χ_n/kT)/U_I with χ_n = 13.598 (1 − 1/n²) eV.
 * This is the textbook calculation of Carroll & Ostlie (2nd ed., ch. 8).
 */
export function hydrogenLevelFraction(n: number, temperature: number, electronPressure: number): number {
  const neutral = sahaIonisationFractions(ELEMENTS.H, temperature, electronPressure)[0]!
  const u = partitionFunction(ELEMENTS.H, 0, temperature)
  const chi = 13.598 * (1 - 1 / (n * n))
  return (neutral * 2 * n * n * Math.exp(-chi / (BOLTZMANN_EV * temperature))) / u
}

/**
 * Electron pressure from charge conservation at given T and gas pressure P_g:
 * P_e = (P_g − P_e) Σ A_el ē_el(T, P_e) / Σ A_el, with ē the mean charge per atom from Saha
 * (Gray 2005, ch. 9, "the electron pressure"). Solved by bisection in ln P_e.
 * @returns P_e, dyn cm⁻²
 */
export function electronPressureFromGasPressure(temperature: number, gasPressure: number): number {
  const residual = (pe: number): number => {
    let electronsPerH = 0
    for (const el of ELEMENT_ORDER) {
      const f = sahaIonisationFractions(ELEMENTS[el], temperature, pe)
      let mean = 0
      for (let j = 1; j < f.length; j++) mean += j * f[j]!
      electronsPerH += abundanceRelativeToHydrogen(el) * mean
    }
    return pe - ((gasPressure - pe) * electronsPerH) / TOTAL_NUCLEI_PER_H
  }
  let lo = Math.log(gasPressure * 1e-14)
  let hi = Math.log(gasPressure * 0.999999)
  for (let k = 0; k < 56; k++) {
    const mid = 0.5 * (lo + hi)
    if (residual(Math.exp(mid)) > 0) hi = mid
    else lo = mid
  }
  return Math.exp(0.5 * (lo + hi))
}

/** Thermodynamic state of one photospheric layer. */
export interface Layer {
  /** Temperature, K. */
  temperature: number
  /** Gas pressure, dyn cm⁻². */
  gasPressure: number
  /** Electron pressure, dyn cm⁻². */
  electronPressure: number
  /** Electron number density, cm⁻³. */
  electronDensity: number
  /** Hydrogen nuclei per cm³. */
  hydrogenDensity: number
  /** Fraction of hydrogen that is neutral. */
  neutralHydrogen: number
  /** Continuous opacity at 5000 Å per gram, cm² g⁻¹. */
  opacity5000: number
}

/**
 * Temperature of the grey atmosphere in the Eddington approximation,
 * T⁴ = ¾ Teff⁴ (τ + ⅔) (Gray 2005, eq. 9.36).
 */
export function greyTemperature(teff: number, tau: number): number {
  return teff * (0.75 * (tau + 2 / 3)) ** 0.25
}

function layerAt(temperature: number, gasPressure: number): Omit<Layer, 'opacity5000'> {
  const pe = electronPressureFromGasPressure(temperature, gasPressure)
  const kT = BOLTZMANN * temperature
  return {
    temperature,
    gasPressure,
    electronPressure: pe,
    electronDensity: pe / kT,
    hydrogenDensity: (gasPressure - pe) / (kT * TOTAL_NUCLEI_PER_H),
    neutralHydrogen: sahaIonisationFractions(ELEMENTS.H, temperature, pe)[0]!,
  }
}

/**
 * One photospheric layer at continuum optical depth τ₅₀₀₀: temperature from the grey
 * atmosphere and gas pressure from hydrostatic equilibrium dP/dτ = g/κ integrated with κ
 * held at its local value, P_g = g τ / κ₅₀₀₀ (Gray 2005, ch. 9), iterated with the Saha
 * electron pressure to consistency. Because κ grows with P_e (H⁻) this gives the grey-atmosphere
 * scaling P_g ∝ g^{2/3} in cool stars and P_e ∝ g where electron scattering dominates.
 * @param teff K
 * @param logg log10 g, cgs
 * @param tau continuum optical depth at 5000 Å
 */
export function photosphericLayer(teff: number, logg: number, tau: number): Layer {
  const temperature = greyTemperature(teff, tau)
  const g = 10 ** logg
  // Secant iteration on h(ln P_g) = ln P_g − ln(g τ / κ(P_g)); converges in a handful of steps.
  const h = (x: number): number => {
    const kappa = continuousOpacityPerHydrogen(5000, layerAt(temperature, Math.exp(x))) / MASS_PER_H
    return x - Math.log((g * tau) / kappa)
  }
  let x0 = Math.log(1e3)
  let x1 = Math.log(1e4)
  let h0 = h(x0)
  let h1 = h(x1)
  for (let k = 0; k < 40 && Math.abs(x1 - x0) > 1e-9; k++) {
    const x2 = x1 - (h1 * (x1 - x0)) / (h1 - h0)
    x0 = x1
    h0 = h1
    // Keep steps bounded: κ(P_g) is smooth but a wild first secant step can leave the physical range.
    x1 = Math.min(x0 + 3, Math.max(x0 - 3, x2))
    h1 = h(x1)
  }
  const pg = Math.exp(x1)
  const state = layerAt(temperature, pg)
  return { ...state, opacity5000: continuousOpacityPerHydrogen(5000, state) / MASS_PER_H }
}

/** The part of a layer continuous opacity depends on. */
type OpacityState = Pick<Layer, 'temperature' | 'electronPressure' | 'electronDensity' | 'hydrogenDensity' | 'neutralHydrogen'>

/** Air wavelength of the hydrogen bound-free edge from level n, Å (911.5 n² Å). */
export function hydrogenEdge(n: number): number {
  return 911.5 * n * n
}

/**
 * H⁻ bound-free cross-section per ion, cm²: the polynomial fit of Gray (2005, eq. 8.11) to
 * Wishart (1979), valid 2250–15000 Å (from memory).
 */
export function hydrogenMinusBoundFreeCrossSection(wavelength: number): number {
  if (wavelength > 16300) return 0
  const a = [1.99654, -1.18267e-5, 2.64243e-6, -4.40524e-10, 3.23992e-14, -1.39568e-18, 2.78701e-23]
  let s = 0
  for (let k = a.length - 1; k >= 0; k--) s = s * wavelength + a[k]!
  return Math.max(0, s) * 1e-18
}

/**
 * Continuous opacity per hydrogen nucleus, cm², at wavelength λ (Å):
 * - H I bound-free from n = 2 … 12, Kramers cross-section α_n = 1.0449×10⁻²⁶ λ³/n⁵ with g_bf = 1
 *   (Gray 2005, eq. 8.4), which carries the Balmer jump at 3646 Å;
 * - H⁻ bound-free, κ = 4.158×10⁻¹⁰ α_bf P_e θ^{5/2} 10^{0.754θ} per neutral H (Gray eq. 8.12);
 * - H⁻ free-free, Bell & Berrington (1987) fit as given by Gray (eq. 8.13) (from memory);
 * - Thomson scattering by free electrons.
 * Stimulated emission is removed from the true absorptions.
 */
export function continuousOpacityPerHydrogen(wavelength: number, state: OpacityState): number {
  const t = state.temperature
  const theta = 5040 / t
  const stimulated = 1 - Math.exp(-HC_OVER_K / (wavelength * t))
  const neutral = state.neutralHydrogen
  // H I bound-free.
  let hbf = 0
  const u = 2
  for (let n = 2; n <= 12; n++) {
    if (wavelength > hydrogenEdge(n)) continue
    const population = (neutral * 2 * n * n * Math.exp(-(13.598 * (1 - 1 / (n * n))) / (BOLTZMANN_EV * t))) / u
    hbf += (population * 1.0449e-26 * wavelength ** 3) / n ** 5
  }
  // H⁻ bound-free and free-free, both per neutral H atom.
  const hmbf = 4.158e-10 * hydrogenMinusBoundFreeCrossSection(wavelength) * state.electronPressure * theta ** 2.5 * 10 ** (0.754 * theta)
  const lw = Math.log10(wavelength)
  const f0 = -2.2763 - 1.685 * lw + 0.76661 * lw * lw - 0.053346 * lw ** 3
  const f1 = 15.2827 - 9.2846 * lw + 1.99381 * lw * lw - 0.142631 * lw ** 3
  const f2 = -197.789 + 190.266 * lw - 67.9775 * lw * lw + 10.6913 * lw ** 3 - 0.625151 * lw ** 4
  const lt = Math.log10(theta)
  const hmff = 1e-26 * state.electronPressure * 10 ** (f0 + f1 * lt + f2 * lt * lt)
  const electrons = (THOMSON_CROSS_SECTION * state.electronDensity) / state.hydrogenDensity
  return (hbf + hmbf * neutral) * stimulated + hmff * neutral + electrons
}

/**
 * Planck function B_λ(T), erg s⁻¹ cm⁻² Å⁻¹ sr⁻¹.
 * @param wavelength Å
 * @param temperature K
 */
export function planck(wavelength: number, temperature: number): number {
  const lcm = wavelength * 1e-8
  return ((2 * PLANCK * LIGHT_SPEED * LIGHT_SPEED) / lcm ** 5 / Math.expm1(HC_OVER_K / (wavelength * temperature))) * 1e-8
}

/**
 * Emergent continuum surface flux F_λ, erg s⁻¹ cm⁻² Å⁻¹, by the Eddington–Barbier relation
 * F_λ ≈ π B_λ(T(τ_λ = ⅔)) on the grey T(τ) (Gray 2005, ch. 9): the layer where τ_λ = ⅔ sits at
 * τ₅₀₀₀ = ⅔ κ₅₀₀₀/κ_λ, so where the opacity jumps (the Balmer edge at 3646 Å, the n = 2
 * bound-free absorption growing with the n = 2 population and falling with P_e-driven H⁻) the
 * flux drops. Opacity ratios are taken at the τ₅₀₀₀ = ⅔ layer.
 */
export function continuumFlux(wavelength: number, teff: number, layer: Layer): number {
  const kappa = continuousOpacityPerHydrogen(wavelength, layer)
  const kappaRef = continuousOpacityPerHydrogen(5000, layer)
  const tau = ((2 / 3) * kappaRef) / kappa
  return Math.PI * planck(wavelength, greyTemperature(teff, tau))
}

/**
 * Balmer jump D = 2.5 log10(F(3650 Å)/F(3640 Å)), mag, of {@link continuumFlux}.
 */
export function balmerJump(teff: number, layer: Layer): number {
  return 2.5 * Math.log10(continuumFlux(3650, teff, layer) / continuumFlux(3640, teff, layer))
}

/**
 * Voigt function H(a, v) = Re w(v + ia), by the rational approximation of Humlíček (1982,
 * JQSRT 27, 437), algorithm W4 (relative accuracy ~1e-4). Normalised so ∫H dv = √π.
 * @param a damping parameter (Lorentz HWHM / Doppler width)
 * @param v distance from line centre in Doppler widths
 */
export function voigt(a: number, v: number): number {
  const x = v
  const y = a
  const s = Math.abs(x) + y
  // t = y − i x
  const tr = y
  const ti = -x
  if (s >= 15) {
    // w = t · 0.5641896 / (0.5 + t²)
    const ur = tr * tr - ti * ti + 0.5
    const ui = 2 * tr * ti
    return (0.5641896 * (tr * ur + ti * ui)) / (ur * ur + ui * ui)
  }
  if (s >= 5.5) {
    // w = t (1.410474 + 0.5641896 u) / (0.75 + u (3 + u)), u = t²
    const uR = tr * tr - ti * ti
    const uI = 2 * tr * ti
    const nR = 1.410474 + 0.5641896 * uR
    const nI = 0.5641896 * uI
    const numR = tr * nR - ti * nI
    const numI = tr * nI + ti * nR
    const dR = 0.75 + 3 * uR + (uR * uR - uI * uI)
    const dI = 3 * uI + 2 * uR * uI
    return (numR * dR + numI * dI) / (dR * dR + dI * dI)
  }
  if (y >= 0.195 * Math.abs(x) - 0.176) {
    // Horner in t for numerator and denominator.
    const num = [16.4955, 20.20933, 11.96482, 3.778987, 0.5642236]
    const den = [16.4955, 38.82363, 39.27121, 21.69274, 6.699398, 1]
    const [nR, nI] = horner(num, tr, ti)
    const [dR, dI] = horner(den, tr, ti)
    return (nR * dR + nI * dI) / (dR * dR + dI * dI)
  }
  // w = exp(u) − t · P(u)/Q(u), u = t²
  const uR = tr * tr - ti * ti
  const uI = 2 * tr * ti
  const p = [36183.31, -3321.9905, 1540.787, -219.0313, 35.76683, -1.320522, 0.56419]
  const q = [32066.6, -24322.84, 9022.228, -2186.181, 364.2191, -61.57037, 1.841439, -1]
  const [pR, pI] = horner(p, uR, uI)
  const [qR, qI] = horner(q, uR, uI)
  const denom = qR * qR + qI * qI
  const rR = (pR * qR + pI * qI) / denom
  const rI = (pI * qR - pR * qI) / denom
  const tpR = tr * rR - ti * rI
  const e = Math.exp(uR)
  return e * Math.cos(uI) - tpR
}

/** Σ c_k z^k for complex z, coefficients in ascending order. */
function horner(c: readonly number[], zr: number, zi: number): [number, number] {
  let r = c[c.length - 1]!
  let i = 0
  for (let k = c.length - 2; k >= 0; k--) {
    const nr = r * zr - i * zi + c[k]!
    const ni = r * zi + i * zr
    r = nr
    i = ni
  }
  return [r, i]
}

/** Line parameters at one layer, ready to be drawn. */
export interface LineOpacity {
  /** Line centre, Å. */
  centre: number
  /** Doppler width Δλ_D, Å. */
  dopplerWidth: number
  /** Voigt damping parameter a. */
  damping: number
  /** κ_line / κ_cont per unit H(a, v): the line-to-continuum ratio is eta · H(a, v). */
  eta: number
}

/**
 * Doppler width Δλ_D = (λ/c) √(2kT/m + ξ²), Å, from thermal motion and microturbulence ξ
 * (Gray 2005, ch. 11).
 * @param mass atomic mass, u
 * @param microturbulence ξ, km s⁻¹
 */
export function dopplerWidth(wavelength: number, temperature: number, mass: number, microturbulence: number): number {
  const v2 = (2 * BOLTZMANN * temperature) / (mass * ATOMIC_MASS_UNIT) + (microturbulence * 1e5) ** 2
  return (wavelength * Math.sqrt(v2)) / LIGHT_SPEED
}

/** Classical radiative damping γ_rad = 8π²e²/(3 m_e c λ²) = 0.2223×10¹⁶/λ²(Å) s⁻¹ (Gray 2005, eq. 11.14). */
export function radiativeDamping(wavelength: number): number {
  return 2.223e15 / (wavelength * wavelength)
}

/**
 * Van der Waals damping in Unsöld's hydrogenic approximation (Gray 2005, eqs. 11.29–11.35):
 * C6 = 0.3×10⁻³⁰ [1/(I − χ − χ_λ)² − 1/(I − χ)²], log γ6 = 19.6 + 0.4 log C6 + log P_g − 0.7 log T.
 * @param ionisation I of the absorbing stage, eV
 * @param lowerEnergy χ, eV
 * @returns γ6, s⁻¹
 */
export function vanDerWaalsDamping(wavelength: number, ionisation: number, lowerEnergy: number, gasPressure: number, temperature: number): number {
  const photon = 12398.42 / wavelength
  const upperGap = Math.max(0.5, ionisation - lowerEnergy - photon)
  const lowerGap = Math.max(0.6, ionisation - lowerEnergy)
  const c6 = Math.max(1e-34, 0.3e-30 * (1 / (upperGap * upperGap) - 1 / (lowerGap * lowerGap)))
  return 10 ** (19.6 + 0.4 * Math.log10(c6) + Math.log10(gasPressure) - 0.7 * Math.log10(temperature))
}

/**
 * Linear Stark damping of a hydrogenic line treated as a Lorentzian whose half width is the
 * mean linear-Stark shift in the Holtsmark normal field F₀ = 2.61 e N_e^{2/3}
 * (Holtsmark 1919; Gray 2005, ch. 11): Δσ = (3 e a₀ / 2hc) F₀ (n_u² − n_l²)/Z, γ = 4π c Δσ.
 * The width thus grows as N_e^{2/3}: broad in dwarfs, narrow in supergiants.
 * @param electronDensity cm⁻³
 * @returns γ (Lorentz FWHM in angular frequency), s⁻¹
 */
export function linearStarkDamping(lowerN: number, upperN: number, charge: number, electronDensity: number): number {
  const field = 2.61 * ELECTRON_CHARGE * electronDensity ** (2 / 3)
  const shift = (((3 * ELECTRON_CHARGE * BOHR_RADIUS) / (2 * PLANCK * LIGHT_SPEED)) * field * (upperN * upperN - lowerN * lowerN)) / charge
  return 4 * Math.PI * LIGHT_SPEED * shift
}

/**
 * Line-to-continuum opacity ratio scale of a line per unit Voigt function:
 * κ_l/κ_c = (πe²/m_e c)(λ²/c) gf (N_stage/N_H)(e^{−χ/kT}/U)(1 − e^{−hν/kT}) H(a,v)/(√π Δλ_D) / κ_c
 * (Gray 2005, ch. 11 and 16: the line absorption coefficient of the curve of growth).
 * @param stageFraction N_stage / N_H (abundance × ionisation fraction)
 * @param partition U of the stage at T
 * @param continuum κ_c per H nucleus at the line, cm²
 */
export function lineToContinuumScale(
  wavelength: number,
  logGf: number,
  lowerEnergy: number,
  stageFraction: number,
  partition: number,
  temperature: number,
  doppler: number,
  continuum: number,
): number {
  const lcm = wavelength * 1e-8
  const boltzmann = Math.exp(-lowerEnergy / (BOLTZMANN_EV * temperature)) / partition
  const stimulated = 1 - Math.exp(-HC_OVER_K / (wavelength * temperature))
  const kappa = (((CLASSICAL_CROSS_SECTION * (lcm * lcm)) / LIGHT_SPEED) * 10 ** logGf * stageFraction * boltzmann * stimulated) / (Math.sqrt(Math.PI) * doppler * 1e-8)
  return kappa / continuum
}

/**
 * Residual-flux depth of a line of line-to-continuum ratio η in a Schuster–Schwarzschild
 * reversing layer over a continuum of boundary temperature T₀: D = D_max η/(1 + η)
 * (Unsöld 1955; Gray 2005, ch. 16 — this interpolation between the weak and saturated limits
 * is what produces the linear, flat and damping parts of the curve of growth when integrated
 * over a Voigt profile).
 */
export function lineDepth(eta: number, maximumDepth: number): number {
  return (maximumDepth * eta) / (1 + eta)
}

/**
 * Deepest possible line core: D_max = 1 − B_λ(T₀)/B_λ(Teff), the Eddington–Barbier contrast
 * between the boundary and the continuum-forming layer. T₀ = 0.75 Teff, a little below the grey
 * boundary value 2^{−1/4} Teff = 0.84 Teff to allow for surface cooling by line blanketing
 * (common practice in simple models; the factor is a choice of this generator).
 */
export function maximumLineDepth(wavelength: number, teff: number): number {
  return 1 - planck(wavelength, 0.75 * teff) / planck(wavelength, teff)
}

/**
 * Number of molecules AB per hydrogen nucleus in dissociation equilibrium,
 * n_AB = n_A n_B / K(T), K(T) = (2π μ kT/h²)^{3/2} exp(−D₀/kT) with internal partition functions
 * set to unity (the Saha-like law of mass action; Tsuji 1973 gives full fits).
 * @param neutralA n_A / n_H, @param neutralB n_B / n_H (neutral atoms)
 * @param reducedMass μ, u
 * @param dissociationEnergy D₀, eV
 */
export function moleculesPerHydrogen(neutralA: number, neutralB: number, reducedMass: number, dissociationEnergy: number, temperature: number, hydrogenDensity: number): number {
  const kT = BOLTZMANN * temperature
  const logK = 1.5 * Math.log((2 * Math.PI * reducedMass * ATOMIC_MASS_UNIT * kT) / (PLANCK * PLANCK)) - dissociationEnergy / (BOLTZMANN_EV * temperature)
  const n = neutralA * neutralB * hydrogenDensity * Math.exp(-logK)
  return Math.min(n, neutralA, neutralB)
}

export { TOTAL_NUCLEI_PER_H, MASS_PER_H }
