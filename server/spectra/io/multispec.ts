/**
 * IRAF "multispec" world coordinates: the dispersion of each aperture (image line) written in the
 * WAT2_nnn cards as specN = "ap beam dtype w1 dw nw z aplow aphigh [functions]".
 * Conventions from IRAF's onedspec help page 'specwcs' (from memory): dtype −1 none, 0 linear,
 * 1 log-linear (log10), 2 non-linear: λ = Σ wtᵢ (w0ᵢ + Wᵢ(p)) / (1 + z) with Wᵢ a Chebyshev
 * (ftype 1) or Legendre (2) series, or a cubic (3) or linear (4) spline, of the physical pixel p.
 */
import { cardNumber, cardString, type FitsHdu } from './fits'
import { SpectrumReadError } from './types'

/** IRAF writes WAT strings in cards of 68 characters; a reader must not trim them before joining. */
const WAT_CARD = 68

/** The WATn_001… cards of an axis joined back into one string. */
export function watString(hdu: FitsHdu, axis: number): string {
  let out = ''
  for (let k = 1; k <= 999; k++) {
    const v = hdu.cards.get(`WAT${axis}_${String(k).padStart(3, '0')}`)
    if (typeof v !== 'string') break
    out += v.padEnd(WAT_CARD, ' ')
  }
  return out
}

/** `units=…` of axis 1 (WAT1_001), IRAF's way to give the wavelength unit. */
export function watUnits(hdu: FitsHdu): string | undefined {
  return /\bunits=(\S+)/i.exec(watString(hdu, 1))?.[1]
}

/** True when the image uses multispec coordinates. */
export function isMultispec(hdu: FitsHdu): boolean {
  return (cardString(hdu, 'CTYPE1') ?? '').toUpperCase() === 'MULTISPE' || /system\s*=\s*multispec/i.test(watString(hdu, 0))
}

export interface MultispecAperture {
  /** 1-based image line. */
  line: number
  ap: number
  beam: number
  dtype: number
  /** Wavelength of each logical pixel 0 … n−1, in the WAT1 unit. */
  wavelength: Float64Array
  kind: string
}

function legendreOrChebyshev(kind: 1 | 2, order: number, pmin: number, pmax: number, c: number[]): (p: number) => number {
  return (p) => {
    const x = (2 * p - (pmax + pmin)) / (pmax - pmin)
    let prev = 1
    let cur = x
    let sum = c[0]! + (order > 1 ? c[1]! * x : 0)
    for (let i = 3; i <= order; i++) {
      const next = kind === 1 ? 2 * x * cur - prev : ((2 * i - 3) * x * cur - (i - 2) * prev) / (i - 1)
      sum += c[i - 1]! * next
      prev = cur
      cur = next
    }
    return sum
  }
}

function spline(kind: 3 | 4, npieces: number, pmin: number, pmax: number, c: number[]): (p: number) => number {
  return (p) => {
    const s = ((p - pmin) / (pmax - pmin)) * npieces
    const j = Math.min(Math.max(Math.floor(s), 0), npieces - 1)
    const a = j + 1 - s
    const b = s - j
    if (kind === 4) return a * c[j]! + b * c[j + 1]!
    const ab = a * b
    return a ** 3 * c[j]! + (1 + 3 * a * (1 + ab)) * c[j + 1]! + (1 + 3 * b * (1 + ab)) * c[j + 2]! + b ** 3 * c[j + 3]!
  }
}

const FTYPE_NAMES: Record<number, string> = { 1: 'Chebyshev', 2: 'Legendre', 3: 'cubic spline', 4: 'linear spline' }

/**
 * Reads the dispersion of every aperture of a multispec image.
 * @param n pixels per line; LTV1/LTM1_1 turn logical into physical pixels (IRAF's image sections)
 * @throws SpectrumReadError NO_WAVELENGTH_SCALE or FITS_UNSUPPORTED with what to do
 */
