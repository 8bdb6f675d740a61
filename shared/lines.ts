/**
 * The classification lines and bands of the MK system: one table, used by the measurement code on
 * the server and by the line markers in the client. Plain data and a few tiny helpers only.
 *
 * Wavelengths are in air, Å. Rest wavelengths of atomic lines are NIST Atomic Spectra Database
 * values as listed in the project's reference sheet (written down from memory to about 0.05 Å; the
 * Balmer values are checked in the tests against the Rydberg formula). Band heads are approximate
 * (common practice). Windows and side bands say where each one comes from.
 */

/** A closed wavelength interval [lo, hi], Å (air). */
export type WavelengthRange = readonly [number, number]

export type LineFamily = 'balmer' | 'helium' | 'metal' | 'band'

/** What a feature mainly tells a classifier. */
export type LineIndicator = 'temperature' | 'luminosity' | 'peculiarity'

export interface ClassificationLine {
  /** Stable identifier, used by ratios, stored measurements and the client. */
  id: string
  /** Name as classifiers write it, e.g. "Hβ", "Ca II K", "TiO 4954". */
  name: string
  /** Rest wavelength (air, Å): line centre, or band head for molecular bands. */
  wavelength: number
  /** Where {@link wavelength} comes from. */
  wavelengthSource: string
  family: LineFamily
  /** Range over which equivalent width, depth, FWHM and centroid are measured, Å. */
  window: WavelengthRange
  /** Blue side band: continuum level on the blue side, Å. */
  blue: WavelengthRange
  /** Red side band: continuum level on the red side, Å. */
  red: WavelengthRange
  /** Where the window and side bands come from. */
  windowSource: string
  /** What the feature indicates, most important first. */
  indicates: readonly LineIndicator[]
  /** Ids of features that fall in the same window at classification resolution. */
  blendedWith?: readonly string[]
  /**
   * Balmer lines only: wider range over which a Voigt profile is fitted to the continuum-normalised
   * flux, so that the pressure-broadened wings are included, Å.
   */
  profileWindow?: WavelengthRange
  /** Range the global continuum fit must ignore (Balmer wings, strong bands), Å. */
  continuumMask?: WavelengthRange
}

const NIST = 'NIST ASD (air), from memory to ~0.05 Å'
const NIST_BLEND = 'NIST ASD (air), blend centre, from memory'
const BAND_HEAD = 'approximate band head, common practice'
const LICK = 'Lick index bands (Worthey et al. 1994), from memory'
const LICK_A = 'Lick HγA/HδA bands (Worthey & Ottaviani 1997), from memory'
const CHOSEN = 'chosen here for R ≈ 1000–3000 classification spectra'

