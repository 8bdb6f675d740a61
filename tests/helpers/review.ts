import { randomBytes } from 'node:crypto'
import type { Express } from 'express'
import { Measurement, Spectrum, Suggestion, type User } from '../../server/models'
import { indexSuggestionFlags } from '../../server/services/queue.service'
import { makeUser, signedInAgent } from './context'

export type Client = Awaited<ReturnType<typeof signedInAgent>>
export interface Person {
  user: User
  client: Client
}

/** A new user of the role, signed in. */
export async function signedInPerson(app: Express, role: 'observer' | 'classifier' | 'lead', name: string): Promise<Person> {
  const { user, password } = await makeUser(role, { name })
  return { user, client: await signedInAgent(app, user.email, password) }
}

/** A request that changes something, so it carries the CSRF token. */
export const send = (c: Client, method: 'post' | 'patch' | 'put' | 'delete', path: string, body: object = {}) => c.agent[method](path).set('x-csrf-token', c.csrf).send(body)

export interface SuggestedSpectrumOptions {
  campaignId: number
  submittedBy: number
  libraryVersionId: number
  objectName: string
  snr: number
  instrument: string
  /** Letter, luminosity class, subtype, type code, class code. */
  type: [string, string, number, number, number]
  candidates: string
  votes: string
  flags: string
}

/** A stored, measured spectrum (no arrays) with a current suggestion, as the pipeline would leave it. */
export async function createSuggestedSpectrum(o: SuggestedSpectrumOptions) {
  const [letter, cls, subtype, typeCode, classCode] = o.type
  const spectrum = await Spectrum.create({
    campaignId: o.campaignId,
    submittedBy: o.submittedBy,
    batchId: null,
    status: 'suggested',
    statusReason: null,
    objectName: o.objectName,
    raDeg: null,
    decDeg: null,
    obsDate: null,
    exposureS: null,
    instrument: o.instrument,
    resolutionFwhm: null,
    resolvingPower: null,
    vMag: null,
    parallaxMas: null,
    parallaxErrorMas: null,
    ebv: null,
    notes: '',
    fileName: 'field.txt',
    fileSha256: randomBytes(32).toString('hex'),
    fileSize: 100,
    format: 'text',
    hdu: null,
    pixels: 2000,
    wlMin: 3800,
    wlMax: 5200,
    dispersion: 0.7,
    snr: o.snr,
    vacuumConverted: false,
    // What a text reader records for such a file (shared/api/spectra.ts ReadMeta).
    readInfo: JSON.stringify({
      format: 'text',
      vacuumConverted: false,
      vacuumSource: 'assumed air',
      wavelengthUnit: 'Angstrom',
      header: {},
      pixels: 2000,
      maskedPixels: 0,
      coverage: 1,
      reversed: false,
      notes: [],
    }),
  })
  const empty = Buffer.alloc(0)
  const m = await Measurement.create({
    spectrumId: spectrum.id,
    pipelineVersion: 'test',
    isCurrent: true,
    snr: o.snr,
    rv: null,
    rvError: null,
    pseudoContinuum: false,
    warnings: '[]',
    ratios: '[]',
    gridStart: 3800,
    gridStep: 1e-4,
    gridLength: 0,
    flux: empty,
    continuum: empty,
    rectified: empty,
    mask: empty,
    seconds: 0,
  })
  const suggestion = await Suggestion.create({
    spectrumId: spectrum.id,
    measurementId: m.id,
    libraryVersionId: o.libraryVersionId,
    pipelineVersion: 'test',
    isCurrent: true,
    spectralType: `${letter}${subtype} ${cls}`,
    letter,
    subtype,
    typeCode,
    luminosityClass: cls,
    classCode,
    uncertaintySubtypes: 1,
    uncertaintyClasses: 0.5,
    bestStandardId: null,
    candidates: o.candidates,
    votes: o.votes,
    flags: o.flags,
    probabilities: '[]',
  })
  await indexSuggestionFlags(Spectrum.sequelize!, spectrum.id, JSON.parse(o.flags) as string[])
  return { spectrum, suggestion }
}
