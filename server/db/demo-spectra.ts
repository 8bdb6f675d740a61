// Invented demo spectra: demo stars (demo-stars.ts) observed through a made-up spectrograph.
import { DEFAULT_GRID, SPEED_OF_LIGHT_KMS, gridIndex, gridWavelengths } from '../../shared/grid'
import { seededRandom } from '../../shared/random'
import { smoothSpectrumToFwhm } from '../spectra/prepare/smooth'
import { demoStar } from './demo-stars'

export { seededRandom }

export interface DemoTarget {
  objectName: string
  /** The MK type the invented star has, e.g. "B8 III" (its flux: demoStar). */
  mkType: string
  snr: number
  rv: number
  format: 'fits' | 'text'
  ra: string
  dec: string
  vMag: number
  parallaxMas?: number
}

function gaussian(rand: () => number): number {
  const u = Math.max(rand(), 1e-12)
  return Math.sqrt(-2 * Math.log(u)) * Math.cos(2 * Math.PI * rand())
}

const RESOLUTION_FWHM = 3.2
const START = 3820
const STEP = 1.1
const PIXELS = 1200

/** A demo observation: the demo star's flux at the demo resolution, shifted, resampled linearly and with noise. */
export function demoObservation(target: DemoTarget, seed: number): { wavelength: Float64Array; flux: Float64Array; error: Float64Array } {
  const star = demoStar(target.mkType)
  const grid = DEFAULT_GRID
  const smooth = smoothSpectrumToFwhm({ wavelength: gridWavelengths(grid), flux: star.flux }, { grid, targetFwhm: RESOLUTION_FWHM, inputFwhm: star.fwhm })
  const rand = seededRandom(seed)
  const doppler = 1 + target.rv / SPEED_OF_LIGHT_KMS
  const wavelength = new Float64Array(PIXELS)
  const flux = new Float64Array(PIXELS)
  const error = new Float64Array(PIXELS)
  // The entry's S/N is the mean over 4000–5000 Å, where the classification is made (cool stars are faint in the blue).
  let level = 0
  let counted = 0
  for (let i = 0; i < PIXELS; i++) {
    const lam = START + i * STEP
    const x = gridIndex(grid, lam / doppler)
    const j = Math.min(grid.length - 2, Math.max(0, Math.floor(x)))
    const t = x - j
    const f = smooth.flux[j]! * (1 - t) + smooth.flux[j + 1]! * t
    wavelength[i] = lam
    flux[i] = f
    if (lam >= 4000 && lam <= 5000) {
      level += f
      counted++
    }
  }
  level /= counted
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
/** Wavelengths the demo spectrograph records, Å. */
export const DEMO_RANGE: readonly [number, number] = [START, START + (PIXELS - 1) * STEP]

/** What the demo does with a spectrum after it is suggested. */
export type DemoFate = 'suggested' | 'one-call' | 'agreed' | 'disputed' | 'settled' | 'quick-look'

export interface DemoEntry extends DemoTarget {
  fate: DemoFate
  /** Days before the seed that the spectrum was taken and reviewed, for the audit's weekly trend. */
  daysAgo: number
}

// Invented objects of the Kestrel Ridge field catalogue ("KRF nnnn"), each a demo star of its MK type.
export const DEMO_ENTRIES: DemoEntry[] = [
  { objectName: 'KRF 0107', mkType: 'B2 V', snr: 90, rv: 12, format: 'fits', ra: '05:31:10.4', dec: '+21:02:44', vMag: 8.1, parallaxMas: 1.9, fate: 'agreed', daysAgo: 40 },
  { objectName: 'KRF 0118', mkType: 'A0 V', snr: 120, rv: -18, format: 'fits', ra: '05:33:51.0', dec: '+20:47:12', vMag: 7.4, parallaxMas: 6.2, fate: 'agreed', daysAgo: 38 },
  { objectName: 'KRF 0126', mkType: 'F5 V', snr: 80, rv: 31, format: 'text', ra: '05:35:02.7', dec: '+22:10:05', vMag: 9.2, parallaxMas: 8.8, fate: 'agreed', daysAgo: 36 },
  { objectName: 'KRF 0131', mkType: 'G8 III', snr: 70, rv: -44, format: 'fits', ra: '05:36:40.2', dec: '+21:58:31', vMag: 8.7, parallaxMas: 2.4, fate: 'agreed', daysAgo: 33 },
  { objectName: 'KRF 0144', mkType: 'K2 III', snr: 65, rv: 8, format: 'fits', ra: '05:38:12.9', dec: '+20:15:50', vMag: 9.8, fate: 'agreed', daysAgo: 31 },
  { objectName: 'KRF 0152', mkType: 'M2 III', snr: 60, rv: -27, format: 'text', ra: '05:40:05.5', dec: '+21:41:19', vMag: 10.4, fate: 'agreed', daysAgo: 26 },
  { objectName: 'KRF 0163', mkType: 'B8 III', snr: 85, rv: 22, format: 'fits', ra: '05:41:33.3', dec: '+22:29:02', vMag: 8.9, fate: 'agreed', daysAgo: 24 },
  { objectName: 'KRF 0170', mkType: 'A5 IV', snr: 75, rv: -9, format: 'fits', ra: '05:43:18.6', dec: '+20:33:47', vMag: 9.6, parallaxMas: 3.1, fate: 'agreed', daysAgo: 19 },
  { objectName: 'KRF 0188', mkType: 'G2 V', snr: 90, rv: 15, format: 'text', ra: '05:45:41.0', dec: '+21:12:36', vMag: 8.3, parallaxMas: 14.5, fate: 'agreed', daysAgo: 17 },
  { objectName: 'KRF 0195', mkType: 'K5 V', snr: 55, rv: 41, format: 'fits', ra: '05:47:09.8', dec: '+22:05:58', vMag: 10.9, parallaxMas: 21.0, fate: 'agreed', daysAgo: 12 },
  { objectName: 'KRF 0203', mkType: 'B2 IV', snr: 70, rv: -35, format: 'fits', ra: '05:48:27.1', dec: '+20:58:14', vMag: 9.1, fate: 'disputed', daysAgo: 10 },
  { objectName: 'KRF 0211', mkType: 'F0 II', snr: 60, rv: 5, format: 'fits', ra: '05:50:03.4', dec: '+21:26:40', vMag: 8.8, fate: 'disputed', daysAgo: 8 },
  { objectName: 'KRF 0219', mkType: 'M4 III', snr: 50, rv: -12, format: 'text', ra: '05:51:46.9', dec: '+22:44:21', vMag: 11.2, fate: 'settled', daysAgo: 15 },
  { objectName: 'KRF 0224', mkType: 'G8 Ib', snr: 80, rv: 19, format: 'fits', ra: '05:53:20.2', dec: '+20:19:09', vMag: 7.9, fate: 'settled', daysAgo: 13 },
  { objectName: 'KRF 0236', mkType: 'K0 III', snr: 75, rv: -51, format: 'fits', ra: '05:54:58.7', dec: '+21:37:55', vMag: 9.4, fate: 'one-call', daysAgo: 5 },
  { objectName: 'KRF 0241', mkType: 'A2 V', snr: 95, rv: 27, format: 'text', ra: '05:56:31.5', dec: '+22:18:30', vMag: 8.6, fate: 'one-call', daysAgo: 4 },
  { objectName: 'KRF 0253', mkType: 'G5 III', snr: 60, rv: 3, format: 'fits', ra: '05:58:07.3', dec: '+20:51:03', vMag: 10.1, fate: 'suggested', daysAgo: 3 },
  { objectName: 'KRF 0260', mkType: 'B1 V', snr: 80, rv: -22, format: 'fits', ra: '05:59:44.0', dec: '+21:05:48', vMag: 8.2, fate: 'suggested', daysAgo: 2 },
  { objectName: 'KRF 0268', mkType: 'F8 V', snr: 70, rv: 36, format: 'text', ra: '06:01:15.6', dec: '+22:33:12', vMag: 9.7, parallaxMas: 11.2, fate: 'suggested', daysAgo: 2 },
  { objectName: 'KRF 0275', mkType: 'M0 V', snr: 45, rv: -7, format: 'fits', ra: '06:02:52.8', dec: '+20:40:27', vMag: 11.8, parallaxMas: 38.0, fate: 'suggested', daysAgo: 1 },
  { objectName: 'KRF 0282', mkType: 'A7 III', snr: 85, rv: 14, format: 'fits', ra: '06:04:29.9', dec: '+21:49:44', vMag: 8.5, fate: 'suggested', daysAgo: 1 },
  { objectName: 'KRF 0290', mkType: 'K3 II', snr: 65, rv: -30, format: 'fits', ra: '06:06:03.1', dec: '+22:02:16', vMag: 9.9, fate: 'suggested', daysAgo: 0 },
  { objectName: 'KRF 0312', mkType: 'B3 V', snr: 90, rv: 10, format: 'fits', ra: '06:08:40.4', dec: '+20:27:35', vMag: 8.0, fate: 'quick-look', daysAgo: 20 },
  { objectName: 'KRF 0318', mkType: 'G0 V', snr: 80, rv: -16, format: 'text', ra: '06:10:11.7', dec: '+21:15:52', vMag: 8.9, parallaxMas: 12.7, fate: 'quick-look', daysAgo: 9 },
  { objectName: 'KRF 0325', mkType: 'K1 III', snr: 70, rv: 24, format: 'fits', ra: '06:11:48.2', dec: '+22:24:09', vMag: 9.3, fate: 'quick-look', daysAgo: 6 },
]