export function multispecApertures(hdu: FitsHdu, n: number, lines: number, fileName: string): MultispecAperture[] {
  const wat = watString(hdu, 2)
  const specs = new Map<number, string>()
  for (const m of wat.matchAll(/spec(\d+)\s*=\s*"([^"]*)"/g)) specs.set(Number(m[1]), m[2]!)
  const ltv = cardNumber(hdu, 'LTV1') ?? 0
  const ltm = cardNumber(hdu, 'LTM1_1') ?? 1
  const out: MultispecAperture[] = []
  for (let line = 1; line <= lines; line++) {
    const spec = specs.get(line)
    if (spec === undefined) {
      throw new SpectrumReadError(
        'NO_WAVELENGTH_SCALE',
        `${fileName}: multispec line ${line} has no spec${line} entry in WAT2; the file may be cut short — write it again with IRAF's scopy or save it with a linear WCS`,
      )
    }
    const f = spec.trim().split(/\s+/).map(Number)
    if (f.length < 9 || f.slice(0, 9).some((v) => !Number.isFinite(v))) {
      throw new SpectrumReadError('NO_WAVELENGTH_SCALE', `${fileName}: spec${line} in WAT2 is not "ap beam dtype w1 dw nw z aplow aphigh"`)
    }
    const [ap, beam, dtype, w1, dw, , z] = f as [number, number, number, number, number, number, number]
    const doppler = 1 + z
    let at: (p: number) => number
    let kind: string
    if (dtype === 0) {
      at = (p) => (w1 + dw * (p - 1)) / doppler
      kind = 'multispec linear (dtype 0)'
    } else if (dtype === 1) {
      at = (p) => 10 ** (w1 + dw * (p - 1)) / doppler
      kind = 'multispec log-linear (dtype 1)'
    } else if (dtype === 2) {
      const terms: { wt: number; w0: number; fn: (p: number) => number }[] = []
      let i = 9
      const names: string[] = []
      while (i < f.length) {
        const wt = f[i]!
        const w0 = f[i + 1]!
        const ftype = f[i + 2]!
        const order = f[i + 3]!
        const pmin = f[i + 4]!
        const pmax = f[i + 5]!
        if (![1, 2, 3, 4].includes(ftype)) {
          throw new SpectrumReadError(
            'FITS_UNSUPPORTED',
            `${fileName}: spec${line} uses dispersion function type ${ftype} (${ftype === 5 ? 'pixel coordinate array' : ftype === 6 ? 'sampled array' : 'unknown'}), which is not read; resample it with IRAF's dispcor (linear=yes) or save a linear WCS`,
          )
        }
        const count = ftype <= 2 ? order : ftype === 3 ? order + 3 : order + 1
        const c = f.slice(i + 6, i + 6 + count)
        if (c.length !== count || !(pmax > pmin) || !(order >= 1) || [wt, w0, ...c].some((v) => !Number.isFinite(v))) {
          throw new SpectrumReadError('NO_WAVELENGTH_SCALE', `${fileName}: spec${line}'s ${FTYPE_NAMES[ftype]} dispersion in WAT2 is incomplete`)
        }
        const fn = ftype <= 2 ? legendreOrChebyshev(ftype as 1 | 2, order, pmin, pmax, c) : spline(ftype as 3 | 4, order, pmin, pmax, c)
        terms.push({ wt, w0, fn })
        names.push(`${FTYPE_NAMES[ftype]} ${ftype <= 2 ? `order ${order}` : `${order} pieces`}`)
        i += 6 + count
      }
      if (terms.length === 0) throw new SpectrumReadError('NO_WAVELENGTH_SCALE', `${fileName}: spec${line} is non-linear (dtype 2) but gives no function`)
      at = (p) => terms.reduce((sum, t) => sum + t.wt * (t.w0 + t.fn(p)), 0) / doppler
      kind = `multispec non-linear (${names.join(' + ')})`
    } else {
      throw new SpectrumReadError('NO_WAVELENGTH_SCALE', `${fileName}: aperture ${ap} (spec${line}) is not dispersion-corrected (dtype ${dtype}); run IRAF's dispcor on it first`)
    }
    const wavelength = new Float64Array(n)
    for (let l = 0; l < n; l++) wavelength[l] = at((l + 1 - ltv) / ltm)
    out.push({ line, ap, beam, dtype, wavelength, kind })
  }
  return out
}
