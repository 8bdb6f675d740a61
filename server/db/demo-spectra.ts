// Invented demo spectra: model standards from templates/ observed through a made-up spectrograph.
import { fileURLToPath } from 'node:url'
import { DEFAULT_GRID, SPEED_OF_LIGHT_KMS, gridWavelength } from '../../shared/grid'
import { loadModelLibrary, type ModelLibrary } from '../../templates/generator/library'
import { smoothSpectrumToFwhm } from '../spectra/prepare/smooth'

export interface DemoTarget {
  objectName: string
  /** A model standard id in templates/model-v1, e.g. "B8-III". */
  standard: string
  snr: number
  rv: number
  format: 'fits' | 'text'
  ra: string
  dec: string
  vMag: number
  parallaxMas?: number
}

/** Small deterministic PRNG (mulberry32) so the demo is the same on every machine. */
export function seededRandom(seed: number): () => number {
  let a = seed >>> 0
  return () => {
    a = (a + 0x6d2b79f5) >>> 0
    let t = a
    t = Math.imul(t ^ (t >>> 15), t | 1)
    t ^= t + Math.imul(t ^ (t >>> 7), t | 61)
    return ((t ^ (t >>> 14)) >>> 0) / 4294967296
  }
}

function gaussian(rand: () => number): number {
  const u = Math.max(rand(), 1e-12)
  return Math.sqrt(-2 * Math.log(u)) * Math.cos(2 * Math.PI * rand())
}

let library: ModelLibrary | null = null
const modelLibrary = () => (library ??= loadModelLibrary(fileURLToPath(new URL('../../templates/model-v1', import.meta.url)), { verify: false }))

const RESOLUTION_FWHM = 3.2
const START = 3820
const STEP = 1.1
const PIXELS = 1200

/** A demo observation: the standard's flux at the demo resolution, shifted, resampled linearly and with noise. */
export function demoObservation(target: DemoTarget, seed: number): { wavelength: Float64Array; flux: Float64Array; error: Float64Array } {
  const lib = modelLibrary()
  const std = lib.standards.find((s) => s.entry.id === target.standard)
  if (!std) throw new Error(`no model standard ${target.standard}`)
  const grid = DEFAULT_GRID
  const shape = new Float64Array(grid.length)
  for (let i = 0; i < grid.length; i++) shape[i] = std.rectified[i]! * (std.continuum[i]! / std.continuum[grid.length >> 1]!)
  const wl = new Float64Array(grid.length)
  for (let i = 0; i < grid.length; i++) wl[i] = gridWavelength(grid, i)
  const smooth = smoothSpectrumToFwhm({ wavelength: wl, flux: shape }, { grid, targetFwhm: RESOLUTION_FWHM, inputFwhm: lib.manifest.resolutionFwhm })
  const rand = seededRandom(seed)
  const doppler = 1 + target.rv / SPEED_OF_LIGHT_KMS
  const wavelength = new Float64Array(PIXELS)
  const flux = new Float64Array(PIXELS)
  const error = new Float64Array(PIXELS)
  let level = 0
  for (let i = 0; i < PIXELS; i++) {
    const lam = START + i * STEP
    const x = Math.log(lam / doppler / grid.start) / grid.step
    const j = Math.min(grid.length - 2, Math.max(0, Math.floor(x)))
    const t = x - j
    const f = smooth.flux[j]! * (1 - t) + smooth.flux[j + 1]! * t
    wavelength[i] = lam
    flux[i] = f
    level += f / PIXELS
  }
  // A gentle instrumental response, so the continuum fit has work to do.
  for (let i = 0; i < PIXELS; i++) {
    const x = (wavelength[i]! - 4500) / 700
    const response = 1 + 0.15 * x - 0.1 * x * x
    const sigma = level / target.snr
    error[i] = sigma * response
    flux[i] = (flux[i]! + sigma * gaussian(rand)) * response * 1e-13
    error[i] = error[i]! * 1e-13
  }
  return { wavelength, flux, error }
}

const card = (key: string, value: string | number | boolean, comment = '') => {
  const v = typeof value === 'string' ? `'${value.replace(/'/g, "''").padEnd(8)}'`.padEnd(20) : typeof value === 'boolean' ? (value ? 'T' : 'F').padStart(20) : String(value).padStart(20)
  return `${key.padEnd(8)}= ${v}${comment ? ` / ${comment}` : ''}`.slice(0, 80).padEnd(80)
}

/** A FITS primary-HDU 1-D image with a linear air-wavelength WCS (FITS Standard 4.0; WCS Paper III). */
export function demoFits(target: DemoTarget, obs: { wavelength: Float64Array; flux: Float64Array }, dateObs: string): Buffer {
  const n = obs.flux.length
  const cards = [
    card('SIMPLE', true, 'conforms to FITS standard'),
    card('BITPIX', -32, 'IEEE single precision'),
    card('NAXIS', 1),
    card('NAXIS1', n),
    card('CTYPE1', 'AWAV', 'air wavelength'),
    card('CUNIT1', 'Angstrom'),
    card('CRPIX1', 1),
    card('CRVAL1', obs.wavelength[0]!),
    card('CDELT1', STEP),
    card('BUNIT', 'erg/s/cm2/Angstrom'),
    card('OBJECT', target.objectName),
    card('RA', target.ra),
    card('DEC', target.dec),
    card('DATE-OBS', dateObs),
    card('EXPTIME', 900, 's'),
    card('INSTRUME', 'KRO-LRS', 'Kestrel Ridge low-resolution spectrograph'),
    card('TELESCOP', 'KRO 1.1m'),
    card('SPEC_RES', RESOLUTION_FWHM, 'resolution FWHM, Angstrom'),
    'END'.padEnd(80),
  ]
  const header = Buffer.from(cards.join('').padEnd(Math.ceil((cards.length * 80) / 2880) * 2880, ' '), 'ascii')
  const data = Buffer.alloc(Math.ceil((n * 4) / 2880) * 2880)
  for (let i = 0; i < n; i++) data.writeFloatBE(obs.flux[i]!, i * 4)
  return Buffer.concat([header, data])
}

/** The same observation as a three-column text table. */
export function demoText(target: DemoTarget, obs: { wavelength: Float64Array; flux: Float64Array; error: Float64Array }, dateObs: string): Buffer {
  const rows = [`# OBJECT = ${target.objectName}`, `# DATE-OBS = ${dateObs}`, '# wavelength(Angstrom, air) flux(erg/s/cm2/Angstrom) error']
  for (let i = 0; i < obs.flux.length; i++) rows.push(`${obs.wavelength[i]!.toFixed(3)} ${obs.flux[i]!.toExponential(6)} ${obs.error[i]!.toExponential(4)}`)
  return Buffer.from(rows.join('\n') + '\n')
}

export const DEMO_RESOLUTION_FWHM = RESOLUTION_FWHM
