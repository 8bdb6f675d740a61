/**
 * Synthesis of one model standard: line opacities on a fine log-λ grid, the Schuster–Schwarzschild
 * residual flux, molecular bands, then Gaussian instrumental smoothing onto the library grid.
 */
import { vacuumToAir } from '../../shared/airvac'
import { gridWavelength, type LogGrid } from '../../shared/grid'
import { ATOMIC_LINES, BALMER_OSCILLATOR_STRENGTHS, ELEMENTS, HYDROGEN_N2_ENERGY, MOLECULAR_BANDS, MOLECULES, balmerAirWavelength, type AtomicLine, type Molecule } from './atomic'
import {
  abundanceRelativeToHydrogen as abundanceFor,
  balmerJump,
  continuousOpacityPerHydrogen,
  continuumFlux,
  dopplerWidth,
  linearStarkDamping,
  lineToContinuumScale,
  maximumLineDepth,
  moleculesPerHydrogen,
  partitionFunction,
  photosphericLayer,
  radiativeDamping,
  sahaIonisationFractions,
  vanDerWaalsDamping,
  voigt,
  type Layer,
} from './physics'

/** Optical depth τ₅₀₀₀ of the layer where the lines are formed (a one-layer model; Gray 2005, ch. 16). */
export const LINE_FORMING_DEPTH = 0.3
/** Optical depth of the continuum-forming layer (Eddington–Barbier). */
export const CONTINUUM_FORMING_DEPTH = 2 / 3
/** Oversampling of the fine grid over the library grid (≈ 3 km/s a fine pixel at Δlnλ = 1e-4). */
export const OVERSAMPLING = 10
/** Lines are drawn out to where κ_l/κ_c falls below this. */
const ETA_FLOOR = 1e-4
/** The Lorentz wing of hydrogenic lines turns into the Holtsmark wing at this many Stark half widths. */
export const HOLTSMARK_WING_START = 2
/** Widest half window of any line, Å (Balmer wings in dwarfs). */
const MAX_HALF_WINDOW = 300

/** What a standard is made from. */
export interface StandardInput {
  teff: number
  logg: number
  /** Microturbulence ξ, km s⁻¹. */
  vmicro: number
}

/** One synthesised standard on the library grid. */
export interface SynthesisedStandard {
  /** Continuum-normalised flux on the library grid. */
  rectified: Float32Array
  /** Continuum surface flux, erg s⁻¹ cm⁻² Å⁻¹, on the continuum grid. */
  continuum: Float32Array
  /** Balmer jump, mag. */
  balmerJump: number
  lineLayer: Layer
}

/** Fine grid and instrumental kernels, built once per library and shared by every standard. */
export interface SynthesisPlan {
  grid: LogGrid
  continuumGrid: LogGrid
  fine: LogGrid
  fineWavelengths: Float64Array
  /** Per library pixel: first fine index of its kernel. */
  kernelStart: Int32Array
  /** Per library pixel: offset into kernelWeights; kernelOffset[i + 1] − kernelOffset[i] taps. */
  kernelOffset: Int32Array
  kernelWeights: Float64Array
  /** Instrumental resolution, FWHM Å. */
  resolutionFwhm: number
}

/**
 * Precomputes the fine grid (OVERSAMPLING × finer, with margins for the kernel) and the Gaussian
 * instrumental kernel of each library pixel (constant FWHM in Å, so its width in ln λ varies).
 * @param resolutionFwhm instrumental FWHM, Å
 */
