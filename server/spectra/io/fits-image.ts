/**
 * Spectra stored as FITS images: 1-D arrays, rows of apertures or echelle orders (IRAF multispec,
 * or a flux image beside a wavelength image), IRAF equispec/multispec bands, survey images whose
 * rows hold flux, inverse variance, wavelength and masks, 1 × 1 × N cubes, tile-compressed images,
 * and extensions that take their keywords from the primary header (INHERIT).
 */
import { cardNumber, cardString, hduName, inheritance, inheritedCard, keptHeader, mediumFromHeaders, readImagePixels, type FitsHdu } from './fits'
import { decodeCompressedImage } from './fits-columns'
import { isMultispec, multispecApertures, watString, watUnits } from './multispec'
import { QUALITY_NAMES, preferAndMask, qualityFlags, type FlagSet } from './quality'
import { describeDispersion, fitDispersion, gather, isWavelengthRow, mergeSegments, spanCoverage } from './solution'
import { SpectrumReadError, type MediumEvidence, type RawSpectrum, type ResolvedReadOptions } from './types'
import { angstromsPerUnit, isBlankUnit } from './units'

/** A 2-D image with more rows than this and nothing saying what they are is a frame, not a spectrum. */
const MAX_PLAIN_ROWS = 4
/** Rows a survey image with a wavelength row may have. */
const MAX_SURVEY_ROWS = 10
/** Apertures or orders a reduced file may hold. */
const MAX_APERTURES = 1000

/** Roles of image extensions that accompany a flux image, named by EXTNAME (common practice). */
export const COMPANION_NAMES = {
  wave: ['WAVE', 'WAVELENGTH', 'LAMBDA', 'WAV', 'WAVELEN', 'LAM', 'WAVE_AIR', 'WAVE_VAC'],
  error: ['ERR', 'ERROR', 'ERRS', 'SIGMA', 'NOISE', 'UNCERT', 'UNCERTAINTY', 'STDDEV', 'STAT', 'STATERROR'],
  ivar: ['IVAR', 'INVVAR', 'INV_VAR'],
  variance: ['VAR', 'VARIANCE'],
  quality: QUALITY_NAMES,
} as const
export type CompanionRole = keyof typeof COMPANION_NAMES

/** The companion role an image extension plays, from its EXTNAME. */
export function companionRole(hdu: FitsHdu): CompanionRole | undefined {
  if (hdu.kind !== 'image' || hdu.index === 0) return undefined
  const name = (hduName(hdu) ?? '').toUpperCase()
  for (const role of Object.keys(COMPANION_NAMES) as CompanionRole[]) {
    if ((COMPANION_NAMES[role] as readonly string[]).includes(name)) return role
  }
  return undefined
}

/** Everything a reader of one image HDU may look at. */
export interface ImageContext {
  bytes: Uint8Array
  hdus: FitsHdu[]
  primary: FitsHdu
  fileName: string
  options: ResolvedReadOptions
}

const sameShape = (a: FitsHdu, b: FitsHdu) => a.naxis.length === b.naxis.length && a.naxis.every((v, i) => v === b.naxis[i])

/** Companion extensions of a flux image: same shape, same EXTVER when both have one. */
export function companionsOf(ctx: ImageContext, hdu: FitsHdu): Partial<Record<CompanionRole, FitsHdu[]>> {
  const out: Partial<Record<CompanionRole, FitsHdu[]>> = {}
  const ver = cardNumber(hdu, 'EXTVER')
  for (const h of ctx.hdus) {
    if (h === hdu) continue
    const role = companionRole(h)
    if (!role || !sameShape(h, hdu)) continue
    const v = cardNumber(h, 'EXTVER')
    if (ver !== undefined && v !== undefined && v !== ver) continue
    ;(out[role] ??= []).push(h)
  }
  return out
}

const SPECTRAL_CTYPES = ['WAVE', 'AWAV', 'LINEAR', 'LAMBDA', 'WAVELENGTH', 'WAVELEN', 'PIXEL', 'MULTISPE', 'FREQ', 'ENER', 'WAVN', 'VRAD', 'VOPT', 'ZOPT', 'VELO', 'BETA']

