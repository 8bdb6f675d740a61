/** One classification line's measurement; unmeasured lines carry a reason and nulls, never zeros. */
export interface LineRow {
  id: string
  name: string
  wavelength: number
  family: string
  measured: boolean
  reason: string | null
  ew: number | null
  ewError: number | null
  depth: number | null
  fwhm: number | null
  centroid: number | null
  snr: number | null
  gaussianFwhm: number | null
  lorentzianFwhm: number | null
  lorentzianError: number | null
}

export interface MeasurementSummary {
  id: number
  pipelineVersion: string
  isCurrent: boolean
  snr: number | null
  rv: number | null
  rvError: number | null
  pseudoContinuum: boolean
  warnings: string[]
  ratios: unknown[]
  seconds: number
  createdAt: string
  lines: LineRow[]
}

/** The current measurement and the earlier ones (without their lines). */
export interface SpectrumMeasurements {
  current: MeasurementSummary | null
  history: Omit<MeasurementSummary, 'lines'>[]
}
