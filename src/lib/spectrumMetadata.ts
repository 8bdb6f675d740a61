import { parseDeclination, parseRightAscension } from '@shared/coords'

/** What the observer says about a spectrum; the batch form on Submit and the spectrum page's edit form both fill it in. */
export interface MetadataDraft {
  objectName: string
  ra: string
  dec: string
  obsDate: string | null
  instrument: string
  /** The campaign's instrument record the spectrum was taken with. */
  instrumentId: number | null
  resolutionKind: 'fwhm' | 'power'
  resolution: number | null
  vMag: number | null
  parallaxMas: number | null
  parallaxErrorMas: number | null
  ebv: number | null
  notes: string
}

/** An instrument of the campaign, as the metadata form offers it. */
export interface InstrumentChoice {
  id: number
  name: string
  resolutionFwhm: number | null
}

/** Why a typed right ascension or declination cannot be read; undefined when it can, or when it is empty. */
export function coordinateError(kind: 'ra' | 'dec', value: string): string | undefined {
  const v = value.trim()
  if (v === '') return undefined
  const r = kind === 'ra' ? parseRightAscension(v) : parseDeclination(v)
  return r.ok ? undefined : r.message
}
