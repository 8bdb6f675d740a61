import { z } from 'zod'

/** One classification line's measurement; unmeasured lines carry a reason and nulls, never zeros. */
export const LineRow = z
  .object({
    id: z.string(),
    name: z.string(),
    wavelength: z.number(),
    family: z.string(),
    measured: z.boolean(),
    reason: z.string().nullable(),
    ew: z.number().nullable(),
    ewError: z.number().nullable(),
    depth: z.number().nullable(),
    fwhm: z.number().nullable(),
    centroid: z.number().nullable(),
    snr: z.number().nullable(),
    gaussianFwhm: z.number().nullable(),
    lorentzianFwhm: z.number().nullable(),
    lorentzianError: z.number().nullable(),
  })
  .meta({ id: 'LineRow' })
export type LineRow = z.infer<typeof LineRow>

const measurementFields = {
  id: z.number().int(),
  pipelineVersion: z.string(),
  isCurrent: z.boolean(),
  snr: z.number().nullable(),
  rv: z.number().nullable(),
  rvError: z.number().nullable(),
  pseudoContinuum: z.boolean(),
  warnings: z.array(z.string()),
  ratios: z.array(z.unknown()),
  seconds: z.number(),
  createdAt: z.string(),
}

export const MeasurementSummary = z.object({ ...measurementFields, lines: z.array(LineRow) }).meta({ id: 'MeasurementSummary' })
export type MeasurementSummary = z.infer<typeof MeasurementSummary>

/** The current measurement and the earlier ones (without their lines). */
export const SpectrumMeasurements = z.object({ current: MeasurementSummary.nullable(), history: z.array(z.object(measurementFields)) }).meta({ id: 'SpectrumMeasurements' })
export type SpectrumMeasurements = z.infer<typeof SpectrumMeasurements>