/** Every classification line and band, ordered by wavelength within each family. */
// prettier-ignore
export const CLASSIFICATION_LINES: readonly ClassificationLine[] = [
  // Balmer series. Wide profile windows hold the wings of A-type dwarfs (tens of Å).
  {
    id: 'h-alpha', name: 'Hα', wavelength: 6562.8, wavelengthSource: NIST, family: 'balmer',
    window: [6542.8, 6582.8], blue: [6490, 6510], red: [6615, 6635], windowSource: CHOSEN,
    indicates: ['temperature', 'peculiarity'], profileWindow: [6512.8, 6612.8], continuumMask: [6510, 6615],
  },
  {
    id: 'h-beta', name: 'Hβ', wavelength: 4861.33, wavelengthSource: NIST, family: 'balmer',
    window: [4847.875, 4876.625], blue: [4827.875, 4847.875], red: [4876.625, 4891.625], windowSource: LICK,
    indicates: ['temperature', 'luminosity'], profileWindow: [4801.33, 4921.33], continuumMask: [4781, 4941],
  },
  {
    id: 'h-gamma', name: 'Hγ', wavelength: 4340.47, wavelengthSource: NIST, family: 'balmer',
    window: [4319.75, 4363.5], blue: [4283.5, 4319.75], red: [4367.25, 4419.75], windowSource: LICK_A,
    indicates: ['temperature', 'luminosity'], profileWindow: [4290.47, 4390.47], continuumMask: [4280, 4400],
  },
  {
    id: 'h-delta', name: 'Hδ', wavelength: 4101.74, wavelengthSource: NIST, family: 'balmer',
    window: [4083.5, 4122.25], blue: [4041.6, 4079.75], red: [4128.5, 4161], windowSource: LICK_A,
    indicates: ['temperature', 'luminosity'], profileWindow: [4061.74, 4141.74], continuumMask: [4041, 4162],
  },
  {
    id: 'h-epsilon', name: 'Hε', wavelength: 3970.07, wavelengthSource: NIST, family: 'balmer',
    window: [3960, 3980], blue: [3943, 3953], red: [3990, 4000], windowSource: CHOSEN,
    indicates: ['temperature'], blendedWith: ['ca-ii-h'], profileWindow: [3950.07, 3990.07], continuumMask: [3950, 4000],
  },
  {
    id: 'h-8', name: 'H8', wavelength: 3889.05, wavelengthSource: NIST, family: 'balmer',
    window: [3879, 3899], blue: [3860, 3870], red: [3905, 3915], windowSource: CHOSEN,
    indicates: ['temperature'], profileWindow: [3874.05, 3904.05], continuumMask: [3860, 3915],
  },
  {
    id: 'h-9', name: 'H9', wavelength: 3835.38, wavelengthSource: NIST, family: 'balmer',
    window: [3828, 3843], blue: [3815, 3822], red: [3850, 3858], windowSource: CHOSEN,
    indicates: ['temperature'], continuumMask: [3700, 3860],
  },

  // Calcium II resonance lines.
  {
    id: 'ca-ii-k', name: 'Ca II K', wavelength: 3933.66, wavelengthSource: NIST, family: 'metal',
    window: [3928, 3939.5], blue: [3920, 3927], red: [3940, 3947], windowSource: CHOSEN,
    indicates: ['temperature', 'peculiarity'], continuumMask: [3915, 3950],
  },
  {
    id: 'ca-ii-h', name: 'Ca II H', wavelength: 3968.47, wavelengthSource: NIST, family: 'metal',
    window: [3963, 3974], blue: [3943, 3953], red: [3990, 4000], windowSource: CHOSEN,
    indicates: ['temperature'], blendedWith: ['h-epsilon'],
  },

  // Helium.
  {
    id: 'he-i-4026', name: 'He I 4026', wavelength: 4026.19, wavelengthSource: NIST, family: 'helium',
    window: [4022, 4030], blue: [4012, 4018], red: [4032, 4038], windowSource: CHOSEN, indicates: ['temperature'],
  },
  {
    id: 'he-i-4144', name: 'He I 4144', wavelength: 4143.76, wavelengthSource: NIST, family: 'helium',
    window: [4140, 4148], blue: [4128.5, 4136], red: [4150, 4161], windowSource: CHOSEN,
    indicates: ['temperature'], blendedWith: ['fe-i-4144'],
  },
  {
    id: 'he-i-4388', name: 'He I 4388', wavelength: 4387.93, wavelengthSource: NIST, family: 'helium',
    window: [4384, 4392], blue: [4367.25, 4372], red: [4392, 4400], windowSource: CHOSEN, indicates: ['temperature', 'luminosity'],
  },
  {
    id: 'he-i-4471', name: 'He I 4471', wavelength: 4471.48, wavelengthSource: NIST, family: 'helium',
    window: [4467.5, 4475.5], blue: [4455, 4462], red: [4488, 4495], windowSource: CHOSEN, indicates: ['temperature', 'luminosity'],
  },
  {
    id: 'he-i-4922', name: 'He I 4922', wavelength: 4921.93, wavelengthSource: NIST, family: 'helium',
    window: [4918, 4926], blue: [4895, 4905], red: [4930, 4940], windowSource: CHOSEN, indicates: ['temperature'],
  },
  {
    id: 'he-ii-4200', name: 'He II 4200', wavelength: 4199.83, wavelengthSource: NIST, family: 'helium',
    window: [4196, 4204], blue: [4187, 4193], red: [4207, 4212], windowSource: CHOSEN, indicates: ['temperature'],
  },
  {
    id: 'he-ii-4542', name: 'He II 4542', wavelength: 4541.59, wavelengthSource: NIST, family: 'helium',
    window: [4537.5, 4545.5], blue: [4525, 4533], red: [4560, 4568], windowSource: CHOSEN, indicates: ['temperature'],
  },
  {
    id: 'he-ii-4686', name: 'He II 4686', wavelength: 4685.68, wavelengthSource: NIST, family: 'helium',
    window: [4681.5, 4689.5], blue: [4670, 4677], red: [4694, 4701], windowSource: CHOSEN, indicates: ['temperature', 'luminosity', 'peculiarity'],
  },

  // Metals: B and A stars.
  {
    id: 'mg-ii-4481', name: 'Mg II 4481', wavelength: 4481.2, wavelengthSource: NIST_BLEND, family: 'metal',
    window: [4477.5, 4485], blue: [4455, 4462], red: [4488, 4495], windowSource: CHOSEN, indicates: ['temperature', 'luminosity'],
  },
  {
    id: 'si-ii-4128', name: 'Si II 4128', wavelength: 4128.05, wavelengthSource: NIST, family: 'metal',
    window: [4125.5, 4129.5], blue: [4118, 4122], red: [4134, 4138], windowSource: CHOSEN,
    indicates: ['temperature', 'peculiarity'], blendedWith: ['si-ii-4131'],
  },
  {
    id: 'si-ii-4131', name: 'Si II 4131', wavelength: 4130.88, wavelengthSource: NIST, family: 'metal',
    window: [4129.5, 4133.5], blue: [4118, 4122], red: [4134, 4138], windowSource: CHOSEN,
    indicates: ['temperature', 'peculiarity'], blendedWith: ['si-ii-4128'],
  },
  {
    id: 'si-iii-4553', name: 'Si III 4553', wavelength: 4552.62, wavelengthSource: NIST, family: 'metal',
    window: [4549, 4556], blue: [4525, 4533], red: [4560, 4568], windowSource: CHOSEN, indicates: ['temperature', 'luminosity'],
  },
  {
    id: 'si-iv-4089', name: 'Si IV 4089', wavelength: 4088.86, wavelengthSource: NIST, family: 'metal',
    window: [4085.5, 4092.5], blue: [4079.75, 4083.5], red: [4093, 4096], windowSource: CHOSEN, indicates: ['temperature', 'luminosity'],
  },
  // Metals: F to K stars.
  {
    id: 'sr-ii-4077', name: 'Sr II 4077', wavelength: 4077.71, wavelengthSource: NIST, family: 'metal',
    window: [4075, 4080.5], blue: [4066, 4069.5], red: [4080.5, 4083.5], windowSource: CHOSEN, indicates: ['luminosity', 'peculiarity'],
  },
  {
    id: 'sr-ii-4216', name: 'Sr II 4216', wavelength: 4215.52, wavelengthSource: NIST, family: 'metal',
    window: [4213, 4218], blue: [4205, 4210], red: [4219.75, 4222.25], windowSource: CHOSEN,
    indicates: ['luminosity'], blendedWith: ['cn-4216'],
  },
  {
    id: 'ca-i-4227', name: 'Ca I 4226', wavelength: 4226.73, wavelengthSource: NIST, family: 'metal',
    window: [4222.25, 4234.75], blue: [4211, 4219.75], red: [4241, 4251], windowSource: LICK, indicates: ['temperature', 'luminosity'],
  },
  {
    id: 'fe-i-4045', name: 'Fe I 4045', wavelength: 4045.81, wavelengthSource: NIST, family: 'metal',
    window: [4043, 4048.5], blue: [4036, 4040], red: [4050, 4054], windowSource: CHOSEN, indicates: ['temperature'],
  },
  {
    id: 'fe-i-4063', name: 'Fe I 4063', wavelength: 4063.59, wavelengthSource: NIST, family: 'metal',
    window: [4061, 4066], blue: [4054, 4058], red: [4066, 4069.5], windowSource: CHOSEN, indicates: ['temperature'],
  },
  {
    id: 'fe-i-4071', name: 'Fe I 4071', wavelength: 4071.74, wavelengthSource: NIST, family: 'metal',
    window: [4069.5, 4074.5], blue: [4066, 4069.5], red: [4080.5, 4083.5], windowSource: CHOSEN, indicates: ['temperature'],
  },
  {
    id: 'fe-i-4144', name: 'Fe I 4144', wavelength: 4143.87, wavelengthSource: NIST, family: 'metal',
    window: [4140, 4148], blue: [4128.5, 4136], red: [4150, 4161], windowSource: CHOSEN,
    indicates: ['temperature'], blendedWith: ['he-i-4144'],
  },
  {
    id: 'y-ii-4375', name: 'Y II 4375', wavelength: 4374.94, wavelengthSource: 'NIST ASD (air), from memory; blended with Fe I 4375.93',
    family: 'metal', window: [4372.5, 4377.5], blue: [4367.25, 4371], red: [4392, 4400], windowSource: CHOSEN,
    indicates: ['luminosity'],
  },
  {
    id: 'fe-i-4383', name: 'Fe I 4383', wavelength: 4383.55, wavelengthSource: NIST, family: 'metal',
    window: [4381, 4386], blue: [4367.25, 4371], red: [4392, 4400], windowSource: CHOSEN, indicates: ['temperature'],
  },
  {
    id: 'fe-i-4405', name: 'Fe I 4405', wavelength: 4404.75, wavelengthSource: NIST, family: 'metal',
    window: [4402, 4407.5], blue: [4392, 4400], red: [4408.5, 4413], windowSource: CHOSEN, indicates: ['temperature'],
  },
  {
    id: 'mg-b', name: 'Mg b', wavelength: 5172.68, wavelengthSource: 'NIST ASD (air), middle line of 5167.32/5172.68/5183.60, from memory',
    family: 'metal', window: [5160.125, 5192.625], blue: [5142.625, 5161.375], red: [5191.375, 5206.375], windowSource: LICK,
    indicates: ['temperature', 'luminosity'], continuumMask: [5160, 5193],
  },
  {
    id: 'na-d', name: 'Na D', wavelength: 5889.95, wavelengthSource: 'NIST ASD (air), D2 5889.95 with D1 5895.92, from memory',
    family: 'metal', window: [5876.875, 5909.375], blue: [5860.625, 5875.625], red: [5922.125, 5948.125], windowSource: LICK,
    indicates: ['temperature', 'luminosity'], continuumMask: [5877, 5909],
  },

  // Molecular bands. Windows start at the head and run to the degraded side.
  {
    id: 'g-band', name: 'G band', wavelength: 4300, wavelengthSource: 'CH band centre, approximate, common practice', family: 'band',
    window: [4281.375, 4316.375], blue: [4266.375, 4282.625], red: [4318.875, 4335.125], windowSource: LICK,
    indicates: ['temperature'],
  },
  {
    id: 'cn-4216', name: 'CN 4216', wavelength: 4216, wavelengthSource: BAND_HEAD, family: 'band',
    window: [4142.125, 4177.125], blue: [4080.125, 4117.625], red: [4244.125, 4284.125],
    windowSource: 'Lick CN1 bands (Worthey et al. 1994), from memory', indicates: ['luminosity', 'peculiarity'],
  },
  {
    id: 'mgh-4780', name: 'MgH 4780', wavelength: 4780, wavelengthSource: BAND_HEAD, family: 'band',
    window: [4770, 4800], blue: [4740, 4758], red: [4805, 4820], windowSource: CHOSEN,
    indicates: ['luminosity', 'temperature'], continuumMask: [4770, 4800],
  },
  {
    id: 'tio-4762', name: 'TiO 4762', wavelength: 4762, wavelengthSource: BAND_HEAD, family: 'band',
    window: [4762, 4790], blue: [4740, 4758], red: [4805, 4820], windowSource: CHOSEN,
    indicates: ['temperature'], continuumMask: [4762, 4800],
  },
  {
    id: 'tio-4954', name: 'TiO 4954', wavelength: 4954, wavelengthSource: BAND_HEAD, family: 'band',
    window: [4954, 4990], blue: [4935, 4951], red: [5015, 5030], windowSource: CHOSEN,
    indicates: ['temperature'], continuumMask: [4954, 5010],
  },
  {
    id: 'tio-5167', name: 'TiO 5167', wavelength: 5167, wavelengthSource: BAND_HEAD, family: 'band',
    window: [5167, 5205], blue: [5142.625, 5161.375], red: [5235, 5250], windowSource: CHOSEN,
    indicates: ['temperature'], continuumMask: [5160, 5230],
  },
]