/** The 1-based axis holding the spectrum: the only axis longer than one, else axis 1. */
function spectralAxis(hdu: FitsHdu): number {
  const long = hdu.naxis.map((v, i) => (v > 1 ? i + 1 : 0)).filter((v) => v > 0)
  if (long.length === 1 && long[0]! > 1) {
    const k = long[0]!
    const ctype = String(hdu.cards.get(`CTYPE${k}`) ?? '')
      .toUpperCase()
      .slice(0, 4)
    if (SPECTRAL_CTYPES.some((t) => t.startsWith(ctype) && ctype !== '') || hdu.cards.has(`CRVAL${k}`)) return k
  }
  return 1
}

interface Shape {
  axis: number
  /** Pixels along the spectral axis. */
  n: number
  /** Lines (apertures, orders or survey rows). */
  lines: number
  /** Planes of a multispec/equispec 3-D image. */
  bands: number
}

function shapeOf(hdu: FitsHdu): Shape {
  const axis = spectralAxis(hdu)
  if (axis !== 1) return { axis, n: hdu.naxis[axis - 1]!, lines: 1, bands: 1 }
  return { axis, n: hdu.naxis[0] ?? 0, lines: hdu.naxis[1] ?? 1, bands: hdu.naxis[2] ?? 1 }
}

const hasMultispecKeywords = (hdu: FitsHdu) => hdu.cards.has('APNUM1') || hdu.cards.has('BANDID1') || hdu.cards.has('WAT0_001') || isMultispec(hdu)

/** Reads one line of one band as float64 (compressed images are decoded whole, once). */
function linePixels(ctx: ImageContext, hdu: FitsHdu, shape: Shape, line: number, band: number, cache: Map<FitsHdu, Float64Array>): Float64Array {
  const first = (band * shape.lines + line) * shape.n
  if (!hdu.compressed) return readImagePixels(ctx.bytes, hdu, first, shape.n)
  let all = cache.get(hdu)
  if (!all) {
    all = decodeCompressedImage(ctx.bytes, hdu, ctx.options.maxPixels * 4, ctx.fileName)
    cache.set(hdu, all)
  }
  return all.slice(first, first + shape.n)
}

/**
 * Why an image HDU cannot hold a 1-D spectrum, or undefined when it can. 1-D arrays and
 * 1 × 1 × N cubes qualify; so do rows of apertures, orders or survey quantities when something
 * says what they are (multispec keywords, a wavelength image of the same shape, a wavelength row).
 */
export function imageSpectrumProblem(hdu: FitsHdu, ctx?: ImageContext): string | undefined {
  if (hdu.kind !== 'image') return 'it is not an image'
  if (hdu.naxis.length === 0 || hdu.naxis.some((v) => v === 0)) return 'it holds no data'
  if (hdu.naxis.length > 3) return `it has ${hdu.naxis.length} axes`
  const shape = shapeOf(hdu)
  if (shape.axis !== 1) return undefined
  if (hdu.naxis.length === 3 && !hasMultispecKeywords(hdu)) {
    return `it is a ${hdu.naxis.join(' × ')} cube without a single spectral axis or multispec keywords, not a 1-D spectrum: extract the spectrum first`
  }
  const rows = shape.lines
  if (rows <= MAX_PLAIN_ROWS) return undefined
  if (hasMultispecKeywords(hdu) && rows <= MAX_APERTURES) return undefined
  if (ctx && rows <= MAX_APERTURES && companionsOf(ctx, hdu).wave) return undefined
  if (ctx && rows <= MAX_SURVEY_ROWS && surveyWaveRow(ctx, hdu, shape) !== undefined) return undefined
  return `it is a ${hdu.naxis.join(' × ')} image with ${rows} rows and nothing saying what the rows are (no multispec keywords, wavelength image or wavelength row), not a 1-D spectrum: extract a 1-D spectrum first`
}

/** The row of a small 2-D image that holds wavelengths (survey layouts), if one does. */
function surveyWaveRow(ctx: ImageContext, hdu: FitsHdu, shape: Shape): number | undefined {
  if (hdu.naxis.length !== 2 || shape.lines < 3 || shape.lines > MAX_SURVEY_ROWS || isMultispec(hdu)) return undefined
  if (shape.n > ctx.options.maxPixels) return undefined
  const cache = new Map<FitsHdu, Float64Array>()
  for (let r = 0; r < shape.lines; r++) {
    const row = linePixels(ctx, hdu, shape, r, 0, cache)
    if (row[0]! > 1000 && row[shape.n - 1]! > 1000 && isWavelengthRow(row)) return r
  }
  return undefined
}