export function planSynthesis(grid: LogGrid, continuumGrid: LogGrid, resolutionFwhm: number): SynthesisPlan {
  const sigma = resolutionFwhm / (2 * Math.sqrt(2 * Math.LN2))
  const step = grid.step / OVERSAMPLING
  const margin = Math.ceil((5 * sigma) / (grid.start * step))
  const fine: LogGrid = { start: grid.start * Math.exp(-margin * step), step, length: (grid.length - 1) * OVERSAMPLING + 1 + 2 * margin }
  const fineWavelengths = new Float64Array(fine.length)
  for (let i = 0; i < fine.length; i++) fineWavelengths[i] = fine.start * Math.exp(step * i)
  const kernelStart = new Int32Array(grid.length)
  const kernelOffset = new Int32Array(grid.length + 1)
  const weights: number[] = []
  for (let i = 0; i < grid.length; i++) {
    const centre = margin + i * OVERSAMPLING
    const lam = fineWavelengths[centre]!
    const halfTaps = Math.ceil((4 * sigma) / (lam * step))
    const from = Math.max(0, centre - halfTaps)
    const to = Math.min(fine.length - 1, centre + halfTaps)
    kernelStart[i] = from
    let sum = 0
    const local: number[] = []
    for (let j = from; j <= to; j++) {
      const d = (fineWavelengths[j]! - lam) / sigma
      // Weight by the fine pixel's width in Å, which grows with λ on a log grid.
      const w = Math.exp(-0.5 * d * d) * fineWavelengths[j]!
      local.push(w)
      sum += w
    }
    for (const w of local) weights.push(w / sum)
    kernelOffset[i + 1] = weights.length
  }
  return { grid, continuumGrid, fine, fineWavelengths, kernelStart, kernelOffset, kernelWeights: Float64Array.from(weights), resolutionFwhm }
}

interface DrawnLine {
  centre: number
  /** Half width beyond which the quasi-static Holtsmark wing replaces the Lorentz wing, Å (hydrogenic lines only). */
  holtsmarkFrom: number
  mass: number
  logGf: number
  lowerEnergy: number
  stageFraction: number
  partition: number
  damping: number
  doppler: number
}

/** Lines that a standard draws, with their populations and widths at the line-forming layer. */
function prepareLines(input: StandardInput, layer: Layer): DrawnLine[] {
  const t = layer.temperature
  const fractions = new Map<string, Float64Array>()
  const fractionOf = (symbol: keyof typeof ELEMENTS): Float64Array => {
    let f = fractions.get(symbol)
    if (!f) {
      f = sahaIonisationFractions(ELEMENTS[symbol], t, layer.electronPressure)
      fractions.set(symbol, f)
    }
    return f
  }
  const out: DrawnLine[] = []
  // Balmer series: linear Stark + radiative + van der Waals (resonance broadening is neglected).
  const hNeutral = fractionOf('H')[0]!
  for (const [upperN, f] of BALMER_OSCILLATOR_STRENGTHS) {
    const centre = balmerAirWavelength(upperN, vacuumToAir)
    const doppler = dopplerWidth(centre, t, ELEMENTS.H.mass, input.vmicro)
    const gamma = radiativeDamping(centre) + linearStarkDamping(2, upperN, 1, layer.electronDensity)
    const stark = linearStarkDamping(2, upperN, 1, layer.electronDensity)
    out.push({
      centre,
      holtsmarkFrom: starkHalfWidth(stark, centre),
      mass: ELEMENTS.H.mass,
      logGf: Math.log10(8 * f),
      lowerEnergy: HYDROGEN_N2_ENERGY,
      stageFraction: hNeutral,
      partition: partitionFunction(ELEMENTS.H, 0, t),
      damping: dampingParameter(gamma, centre, doppler),
      doppler,
    })
  }
  for (const line of ATOMIC_LINES) out.push(prepareAtomicLine(line, input, layer, fractionOf(line.element)))
  return out
}

function prepareAtomicLine(line: AtomicLine, input: StandardInput, layer: Layer, fractions: Float64Array): DrawnLine {
  const element = ELEMENTS[line.element]
  const t = layer.temperature
  const doppler = dopplerWidth(line.wavelength, t, element.mass, input.vmicro)
  let gamma = radiativeDamping(line.wavelength)
  let holtsmarkFrom = Infinity
  const b = line.broadening
  if (b.kind === 'linear-stark') {
    const stark = linearStarkDamping(b.lowerN, b.upperN, b.charge, layer.electronDensity)
    gamma += stark
    holtsmarkFrom = starkHalfWidth(stark, line.wavelength)
  } else {
    const ionisation = element.ionisation[line.stage] ?? Infinity
    // Van der Waals perturbers are neutral H atoms: scale P_g by the neutral hydrogen fraction.
    gamma += vanDerWaalsDamping(line.wavelength, ionisation, line.lowerEnergy, layer.gasPressure * layer.neutralHydrogen, t)
    if (b.logStarkPerElectron !== undefined) gamma += 10 ** b.logStarkPerElectron * layer.electronDensity
  }
  return {
    centre: line.wavelength,
    holtsmarkFrom,
    mass: element.mass,
    logGf: line.logGf,
    lowerEnergy: line.lowerEnergy,
    stageFraction: abundanceFor(line.element) * (fractions[line.stage] ?? 0),
    partition: partitionFunction(element, line.stage, t),
    damping: dampingParameter(gamma, line.wavelength, doppler),
    doppler,
  }
}