/** How a line ratio combines its lines: by equivalent width or by central depth. */
export type RatioQuantity = 'ew' | 'depth'

export interface LineRatioDefinition {
  id: string
  name: string
  /** Line ids summed in the numerator. */
  numerator: readonly string[]
  /** Line ids summed in the denominator; empty for a single-feature strength such as TiO depth. */
  denominator: readonly string[]
  quantity: RatioQuantity
  /** How the ratio moves with luminosity or temperature (common practice). */
  meaning: string
}

/**
 * The luminosity-sensitive ratios of the MK system, and the band strengths used beside them.
 * Which lines pair with which is common practice in MK classification; depth ratios are used for
 * close pairs whose windows overlap at classification resolution.
 */
export const LINE_RATIOS: readonly LineRatioDefinition[] = [
  {
    id: 'sr-ii-4077/fe-i-4071',
    name: 'Sr II 4077 / Fe I 4071',
    numerator: ['sr-ii-4077'],
    denominator: ['fe-i-4071'],
    quantity: 'depth',
    meaning: 'rises with luminosity in late-A to K stars',
  },
  {
    id: 'sr-ii-4077/fe-i-4045',
    name: 'Sr II 4077 / Fe I 4045',
    numerator: ['sr-ii-4077'],
    denominator: ['fe-i-4045'],
    quantity: 'depth',
    meaning: 'rises with luminosity in late-A to K stars',
  },
  {
    id: 'sr-ii-4216/ca-i-4227',
    name: 'Sr II 4216 / Ca I 4226',
    numerator: ['sr-ii-4216'],
    denominator: ['ca-i-4227'],
    quantity: 'depth',
    meaning: 'rises with luminosity in G and K stars',
  },
  {
    id: 'y-ii-4375/fe-i-4383',
    name: 'Y II 4376 / Fe I 4383',
    numerator: ['y-ii-4375'],
    denominator: ['fe-i-4383'],
    quantity: 'depth',
    meaning: 'rises with luminosity in F to K stars',
  },
  {
    id: 'he-i-4471/mg-ii-4481',
    name: 'He I 4471 / Mg II 4481',
    numerator: ['he-i-4471'],
    denominator: ['mg-ii-4481'],
    quantity: 'ew',
    meaning: 'falls with temperature through the B types; a temperature criterion with a luminosity term',
  },
  {
    id: 'si-iii-4553/si-iv-4089',
    name: 'Si III 4553 / Si IV 4089',
    numerator: ['si-iii-4553'],
    denominator: ['si-iv-4089'],
    quantity: 'ew',
    meaning: 'temperature criterion near B0; Si IV strengthens with luminosity',
  },
  {
    id: 'si-iii-4553/he-i-4388',
    name: 'Si III 4553 / He I 4387',
    numerator: ['si-iii-4553'],
    denominator: ['he-i-4388'],
    quantity: 'ew',
    meaning: 'rises with luminosity in early-B stars',
  },
  {
    id: 'cn-4216/g-band',
    name: 'CN 4216 / G band',
    numerator: ['cn-4216'],
    denominator: ['g-band'],
    quantity: 'depth',
    meaning: 'CN strengthens with luminosity in G and K giants',
  },
  {
    id: 'tio-4954',
    name: 'TiO 4954 depth',
    numerator: ['tio-4954'],
    denominator: [],
    quantity: 'depth',
    meaning: 'grows through the M types; used for the M subtype',
  },
]