/** A card of the spectral axis k, own or inherited from the primary. */
function axisCard(ctx: ImageContext, hdu: FitsHdu, key: string): number | string | undefined {
  const v = inheritedCard(hdu, ctx.primary, key)
  return typeof v === 'number' || typeof v === 'string' ? v : undefined
}
const axisNumber = (ctx: ImageContext, hdu: FitsHdu, key: string) => {
  const v = axisCard(ctx, hdu, key)
  return typeof v === 'number' && Number.isFinite(v) ? v : undefined
}
const axisString = (ctx: ImageContext, hdu: FitsHdu, key: string) => {
  const v = axisCard(ctx, hdu, key)
  return typeof v === 'string' ? v.trim() : undefined
}

interface Dispersion {
  /** Wavelength of 0-based pixel i in the file's unit. */
  at: (i: number) => number
  kind: string
  medium: MediumEvidence[]
  /** Where the keywords came from, when not from the HDU itself. */
  inherited: boolean
}

/**
 * The wavelength scale of axis k from keywords: survey log10 COEFF0/COEFF1; FITS WCS Paper III
 * (CTYPE WAVE, AWAV, WAVE-LOG, AWAV-LOG with CRVAL, CDELT or CD, CRPIX); IRAF's LINEAR and older
 * PIXEL axes with DC-FLAG (0 linear, 1 log10; IRAF onedspec, from memory).
 */