/** Lorentz half width in Å of a damping constant γ: Δλ = λ² γ / (4π c). */
function starkHalfWidth(gamma: number, wavelength: number): number {
  return (((wavelength * 1e-8) ** 2 * gamma) / (4 * Math.PI * 2.99792458e10)) * 1e8
}

/** a = γ / (4π Δν_D) with Δν_D = c Δλ_D / λ². */
function dampingParameter(gamma: number, wavelength: number, doppler: number): number {
  const dopplerFrequency = (2.99792458e10 * doppler * 1e-8) / (wavelength * 1e-8) ** 2
  return gamma / (4 * Math.PI * dopplerFrequency)
}

/**
 * Molecular band opacity per H nucleus, in units where the band cross-section is 1, from the
 * dissociation equilibrium of {@link moleculesPerHydrogen}.
 */
function moleculeAbundance(molecule: Molecule, layer: Layer): number {
  const [a, b] = molecule.atoms
  const na = abundanceFor(a) * sahaIonisationFractions(ELEMENTS[a], layer.temperature, layer.electronPressure)[0]!
  const nb = abundanceFor(b) * sahaIonisationFractions(ELEMENTS[b], layer.temperature, layer.electronPressure)[0]!
  const ma = ELEMENTS[a].mass
  const mb = ELEMENTS[b].mass
  return moleculesPerHydrogen(na, nb, (ma * mb) / (ma + mb), molecule.dissociationEnergy, layer.temperature, layer.hydrogenDensity)
}

/**
 * Band normalisation: each molecule's effective band cross-section is fixed so that its
 * strongest band reaches κ_band/κ_c = 1 at a reference star. Reference stars are a choice of
 * this generator tied to common practice: TiO bands clearly present at M0 V and MgH at M0 V;
 * the CH G band a prominent feature by G8 III.
 */
export const MOLECULAR_REFERENCES: Readonly<Record<Molecule['name'], { teff: number; logg: number; eta: number }>> = {
  TiO: { teff: 3850, logg: 4.65, eta: 0.6 },
  MgH: { teff: 3850, logg: 4.65, eta: 0.4 },
  CH: { teff: 4800, logg: 2.7, eta: 0.5 },
}

const bandCrossSections = new Map<string, number>()
function bandCrossSection(molecule: Molecule): number {
  let s = bandCrossSections.get(molecule.name)
  if (s === undefined) {
    const ref = MOLECULAR_REFERENCES[molecule.name]
    const layer = photosphericLayer(ref.teff, ref.logg, LINE_FORMING_DEPTH)
    const heads = MOLECULAR_BANDS.filter((b) => b.molecule === molecule.name)
    const head = heads.reduce((m, b) => (b.weight > m.weight ? b : m), heads[0]!)
    s = (ref.eta * continuousOpacityPerHydrogen(head.head, layer)) / (moleculeAbundance(molecule, layer) * head.weight)
    bandCrossSections.set(molecule.name, s)
  }
  return s
}

