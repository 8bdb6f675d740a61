/**
 * Spectra stored as FITS images: a 1-D primary or IMAGE extension, or the first row/plane of the
 * 2-D/3-D arrays that long-slit and echelle reducers write ("multispec" layout).
 */
import {
  cardNumber, cardString, keptHeader, readImagePixels, vacuumFromKeywords, type FitsHdu,
} from './fits'
import { SpectrumReadError, type RawSpectrum, type ResolvedReadOptions } from './types'
import { angstromsPerUnit, isBlankUnit } from './units'

/** A 2-D image with more rows than this and no multispec keywords is a frame, not a spectrum. */
const MAX_PLAIN_ROWS = 4
/** Multispec files carry one row per aperture; more than this is not a reduced spectrum file. */
const MAX_APERTURES = 1000

function hasMultispecKeywords(hdu: FitsHdu): boolean {
  return hdu.cards.has('APNUM1') || hdu.cards.has('BANDID1') || hdu.cards.has('WAT0_001')
}

/**
 * Why an image HDU cannot hold a 1-D spectrum, or undefined when it can.
 * 1-D arrays qualify; so do 2-D/3-D arrays whose extra axes are short or described by
 * multispec keywords (APNUM, BANDID, WAT0_001).
 */
export function imageSpectrumProblem(hdu: FitsHdu): string | undefined {
  if (hdu.kind !== 'image') return 'it is not an image'
  const [n1, ...rest] = hdu.naxis
  if (n1 === undefined || n1 === 0) return 'it holds no data'
  if (rest.length > 2) return `it has ${hdu.naxis.length} axes`
  const rows = rest.reduce((a, b) => a * b, 1)
  if (rows > MAX_PLAIN_ROWS && !(hasMultispecKeywords(hdu) && rows <= MAX_APERTURES)) {
    return `it is a ${hdu.naxis.join(' × ')} image with ${rows} rows and no multispec keywords, not a 1-D spectrum`
  }
  return undefined
}

/** Reads `units=…` from IRAF's WAT1_001 card. */
function watUnits(hdu: FitsHdu): string | undefined {
  const wat = cardString(hdu, 'WAT1_001')
  return wat ? /units=(\S+)/i.exec(wat)?.[1] : undefined
}

/** Plane of a 3-D multispec array named as the 1σ error by its BANDIDn card, 0-based. */
function sigmaPlane(hdu: FitsHdu): number | undefined {
  const planes = hdu.naxis[2] ?? 1
  for (let k = 2; k <= planes; k++) {
    const band = cardString(hdu, `BANDID${k}`)
    if (band && /^\s*(sigma|error)\b/i.test(band)) return k - 1
  }
  return undefined
}

interface Dispersion {
  /** Wavelength of 0-based pixel i in the file's unit. */
  at: (i: number) => number
  kind: string
}

function dispersion(hdu: FitsHdu, fileName: string): Dispersion {
  const coeff0 = cardNumber(hdu, 'COEFF0')
  const coeff1 = cardNumber(hdu, 'COEFF1')
  if (coeff0 !== undefined && coeff1 !== undefined) {
    // Survey convention: log10 λ = COEFF0 + COEFF1 · i, i counted from 0.
    if (coeff1 === 0) throw new SpectrumReadError('NO_WAVELENGTH_SCALE', `${fileName}: COEFF1 is zero, so every pixel has the same wavelength`)
    return { at: (i) => 10 ** (coeff0 + coeff1 * i), kind: 'log10 COEFF0/COEFF1' }
  }
  const ctype = (cardString(hdu, 'CTYPE1') ?? '').toUpperCase()
  const crval = cardNumber(hdu, 'CRVAL1')
  const step = cardNumber(hdu, 'CD1_1') ?? (cardNumber(hdu, 'CDELT1') ?? 1) * (cardNumber(hdu, 'PC1_1') ?? 1)
  // FITS WCS Paper I (Greisen & Calabretta 2002) defaults CRPIX to 0; pixels count from 1.
  const crpix = cardNumber(hdu, 'CRPIX1') ?? 0
  if (ctype === 'MULTISPE') {
    throw new SpectrumReadError('NO_WAVELENGTH_SCALE', `${fileName}: the dispersion is given only as multispec WAT2 attributes, which are not read; save the spectrum with a linear or log-linear WCS`)
  }
  if (crval === undefined || !(cardNumber(hdu, 'CD1_1') !== undefined || cardNumber(hdu, 'CDELT1') !== undefined)) {
    throw new SpectrumReadError('NO_WAVELENGTH_SCALE', `${fileName}: HDU ${hdu.index} has no wavelength scale (CRVAL1 with CDELT1 or CD1_1, or COEFF0/COEFF1)`)
  }
  if (step === 0) throw new SpectrumReadError('NO_WAVELENGTH_SCALE', `${fileName}: the wavelength step (CDELT1/CD1_1) is zero`)
  const base = ctype.slice(0, 4)
  const algorithm = ctype.length > 4 ? ctype.slice(4).replace(/^-+/, '') : ''
  if ((base === 'WAVE' || base === 'AWAV') && algorithm === 'LOG') {
    // Paper III (Greisen et al. 2006) eq. 5: λ = λr exp(w / λr), w = CDELT (p − CRPIX).
    return { at: (i) => crval * Math.exp((step * (i + 1 - crpix)) / crval), kind: `${ctype} (Paper III logarithmic)` }
  }
  const linearTypes = ['', 'WAVE', 'AWAV', 'LINEAR', 'LAMBDA', 'WAVELENGTH', 'WAVELEN']
  if (!linearTypes.includes(ctype) && !((base === 'WAVE' || base === 'AWAV') && algorithm === '')) {
    const spectralButNot = ['FREQ', 'ENER', 'WAVN', 'VRAD', 'VOPT', 'ZOPT', 'VELO', 'BETA', 'VELOCITY', 'PIXEL']
    if (spectralButNot.includes(base) || spectralButNot.includes(ctype) || algorithm !== '') {
      throw new SpectrumReadError('NO_WAVELENGTH_SCALE', `${fileName}: CTYPE1 = '${ctype}' is not a wavelength axis these readers understand (WAVE, AWAV, WAVE-LOG, LINEAR)`)
    }
    throw new SpectrumReadError('NOT_A_SPECTRUM', `${fileName}: axis 1 is '${ctype}', not a spectral axis`)
  }
  if (cardNumber(hdu, 'DC-FLAG') === 1) {
    // IRAF onedspec convention: DC-FLAG = 1 means log10 λ is linear in the pixel.
    return { at: (i) => 10 ** (crval + step * (i + 1 - crpix)), kind: 'DC-FLAG = 1 (log10-linear)' }
  }
  return { at: (i) => crval + step * (i + 1 - crpix), kind: 'linear' }
}