const BY_ID = new Map(CLASSIFICATION_LINES.map((line) => [line.id, line]))

/** The line with this id, or undefined. */
export function findLine(id: string): ClassificationLine | undefined {
  return BY_ID.get(id)
}

/** The full span a line's measurement needs: blue side band to red side band, Å. */
export function lineSpan(line: ClassificationLine): WavelengthRange {
  return [Math.min(line.blue[0], line.window[0]), Math.max(line.red[1], line.window[1])]
}

/** The ranges a global continuum fit must ignore, sorted and merged, Å. */
export function continuumMaskRanges(): WavelengthRange[] {
  const ranges = CLASSIFICATION_LINES.flatMap((line) => (line.continuumMask ? [line.continuumMask] : []))
    .slice()
    .sort((a, b) => a[0] - b[0])
  const merged: [number, number][] = []
  for (const [lo, hi] of ranges) {
    const last = merged[merged.length - 1]
    if (last && lo <= last[1]) last[1] = Math.max(last[1], hi)
    else merged.push([lo, hi])
  }
  return merged
}

/** Ids of the TiO band heads, used to recognise an M-type spectrum before fitting a continuum. */
export const TIO_BAND_IDS: readonly string[] = ['tio-4762', 'tio-4954', 'tio-5167']

/** Ids of the Balmer lines that get a Voigt-profile fit. */
export const VOIGT_FIT_LINE_IDS: readonly string[] = ['h-beta', 'h-gamma', 'h-delta', 'h-epsilon', 'h-8']