/** Residual flux of a standard on the fine grid, before instrumental smoothing. */
export function fineResidualFlux(plan: SynthesisPlan, input: StandardInput): { residual: Float64Array; lineLayer: Layer } {
  const layer = photosphericLayer(input.teff, input.logg, LINE_FORMING_DEPTH)
  const lam = plan.fineWavelengths
  const n = lam.length
  const eta = new Float64Array(n)
  const step = plan.fine.step
  const start = plan.fine.start
  const lines = prepareLines(input, layer)
  for (const line of lines) {
    const continuum = continuousOpacityPerHydrogen(line.centre, layer)
    const scale = lineToContinuumScale(line.centre, line.logGf, line.lowerEnergy, line.stageFraction, line.partition, layer.temperature, line.doppler, continuum)
    if (!(scale > ETA_FLOOR * 1e-2)) continue
    // Window: the Doppler core out to η = floor, and the Lorentz wing H ≈ a/(√π v²) out to the same floor.
    const core = Math.sqrt(Math.max(0, Math.log(scale / ETA_FLOOR)))
    let wing = Math.sqrt((scale * line.damping) / (Math.sqrt(Math.PI) * ETA_FLOOR))
    const wingStartDoppler = (HOLTSMARK_WING_START * line.holtsmarkFrom) / line.doppler
    // In the Δλ^{-5/2} regime the floor is reached at (scale a √(v_s)/(√π floor))^{2/5} Doppler widths.
    if (wing > wingStartDoppler) wing = Math.max(wingStartDoppler, ((scale * line.damping * Math.sqrt(wingStartDoppler)) / (Math.sqrt(Math.PI) * ETA_FLOOR)) ** 0.4)
    const half = Math.min(MAX_HALF_WINDOW, Math.max(core, wing, 3) * line.doppler)
    const from = Math.max(0, Math.floor(Math.log((line.centre - half) / start) / step))
    const to = Math.min(n - 1, Math.ceil(Math.log((line.centre + half) / start) / step))
    const inverseDoppler = 1 / line.doppler
    const wingStart = HOLTSMARK_WING_START * line.holtsmarkFrom
    for (let i = from; i <= to; i++) {
      const offset = Math.abs(lam[i]! - line.centre)
      let h = voigt(line.damping, offset * inverseDoppler)
      // Quasi-static far wing: the Holtsmark distribution falls as Δλ^{-5/2}, not the Lorentz Δλ^{-2}
      // (Holtsmark 1919; Griem 1960); joined continuously at a few Stark half widths.
      if (offset > wingStart) h *= Math.sqrt(wingStart / offset)
      eta[i] = eta[i]! + scale * h
    }
  }
  for (const band of MOLECULAR_BANDS) {
    const molecule = MOLECULES.find((m) => m.name === band.molecule)!
    const strength = (bandCrossSection(molecule) * moleculeAbundance(molecule, layer) * band.weight) / continuousOpacityPerHydrogen(band.head, layer)
    if (!(strength > ETA_FLOOR)) continue
    const reach = band.length * Math.log(strength / ETA_FLOOR)
    const lo = band.direction > 0 ? band.head - 3 : band.head - reach
    const hi = band.direction > 0 ? band.head + reach : band.head + 3
    const from = Math.max(0, Math.floor(Math.log(lo / start) / step))
    const to = Math.min(n - 1, Math.ceil(Math.log(hi / start) / step))
    for (let i = from; i <= to; i++) {
      const d = (lam[i]! - band.head) * band.direction
      // Sharp head (0.5 Å logistic edge), exponential fall-off on the degraded side.
      const edge = 1 / (1 + Math.exp(-d / 0.5))
      eta[i] = eta[i]! + strength * edge * Math.exp(-Math.max(0, d) / band.length)
    }
  }
  const residual = new Float64Array(n)
  // D_max varies slowly: evaluate it every 64 fine pixels and hold it in between.
  let dmax = 0
  for (let i = 0; i < n; i++) {
    if (i % 64 === 0) dmax = maximumLineDepth(lam[i]!, input.teff)
    const e = eta[i]!
    residual[i] = 1 - (dmax * e) / (1 + e)
  }
  return { residual, lineLayer: layer }
}

/**
 * Synthesises one standard: rectified spectrum smoothed to the instrumental resolution and
 * sampled on the library grid, plus the continuum flux on the continuum grid.
 */
export function synthesiseStandard(plan: SynthesisPlan, input: StandardInput): SynthesisedStandard {
  const { residual, lineLayer } = fineResidualFlux(plan, input)
  const grid = plan.grid
  const rectified = new Float32Array(grid.length)
  for (let i = 0; i < grid.length; i++) {
    const from = plan.kernelStart[i]!
    const o0 = plan.kernelOffset[i]!
    const o1 = plan.kernelOffset[i + 1]!
    let s = 0
    for (let k = o0; k < o1; k++) s += plan.kernelWeights[k]! * residual[from + k - o0]!
    rectified[i] = s
  }
  const continuumLayer = photosphericLayer(input.teff, input.logg, CONTINUUM_FORMING_DEPTH)
  const continuum = new Float32Array(plan.continuumGrid.length)
  for (let i = 0; i < continuum.length; i++) continuum[i] = continuumFlux(gridWavelength(plan.continuumGrid, i), input.teff, continuumLayer)
  return { rectified, continuum, balmerJump: balmerJump(input.teff, continuumLayer), lineLayer }
}