/**
 * Reads a spectrum from an image HDU: flux from the first row/plane, wavelengths from the
 * spectral WCS of axis 1 (FITS WCS Paper III, Greisen et al. 2006: CTYPE1 WAVE, AWAV, WAVE-LOG;
 * IRAF's LINEAR with DC-FLAG; the survey log10 COEFF0/COEFF1), converted to Å from CUNIT1
 * (or IRAF's WAT1_001 units=…; Å when neither is given, as is the convention).
 * Air or vacuum: CTYPE1 WAVE/WAVE-LOG is vacuum and AWAV air (Paper III); else VACUUM/AIRORVAC.
 * @throws SpectrumReadError NOT_A_SPECTRUM, NO_WAVELENGTH_SCALE, UNKNOWN_UNIT, TOO_MANY_PIXELS
 */
export function readImageHdu(
  bytes: Uint8Array, hdu: FitsHdu, primary: FitsHdu | undefined, fileName: string, options: ResolvedReadOptions,
): RawSpectrum {
  const problem = imageSpectrumProblem(hdu)
  if (problem) throw new SpectrumReadError('NOT_A_SPECTRUM', `${fileName}: HDU ${hdu.index} is not a spectrum: ${problem}`)
  const n = hdu.naxis[0]!
  if (n > options.maxPixels) {
    throw new SpectrumReadError('TOO_MANY_PIXELS', `${fileName}: ${n} pixels is more than the limit of ${options.maxPixels}`)
  }
  const disp = dispersion(hdu, fileName)
  const unitCard = cardString(hdu, 'CUNIT1')
  const unit = !isBlankUnit(unitCard) ? unitCard! : watUnits(hdu)
  let factor = 1
  if (unit !== undefined) {
    const f = angstromsPerUnit(unit)
    if (f === undefined) throw new SpectrumReadError('UNKNOWN_UNIT', `${fileName}: wavelength unit '${unit}' is not one of Angstrom, nm, um, m`)
    factor = f
  }
  const wavelength = new Float64Array(n)
  for (let i = 0; i < n; i++) wavelength[i] = disp.at(i) * factor
  const flux = readImagePixels(bytes, hdu, 0, n)
  const notes: string[] = []
  const rows = hdu.naxis.slice(1).reduce((a, b) => a * b, 1)
  if (rows > 1) notes.push(`read the first row of a ${hdu.naxis.join(' × ')} array`)
  const raw: RawSpectrum = {
    wavelength, flux, vacuum: undefined, vacuumSource: '', wavelengthUnit: unit ?? 'Angstrom (assumed)',
    unitAssumed: unit === undefined, header: keptHeader(hdu, primary), notes, hdu: hdu.index,
  }
  const plane = sigmaPlane(hdu)
  if (plane !== undefined) {
    raw.error = readImagePixels(bytes, hdu, plane * n * (hdu.naxis[1] ?? 1), n)
    notes.push(`error from plane ${plane + 1} (${cardString(hdu, `BANDID${plane + 1}`)})`)
  }
  const bunit = cardString(hdu, 'BUNIT') ?? cardString(primary ?? hdu, 'BUNIT')
  if (bunit) raw.fluxUnit = bunit
  const ctype = (cardString(hdu, 'CTYPE1') ?? '').toUpperCase()
  if (ctype === 'WAVE' || ctype.startsWith('WAVE-')) {
    raw.vacuum = true
    raw.vacuumSource = `CTYPE1 = '${ctype}' (vacuum, FITS WCS Paper III)`
  } else if (ctype === 'AWAV' || ctype.startsWith('AWAV-')) {
    raw.vacuum = false
    raw.vacuumSource = `CTYPE1 = '${ctype}' (air, FITS WCS Paper III)`
  } else {
    const kw = vacuumFromKeywords(hdu, primary)
    if (kw) {
      raw.vacuum = kw.vacuum
      raw.vacuumSource = kw.source
    }
  }
  notes.push(`wavelengths from ${disp.kind}`)
  return raw
}