function keywordDispersion(ctx: ImageContext, hdu: FitsHdu, k: number): Dispersion {
  const { fileName } = ctx
  const inheritedFrom = (key: string) => !hdu.cards.has(key) && inheritedCard(hdu, ctx.primary, key) !== undefined
  const coeff0 = axisNumber(ctx, hdu, 'COEFF0')
  const coeff1 = axisNumber(ctx, hdu, 'COEFF1')
  if (k === 1 && coeff0 !== undefined && coeff1 !== undefined) {
    if (coeff1 === 0) throw new SpectrumReadError('NO_WAVELENGTH_SCALE', `${fileName}: COEFF1 is zero, so every pixel has the same wavelength`)
    return {
      at: (i) => 10 ** (coeff0 + coeff1 * i),
      kind: 'log10 λ = COEFF0 + COEFF1 · i (survey convention)',
      inherited: inheritedFrom('COEFF0'),
      medium: [{ vacuum: true, source: 'COEFF0/COEFF1 log10 wavelengths, vacuum by the survey convention', strength: 1.5, inferred: true }],
    }
  }
  const ctype = (axisString(ctx, hdu, `CTYPE${k}`) ?? '').toUpperCase()
  const crval = axisNumber(ctx, hdu, `CRVAL${k}`)
  const cd = axisNumber(ctx, hdu, `CD${k}_${k}`)
  const cdelt = axisNumber(ctx, hdu, `CDELT${k}`)
  const step = cd ?? (cdelt ?? 1) * (axisNumber(ctx, hdu, `PC${k}_${k}`) ?? 1)
  // FITS WCS Paper I (Greisen & Calabretta 2002) defaults CRPIX to 0; pixels count from 1.
  const crpix = axisNumber(ctx, hdu, `CRPIX${k}`) ?? 0
  if (crval === undefined || (cd === undefined && cdelt === undefined)) {
    const inherit = inheritance(hdu, ctx.primary)
    const hint =
      inherit === 'no' && ctx.primary.cards.has(`CRVAL${k}`)
        ? `; the primary header has one but this extension says INHERIT = F: set INHERIT = T, or pick the primary HDU`
        : "; add CRVAL1 and CDELT1 (or CD1_1) in Å with CTYPE1 = 'AWAV' or 'WAVE', or save a wavelength column"
    throw new SpectrumReadError('NO_WAVELENGTH_SCALE', `${fileName}: HDU ${hdu.index} has no wavelength scale (CRVAL${k} with CDELT${k} or CD${k}_${k}, or COEFF0/COEFF1)${hint}`)
  }
  if (step === 0) throw new SpectrumReadError('NO_WAVELENGTH_SCALE', `${fileName}: the wavelength step (CDELT${k}/CD${k}_${k}) is zero`)
  const inherited = inheritedFrom(`CRVAL${k}`)
  const base = ctype.slice(0, 4)
  const algorithm = ctype.length > 4 ? ctype.slice(4).replace(/^-+/, '') : ''
  const medium: MediumEvidence[] = []
  if (base === 'AWAV') medium.push({ vacuum: false, source: `CTYPE${k} = '${ctype}' (air, FITS WCS Paper III)`, strength: 3 })
  if (base === 'WAVE' && (algorithm === '' || algorithm === 'LOG'))
    medium.push({ vacuum: true, source: `CTYPE${k} = '${ctype}' (vacuum by FITS WCS Paper III, though many writers use WAVE for air too)`, strength: 1 })
  const dcFlag = axisNumber(ctx, hdu, 'DC-FLAG')
  if ((base === 'WAVE' || base === 'AWAV') && algorithm === 'LOG') {
    // Paper III eq. 5: λ = λr exp(w / λr), w = CDELT (p − CRPIX).
    return { at: (i) => crval * Math.exp((step * (i + 1 - crpix)) / crval), kind: `${ctype}: λ = CRVAL exp(CDELT (p − CRPIX) / CRVAL) (FITS WCS Paper III)`, medium, inherited }
  }
  if (ctype === 'PIXEL' || ctype === 'LINEAR' || ctype === '' || ctype === 'LAMBDA' || ctype === 'WAVELENGTH' || ctype === 'WAVELEN' || ((base === 'WAVE' || base === 'AWAV') && algorithm === '')) {
    if (ctype === 'PIXEL' && dcFlag === undefined) {
      throw new SpectrumReadError(
        'NO_WAVELENGTH_SCALE',
        `${fileName}: CTYPE${k} = 'PIXEL' without DC-FLAG: the axis is in pixels, not wavelength. If CRVAL${k}/CDELT${k} are wavelengths, set DC-FLAG = 0 (linear) or 1 (log10), or CTYPE${k} = 'AWAV'`,
      )
    }
    if (dcFlag !== undefined && dcFlag < 0) {
      throw new SpectrumReadError('NO_WAVELENGTH_SCALE', `${fileName}: DC-FLAG = ${dcFlag}: the spectrum is not dispersion-corrected; calibrate it first (IRAF dispcor)`)
    }
    if (dcFlag === 1) {
      // IRAF onedspec: DC-FLAG = 1 means log10 λ is linear in the pixel.
      return {
        at: (i) => 10 ** (crval + step * (i + 1 - crpix)),
        kind: `log10 λ = CRVAL${k} + CDELT${k} (p − CRPIX${k}) (DC-FLAG = 1${ctype === 'PIXEL' ? ", CTYPE1 = 'PIXEL' of older IRAF files" : ''})`,
        medium,
        inherited,
      }
    }
    const why = ctype === 'PIXEL' ? ` (DC-FLAG = ${dcFlag}: dispersion-corrected, CTYPE${k} = 'PIXEL' of older IRAF files)` : dcFlag === 0 ? ' (DC-FLAG = 0)' : ''
    return { at: (i) => crval + step * (i + 1 - crpix), kind: `linear: λ = CRVAL${k} + CDELT${k} (p − CRPIX${k})${why}`, medium, inherited }
  }
  if (['FREQ', 'ENER', 'WAVN', 'VRAD', 'VOPT', 'ZOPT', 'VELO', 'BETA'].includes(base)) {
    throw new SpectrumReadError(
      'NO_WAVELENGTH_SCALE',
      `${fileName}: CTYPE${k} = '${ctype}' is a ${base === 'FREQ' ? 'frequency' : base === 'ENER' ? 'energy' : base === 'WAVN' ? 'wavenumber' : 'velocity'} axis; save the spectrum on a wavelength axis (CTYPE${k} = 'AWAV' or 'WAVE', or a wavelength column)`,
    )
  }
  if (algorithm !== '') {
    throw new SpectrumReadError(
      'NO_WAVELENGTH_SCALE',
      `${fileName}: CTYPE${k} = '${ctype}' uses the '${algorithm}' algorithm, which is not read (WAVE, AWAV, WAVE-LOG, AWAV-LOG, LINEAR are); resample to a linear or log axis`,
    )
  }
  throw new SpectrumReadError('NOT_A_SPECTRUM', `${fileName}: axis ${k} is '${ctype}', not a spectral axis`)
}

/** Unit of a keyword wavelength scale: CUNITk, IRAF WAT1 units=, or Å by convention. */
function keywordUnit(ctx: ImageContext, hdu: FitsHdu, k: number): { unit?: string; source: string } {
  const cunit = axisString(ctx, hdu, `CUNIT${k}`)
  if (!isBlankUnit(cunit)) return { unit: cunit!, source: `CUNIT${k}` }
  const wat = watUnits(hdu) ?? (inheritance(hdu, ctx.primary) !== 'no' ? watUnits(ctx.primary) : undefined)
  if (wat) return { unit: wat, source: 'WAT1_001 units=' }
  return { source: `assumed Å: CUNIT${k} is not given (the FITS default for wavelength axes)` }
}

function unitFactor(unit: string | undefined, fileName: string, where: string): number {
  if (unit === undefined) return 1
  const f = angstromsPerUnit(unit)
  if (f === undefined)
    throw new SpectrumReadError('UNKNOWN_UNIT', `${fileName}: wavelength unit '${unit}' (${where}) is not one of Angstrom, nm, um, m; choose the unit when you submit (--unit with npm run classify)`)
  return f
}

/** Plane of a 3-D multispec/equispec array named as the 1σ error by its BANDIDn card, 0-based. */
function sigmaBand(hdu: FitsHdu, bands: number): number | undefined {
  for (let k = 2; k <= bands; k++) {
    const band = cardString(hdu, `BANDID${k}`)
    if (band && /^\s*(sigma|error)\b/i.test(band)) return k - 1
  }
  return undefined
}

const describeHdu = (h: FitsHdu) => `HDU ${h.index}${hduName(h) ? ` (${hduName(h)})` : ''}`

/**
 * Reads a spectrum from an image HDU. Wavelengths: a survey wavelength row, a wavelength image of
 * the same shape, IRAF multispec WAT2 dispersions, or the keyword scale of the spectral axis
 * (see {@link keywordDispersion}), converted to Å by CUNIT / WAT1 units / BUNIT of the wavelength
 * image (Å when none is given) or the observer's unit. With several lines (apertures, orders), the
 * observer's aperture, else the first line covering the classification region, else all lines
 * merged when together they cover it. Errors from a sigma band or ERR/IVAR/VAR extensions;
 * quality from DQ/QUAL/… extensions and survey mask rows.
 * @throws SpectrumReadError NOT_A_SPECTRUM, NO_WAVELENGTH_SCALE, UNKNOWN_UNIT, TOO_MANY_PIXELS, APERTURE_NOT_FOUND
 */
export function readImageHdu(ctx: ImageContext, hdu: FitsHdu): RawSpectrum {
  const { fileName, options, primary } = ctx
  const problem = imageSpectrumProblem(hdu, ctx)
  if (problem) throw new SpectrumReadError('NOT_A_SPECTRUM', `${fileName}: HDU ${hdu.index} is not a spectrum: ${problem}`)
  const shape = shapeOf(hdu)
  const { n, axis } = shape
  if (n > options.maxPixels) {
    throw new SpectrumReadError('TOO_MANY_PIXELS', `${fileName}: ${n} pixels is more than the limit of ${options.maxPixels}`)
  }
  // Every line's wavelengths may be computed to choose one: bound the whole, not only a line.
  if (n * shape.lines > options.maxPixels * 4) {
    throw new SpectrumReadError(
      'TOO_MANY_PIXELS',
      `${fileName}: ${shape.lines} lines of ${n} pixels is more than the limit of ${options.maxPixels * 4} pixels in all; pick the spectrum out of the file first`,
    )
  }
  const cache = new Map<FitsHdu, Float64Array>()
  const companions = companionsOf(ctx, hdu)
  const ignored: string[] = []
  const notes: string[] = []
  const warnings: string[] = []
  const medium: MediumEvidence[] = []
  const flagSets: FlagSet[] = []
  let errorSource: string | undefined

  // Wavelengths per line, in the file's unit, and what the lines are.
  const waveRow = surveyWaveRow(ctx, hdu, shape)
  let lines: number[] = Array.from({ length: shape.lines }, (_, i) => i)
  let waves: Float64Array[]
  let solution: string
  let unit: { unit?: string; source: string }
  let lineLabel = (i: number) => `line ${i + 1}`
  let inheritedWcs = false
  if (waveRow !== undefined) {
    const row = linePixels(ctx, hdu, shape, waveRow, 0, cache)
    const fluxRow = waveRow === 0 ? 1 : 0
    lines = [fluxRow]
    waves = [row]
    solution = `row ${waveRow + 1} of the image holds the wavelengths (${describeDispersion(fitDispersion(row))})`
    const k = keywordUnit(ctx, hdu, 1)
    unit = k.unit ? k : { source: 'assumed Å: the image names no unit' }
    if (axisNumber(ctx, hdu, 'COEFF0') !== undefined)
      medium.push({ vacuum: true, source: 'survey image with COEFF0/COEFF1: log10 vacuum wavelengths by the survey convention', strength: 1.5, inferred: true })
    const rows = shape.lines
    const used = new Set([waveRow, fluxRow])
    if (rows === 5 && waveRow === 2) {
      // The survey layout: flux, inverse variance, wavelength, and_mask, or_mask.
      const ivar = linePixels(ctx, hdu, shape, 1, 0, cache)
      const error = new Float64Array(n)
      const zero = new Uint8Array(n)
      for (let i = 0; i < n; i++) {
        const iv = ivar[i]!
        if (iv > 0 && Number.isFinite(iv)) error[i] = 1 / Math.sqrt(iv)
        else {
          error[i] = Infinity
          zero[i] = 1
        }
      }
      flagSets.push({ source: 'inverse variance (row 2)', rule: 'inverse variance 0 means no data', flags: zero })
      errorSource = 'row 2, inverse variance: error = 1/√ivar'
      const and = linePixels(ctx, hdu, shape, 3, 0, cache)
      flagSets.push(qualityFlags('AND_MASK', 'row 4', and, false))
      flagSets[flagSets.length - 1]!.source = 'and_mask (row 4)'
      ignored.push('row 5 (or_mask): the and_mask of row 4 is the one used for science')
      used.add(1).add(3).add(4)
      solution = `survey rows: 1 flux, 2 inverse variance, 3 wavelength (${describeDispersion(fitDispersion(row))}), 4 and_mask, 5 or_mask`
      return finish({ error, rowError: true })
    }
    for (let r = 0; r < rows; r++) if (!used.has(r)) ignored.push(`row ${r + 1} of the image`)
  } else if (companions.wave) {
    const waveHdu = companions.wave[0]!
    waves = lines.map((l) => linePixels(ctx, waveHdu, shape, l, 0, cache))
    solution = `wavelengths from the ${describeHdu(waveHdu)} image (${describeDispersion(fitDispersion(waves[0]!))})`
    const bunit = cardString(waveHdu, 'BUNIT') ?? cardString(waveHdu, 'CUNIT1')
    unit = !isBlankUnit(bunit) ? { unit: bunit!, source: `BUNIT of ${describeHdu(waveHdu)}` } : { source: `assumed Å: ${describeHdu(waveHdu)} names no unit` }
    medium.push(...mediumFromHeaders([waveHdu]))
    if (/_VAC$/i.test(hduName(waveHdu) ?? '')) medium.push({ vacuum: true, source: `EXTNAME = '${hduName(waveHdu)}'`, strength: 3 })
    if (/_AIR$/i.test(hduName(waveHdu) ?? '')) medium.push({ vacuum: false, source: `EXTNAME = '${hduName(waveHdu)}'`, strength: 3 })
    lineLabel = (i) => `order ${i + 1}`
  } else if (isMultispec(hdu) && (cardString(hdu, 'CTYPE1') ?? '').toUpperCase() === 'MULTISPE') {
    const aps = multispecApertures(hdu, n, shape.lines, fileName)
    waves = aps.map((a) => a.wavelength)
    const kinds = [...new Set(aps.map((a) => a.kind))]
    solution = `IRAF multispec WAT2: ${kinds.join('; ')}`
    const w = watUnits(hdu)
    unit = w ? { unit: w, source: 'WAT1_001 units=' } : { source: 'assumed Å: WAT1_001 gives no units' }
    lineLabel = (i) => `aperture ${aps[i]!.ap} (line ${i + 1})`
  } else {
    const disp = keywordDispersion(ctx, hdu, axis)
    inheritedWcs = disp.inherited
    const wave = new Float64Array(n)
    for (let i = 0; i < n; i++) wave[i] = disp.at(i)
    waves = lines.map(() => wave)
    solution = disp.kind + (axis !== 1 ? ` on axis ${axis} of the ${hdu.naxis.join(' × ')} cube` : '')
    medium.push(...disp.medium)
    unit = keywordUnit(ctx, hdu, axis)
    if (disp.inherited) {
      const inherit = inheritance(hdu, primary)
      solution += inherit === 'yes' ? ' (keywords from the primary header, INHERIT = T)' : ' (keywords from the primary header)'
      if (inherit === 'unstated') warnings.push(`${describeHdu(hdu)} has no wavelength keywords of its own; those of the primary header were used (INHERIT is not set)`)
    }
  }
  return finish({})

  function finish(extra: { error?: Float64Array; rowError?: boolean }): RawSpectrum {
    // Which line(s): the observer's aperture, else the first covering the region, else all merged.
    const region = options.classificationRegion
    const factor = options.unitFactor?.factor ?? unitFactor(unit.unit, fileName, unit.source)
    const toAngstrom = (w: Float64Array) => (factor === 1 ? w : w.map((v) => v * factor))
    const regionIn = [region[0] / factor, region[1] / factor] as const
    let chosen: number[]
    let apertureWhy: string | undefined
    const count = lines.length
    if (count > 1 && options.aperture !== undefined) {
      if (options.aperture < 1 || options.aperture > count) {
        throw new SpectrumReadError(
          'APERTURE_NOT_FOUND',
          `${fileName}: there is no aperture ${options.aperture}; ${describeHdu(hdu)} holds ${count} (${lines.map((l) => lineLabel(l)).join(', ')}), counted from 1`,
        )
      }
      chosen = [options.aperture - 1]
      apertureWhy = 'your choice'
    } else if (count > 1) {
      const covers = lines.findIndex((_, i) => spanCoverage(waves[i]!, regionIn) >= options.minCoverage)
      if (covers >= 0) {
        chosen = [covers]
        apertureWhy =
          covers === 0
            ? 'the first one, and it covers the classification region'
            : `the first one that covers the classification region (${lines
                .slice(0, covers)
                .map((l) => lineLabel(l))
                .join(', ')} ${covers === 1 ? 'does' : 'do'} not)`
      } else {
        chosen = lines.map((_, i) => i)
        apertureWhy = `no single one covers the classification region, so all ${count} were merged in wavelength order (in overlaps each keeps the pixels on its side of the midpoint); pick one with the aperture option`
      }
    } else chosen = [0]
    const picked = chosen.map((i) => lines[i]!)
    const fluxParts = picked.map((l) => linePixels(ctx, hdu, shape, l, 0, cache))
    const waveParts = chosen.map((i) => waves[i]!)
    let errorParts: Float64Array[] | undefined
    const flagParts: { set: Omit<FlagSet, 'flags'>; parts: Uint8Array[] }[] = []
    const band = sigmaBand(hdu, shape.bands)
    if (extra.error) errorParts = [extra.error]
    else if (band !== undefined) {
      errorParts = picked.map((l) => linePixels(ctx, hdu, shape, l, band, cache))
      errorSource = `band ${band + 1} of the image (BANDID${band + 1} = '${cardString(hdu, `BANDID${band + 1}`)}')`
    } else {
      const err = companions.error?.[0] ?? companions.ivar?.[0] ?? companions.variance?.[0]
      if (err) {
        const role = companionRole(err)!
        errorParts = picked.map((l) => {
          const v = linePixels(ctx, err, shape, l, 0, cache)
          if (role === 'ivar') return v.map((x) => (x > 0 && Number.isFinite(x) ? 1 / Math.sqrt(x) : Infinity))
          if (role === 'variance') return v.map((x) => (x >= 0 ? Math.sqrt(x) : NaN))
          return v
        })
        errorSource = `${describeHdu(err)}${role === 'ivar' ? ': error = 1/√IVAR' : role === 'variance' ? ': error = √variance' : ''}`
        if (role === 'ivar') {
          const zero = picked.map((l) => linePixels(ctx, err, shape, l, 0, cache).map((x) => (x > 0 && Number.isFinite(x) ? 0 : 1)))
          flagParts.push({ set: { source: `${describeHdu(err)}`, rule: 'inverse variance 0 means no data' }, parts: zero.map((z) => Uint8Array.from(z)) })
        }
      }
    }
    const unusedErrors = [...(companions.error ?? []), ...(companions.ivar ?? []), ...(companions.variance ?? [])].filter((h) => !errorSource?.startsWith(describeHdu(h)))
    for (const h of unusedErrors) ignored.push(`${describeHdu(h)}: another error extension`)
    const quality = preferAndMask((companions.quality ?? []).map((h) => ({ name: hduName(h) ?? '', hdu: h })))
    for (const q of quality.use) {
      const parts = picked.map((l) => qualityFlags(q.name, q.hdu.comments.get('EXTNAME'), linePixels(ctx, q.hdu, shape, l, 0, cache), false))
      flagParts.push({ set: { source: `${describeHdu(q.hdu)}`, rule: parts[0]!.rule }, parts: parts.map((p) => p.flags) })
    }
    for (const q of quality.dropped) ignored.push(`${describeHdu(q.hdu)}: the AND mask is the one used`)
    for (let b = 1; b < shape.bands; b++) if (b !== band) ignored.push(`band ${b + 1} of the image${cardString(hdu, `BANDID${b + 1}`) ? ` (${cardString(hdu, `BANDID${b + 1}`)})` : ''}`)
    if (chosen.length === 1 && count > 1) {
      const others = lines.filter((_, i) => i !== chosen[0]).map((l) => lineLabel(l))
      ignored.push(
        `${others.length === 1 ? others[0] : `${others.length} other apertures (${others.slice(0, 6).join(', ')}${others.length > 6 ? ', …' : ''})`}: ${count} are in the file; pick another with the aperture option`,
      )
    }

    let wavelength: Float64Array
    let flux: Float64Array
    let error: Float64Array | undefined
    let flagSetsOut = flagSets.slice()
    if (chosen.length > 1) {
      const order = mergeSegments(waveParts)
      wavelength = gather(waveParts, order, (k) => new Float64Array(k))
      flux = gather(fluxParts, order, (k) => new Float64Array(k))
      if (errorParts) error = gather(errorParts, order, (k) => new Float64Array(k))
      flagSetsOut = flagSetsOut.concat(flagParts.map((f) => ({ ...f.set, flags: gather(f.parts, order, (k) => new Uint8Array(k)) })))
      if (order.skipped.length) ignored.push(`${order.skipped.map((i) => lineLabel(lines[i]!)).join(', ')}: inside the range of the others`)
      warnings.push(`${count} orders were merged without a blaze correction or flux matching between them: check the continuum, or pick one order with the aperture option`)
    } else {
      wavelength = waveParts[0]!.slice()
      flux = fluxParts[0]!
      if (errorParts) error = errorParts[0]
      flagSetsOut = flagSetsOut.concat(flagParts.map((f) => ({ ...f.set, flags: f.parts[0]! })))
    }
    if (wavelength.length > options.maxPixels) {
      throw new SpectrumReadError('TOO_MANY_PIXELS', `${fileName}: ${wavelength.length} pixels is more than the limit of ${options.maxPixels}`)
    }
    wavelength = toAngstrom(wavelength)
    // BLANK pixels come back as NaN; mark them so the reason shows.
    let blank = 0
    const mask = new Uint8Array(flux.length)
    if (hdu.bitpix > 0 && cardNumber(hdu, 'BLANK') !== undefined)
      for (let i = 0; i < flux.length; i++)
        if (Number.isNaN(flux[i]!)) {
          mask[i] = 1
          blank++
        }
    const masks = blank ? [{ source: 'BLANK pixels', rule: `integer value ${cardNumber(hdu, 'BLANK')} means no data (FITS Standard §5.3)`, pixels: blank }] : []
    medium.push(...mediumFromHeaders([hdu, inheritance(hdu, primary) === 'no' ? undefined : primary]))
    const bunit = cardString(hdu, 'BUNIT') ?? cardString(primary, 'BUNIT')
    const raw: RawSpectrum = {
      wavelength,
      flux,
      medium,
      wavelengthUnit: options.unitFactor?.unit ?? unit.unit ?? 'Angstrom (assumed)',
      unitSource: options.unitFactor ? `your choice (the file says ${unit.unit ?? 'nothing'})` : unit.source,
      unitAssumed: !options.unitFactor && unit.unit === undefined,
      header: keptHeader(hdu, primary),
      notes,
      hdu: hdu.index,
      source: `${describeHdu(hdu)}, ${hdu.compressed ? 'tile-compressed ' : ''}image ${hdu.naxis.join(' × ')}`,
      solution,
      masks,
      ignored,
      warnings,
      flagSets: flagSetsOut,
    }
    if (blank) raw.mask = mask
    if (hduName(hdu)) raw.hduName = hduName(hdu)!
    if (error) raw.error = error
    if (errorSource) raw.errorSource = errorSource
    if (bunit) raw.fluxUnit = bunit
    if (count > 1) raw.aperture = { number: chosen.length > 1 ? 'merged' : chosen[0]! + 1, of: count, why: apertureWhy! }
    if (count > 1 && chosen.length === 1 && lineLabel(lines[chosen[0]!]!) !== `line ${chosen[0]! + 1}`) raw.aperture!.why += ` — ${lineLabel(lines[chosen[0]!]!)}`
    if (inheritedWcs) notes.push('wavelength keywords taken from the primary header')
    if (watString(hdu, 0) && !isMultispec(hdu) && /equispec/i.test(watString(hdu, 0))) notes.push('IRAF equispec image')
    return raw
  }
}
