import { randomBytes } from 'node:crypto'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { Campaign, Classification, LibraryVersion, Measurement, ReviewCall, Spectrum, Suggestion, type User } from '../../server/models'
import {
  agreementFigures,
  auditFigures,
  auditFromWorker,
  auditReportJson,
  getAuditJson,
  isoWeek,
  numericRows,
  setAuditRunner,
  suggestionAccuracy,
  typeScale,
  type AccuracyItem,
  type AuditCall,
  type AuditSpectrum,
} from '../../server/services/audit.service'
import { weightedKappa } from '../../shared/agreement'
import { closeDatabase, createTestContext, makeUser, signedInAgent, type TestContext } from '../helpers/context'

const at = (iso: string) => new Date(iso)
const call = (spectrumId: number, classifierId: number, typeCode: number, classCode: number, extra: Partial<AuditCall> = {}): AuditCall => ({
  spectrumId,
  classifierId,
  classifierName: `Classifier ${classifierId}`,
  typeCode,
  classCode,
  at: at('2025-01-08T12:00:00Z'),
  secondsSpent: 60,
  suggestionShown: false,
  acceptedSuggestion: false,
  ...extra,
})

describe('auditFigures', () => {
  // Hand-made rows: classifiers 1 and 2 call spectra 1–4; classifier 3 calls 1–3.
  const calls: AuditCall[] = [
    call(1, 1, 20, 6, { secondsSpent: 30 }),
    call(1, 2, 20, 6),
    call(1, 3, 21, 6),
    call(2, 1, 42, 4, { secondsSpent: 90 }),
    call(2, 2, 43, 4),
    call(2, 3, 42, 5),
    call(3, 1, 15, 6, { secondsSpent: 50, at: at('2025-01-15T09:00:00Z') }),
    call(3, 2, 17, 5, { at: at('2025-01-15T09:00:00Z') }),
    call(3, 3, 15, 6, { at: at('2025-01-15T09:00:00Z') }),
    call(4, 1, 55, 4, { secondsSpent: null, suggestionShown: true, acceptedSuggestion: true }),
    call(4, 2, 55, 4, { suggestionShown: true }),
  ]
  const spectra: AuditSpectrum[] = [
    { spectrumId: 1, suggestion: { typeCode: 20, classCode: 6, libraryVersion: 'model-v1' }, decision: { typeCode: 20, classCode: 6 } },
    { spectrumId: 2, suggestion: { typeCode: 42, classCode: 4, libraryVersion: 'model-v1' }, decision: { typeCode: 42, classCode: 4 } },
    { spectrumId: 3, suggestion: { typeCode: 16, classCode: 6, libraryVersion: 'model-v2' }, decision: null },
    { spectrumId: 4, suggestion: { typeCode: 55, classCode: 4, libraryVersion: 'model-v2' }, decision: { typeCode: 55, classCode: 4 } },
  ]
  const a = auditFigures(calls, spectra)

  it('pairs every two classifiers over the spectra both called', () => {
    expect(a.pairs.map((p) => `${p.a.id}-${p.b.id}:${p.n}`)).toEqual(['1-2:4', '1-3:3', '2-3:3'])
    const p12 = a.pairs[0]!
    // types 20/20, 42/43, 15/17, 55/55 → exact 2 of 4; within ±1: 3 of 4. Classes 6/6, 4/4, 6/5, 4/4 → 3 of 4 exact, 4 of 4 within one.
    expect(p12.exactType).toEqual({ value: 0.5, n: 4, smallSample: true })
    expect(p12.withinOneSubtype.value).toBe(0.75)
    expect(p12.exactClass.value).toBe(0.75)
    expect(p12.withinOneClass.value).toBe(1)
    // Weighted κ on the half-subtype scale from 15 to 55 (computed here with shared/agreement.ts, which is checked against scikit-learn).
    expect(p12.weightedKappaTypeLinear.value).toBeCloseTo(weightedKappa([20, 42, 15, 55], [20, 43, 17, 55], 'linear', { categories: typeScale([20, 42, 15, 55, 20, 43, 17, 55]) }), 12)
    expect(p12.kappaClass.value).not.toBeNull()
  })

  it('compares each classifier with the suggestion on the spectra that have one', () => {
    expect(a.vsSuggestion.map((p) => [p.a.id, p.b.kind, p.n])).toEqual([
      [1, 'suggestion', 4],
      [2, 'suggestion', 4],
      [3, 'suggestion', 3],
    ])
    // classifier 1: 20=20, 42=42, 15≠16 (within 1), 55=55
    expect(a.vsSuggestion[0]!.exactType.value).toBe(0.75)
    expect(a.vsSuggestion[0]!.withinOneSubtype.value).toBe(1)
  })

  it('reads an intermediate class as agreeing with its ends, as the MK system does (common practice)', () => {
    // III-IV (4.5) against III and IV agrees; against V (one step off an end) it does not; Ib-II (2.5) against II agrees.
    const f = agreementFigures({ type: [20, 20, 20, 20], cls: [4.5, 4.5, 4.5, 2.5] }, { type: [20, 20, 20, 20], cls: [4, 5, 6, 3] })
    expect(f.exactClass.value).toBe(0.75)
    // κ reads them the same way: pairs (4,4) (5,5) (4.5,6) (3,3); p_o = 3/4, p_e = 3 × (1/4 × 1/4) = 3/16 from
    // the marginals, κ = (3/4 − 3/16)/(1 − 3/16) = 9/13 (Cohen 1960, computed by hand here).
    expect(f.kappaClass.value).toBeCloseTo(9 / 13, 12)
  })

  it('gives each classifier a signed offset from the consensus, the median call time, and n', () => {
    const [c1, c2, c3] = a.classifiers
    // Spectrum 3 has no decision: its consensus is the median of the three calls (15, 17, 15 → 15; classes 6, 5, 6 → 6).
    // Classifier 2: 20−20, 43−42, 17−15, 55−55 → mean +0.75 subtypes; classes 0, 0, −1, 0 → −0.25.
    expect(c2!.typeOffset).toEqual({ value: 0.75, n: 4, smallSample: true })
    expect(c2!.classOffset.value).toBe(-0.25)
    // Classifier 3: 21−20, 42−42, 15−15 → +1/3; classes 0, +1, 0 → +1/3.
    expect(c3!.typeOffset.value).toBeCloseTo(1 / 3, 12)
    expect(c3!.classOffset.value).toBeCloseTo(1 / 3, 12)
    expect(c1!.typeOffset.value).toBe(0)
    // Seconds 30, 90, 50 (one call has none) → median 50 over 3 calls.
    expect(c1!.medianSecondsPerCall).toEqual({ value: 50, n: 3, smallSample: true })
    expect(c1!.calls).toBe(4)
  })

  it("computes Fleiss' κ over the spectra that three classifiers called", () => {
    expect(a.fleiss.ratersPerItem).toBe(3)
    expect(a.fleiss.type.n).toBe(3)
    expect(a.fleiss.type.smallSample).toBe(true)
    expect(typeof a.fleiss.class.value).toBe('number')
  })

  it('keeps the spectra behind every cell of the confusion matrices', () => {
    const m = a.confusion.callsVsConsensus.type
    expect(m.labels).toEqual(['B', 'A', 'G', 'K'])
    expect(m.n).toBe(11)
    const cell = (r: string, c: string) => m.cells[m.labels.indexOf(r)]![m.labels.indexOf(c)]!
    expect(cell('A', 'A')).toEqual({ count: 3, spectrumIds: [1] })
    expect(cell('G', 'G')).toEqual({ count: 3, spectrumIds: [2] })
    expect(cell('B', 'B')).toEqual({ count: 3, spectrumIds: [3] })
    const cls = a.confusion.callsVsConsensus.class
    expect(cls.labels).toEqual(['III', 'IV', 'V'])
    expect(cls.cells[cls.labels.indexOf('IV')]![cls.labels.indexOf('III')]).toEqual({ count: 1, spectrumIds: [2] })
    expect(cls.cells[cls.labels.indexOf('IV')]![cls.labels.indexOf('V')]).toEqual({ count: 1, spectrumIds: [3] })
    expect(a.confusion.suggestionVsConsensus.type.n).toBe(4)
  })

  it('groups calls by ISO week and by library version', () => {
    expect(a.byWeek.map((w) => [w.key, w.calls])).toEqual([
      ['2025-W02', 8],
      ['2025-W03', 3],
    ])
    expect(a.byLibraryVersion.map((w) => [w.key, w.calls])).toEqual([
      ['model-v1', 6],
      ['model-v2', 5],
    ])
    expect(a.byLibraryVersion[0]!.vsSuggestion.exactType).toEqual({ value: 4 / 6, n: 6, smallSample: true })
  })

  it('compares calls made with the suggestion shown against blind ones', () => {
    expect(a.blind.shown.calls).toBe(2)
    expect(a.blind.shown.acceptedSuggestion).toEqual({ value: 0.5, n: 2, smallSample: true })
    expect(a.blind.shown.agreeWithSuggestion.value).toBe(1)
    expect(a.blind.blind.calls).toBe(9)
    // blind calls equal to the suggestion in type and class: (1,1), (1,2), (2,1) → 3 of 9
    expect(a.blind.blind.agreeWithSuggestion.value).toBeCloseTo(3 / 9, 12)
  })

  it('marks a figure from ten or more items as not small and leaves undefined figures null', () => {
    const many = Array.from({ length: 12 }, (_, i) => [call(100 + i, 1, 20 + (i % 3), 6), call(100 + i, 2, 20 + (i % 3), 6)]).flat()
    const r = auditFigures(many, [])
    expect(r.pairs[0]!.exactType).toEqual({ value: 1, n: 12, smallSample: false })
    // Both classifiers say class V every time: κ is 0/0.
    expect(r.pairs[0]!.kappaClass).toEqual({ value: null, n: 12, smallSample: false })
    const none = auditFigures([], [])
    expect(none.pairs).toEqual([])
    expect(none.fleiss).toEqual({ type: { value: null, n: 0, smallSample: true }, class: { value: null, n: 0, smallSample: true }, ratersPerItem: null })
    expect(none.blind.shown.acceptedSuggestion).toEqual({ value: null, n: 0, smallSample: true })
  })

  it('works through 62 000 spectra called twice in a few seconds, counting each cell once per spectrum', () => {
    const n = 62_000
    const calls: AuditCall[] = []
    const spectra: AuditSpectrum[] = []
    for (let i = 0; i < n; i++) {
      // Every fifth spectrum the second classifier calls one subtype later.
      calls.push(call(i, 1, 20 + (i % 7), 6), call(i, 2, 20 + (i % 7) + (i % 5 === 0 ? 1 : 0), 6))
      spectra.push({ spectrumId: i, suggestion: { typeCode: 20 + (i % 7), classCode: 6, libraryVersion: 'model-v1' }, decision: null })
    }
    const started = performance.now()
    const r = auditFigures(calls, spectra)
    expect(performance.now() - started).toBeLessThan(10_000)
    expect(r.calls).toBe(2 * n)
    expect(r.pairs[0]!.exactType.value).toBeCloseTo(0.8, 12)
    expect(r.pairs[0]!.withinOneSubtype.value).toBe(1)
    expect(r.vsSuggestion[0]!.exactType.value).toBe(1)
    const cells = r.confusion.callsVsConsensus.type.cells.flat()
    expect(cells.reduce((sum, c) => sum + c.count, 0)).toBe(2 * n)
    expect(new Set(cells.flatMap((c) => c.spectrumIds)).size).toBe(n)
  })
})

describe('suggestionAccuracy', () => {
  // Hand-made: four spectra of instrument 7 suggested by version A (January) and again by version B
  // (February, after a promotion), one spectrum of no instrument.
  const A = { id: 1, name: 'A', publishedAt: at('2025-01-01T00:00:00Z') }
  const B = { id: 2, name: 'B', publishedAt: at('2025-02-01T00:00:00Z') }
  const item = (spectrumId: number, version: typeof A, suggestion: [number, number], decision: [number, number], ownShare: number | null, instrument: number | null = 7): AccuracyItem => ({
    spectrumId,
    instrument: { id: instrument, name: instrument === null ? 'No instrument' : 'Spectrograph 7' },
    version,
    madeAt: version === A ? at('2025-01-08T12:00:00Z') : at('2025-02-05T12:00:00Z'),
    suggestion: { typeCode: suggestion[0], classCode: suggestion[1] },
    decision: { typeCode: decision[0], classCode: decision[1] },
    ownShare,
  })
  const r = suggestionAccuracy([
    // Version B (listed first) must still come second: versions go in the order they were published.
    item(1, B, [50, 4], [50, 4], 0.9),
    item(2, B, [43, 4], [42, 4], 0.5),
    item(3, B, [21, 6], [20, 6], 0.2),
    item(4, B, [55, 5], [52, 4], 0.8),
    item(1, A, [52, 4], [50, 4], 0),
    item(2, A, [42, 5], [42, 4], 0),
    item(3, A, [20, 6], [20, 6], 0),
    item(4, A, [55, 4], [52, 4], 0),
    item(9, A, [30, 6], [30, 6], null, null),
  ])

  it('scores each version of an instrument against the decisions, in the order published, with the change from the one before', () => {
    expect(r.instruments.map((i) => i.instrument.name)).toEqual(['Spectrograph 7', 'No instrument'])
    const [a, b] = r.instruments[0]!.versions
    // A: |Δtype| 2, 0, 0, 3 → 2 of 4 within one subtype; classes 4/4, 5/4, 6/6, 4/4 → 3 of 4 exact.
    expect(a).toMatchObject({
      version: { name: 'A' },
      n: 4,
      withinOneSubtype: { value: 0.5 },
      exactClass: { value: 0.75 },
      ownShare: { value: 0 },
      change: { withinOneSubtype: null, exactClass: null },
    })
    // B: |Δtype| 0, 1, 1, 3 → 3 of 4; classes 4/4, 4/4, 6/6, 5/4 → 3 of 4; own share (0.9 + 0.5 + 0.2 + 0.8) / 4 = 0.6.
    expect(b).toMatchObject({ version: { name: 'B' }, n: 4, withinOneSubtype: { value: 0.75 }, exactClass: { value: 0.75 }, change: { withinOneSubtype: 25, exactClass: 0 } })
    expect(b!.ownShare.value).toBeCloseTo(0.6, 12)
    expect(a!.withinOneSubtype.smallSample).toBe(true)
  })

  it('follows each instrument week by week, naming the versions that made the suggestions', () => {
    expect(r.instruments[0]!.byWeek.map((w) => [w.week, w.versions, w.n])).toEqual([
      ['2025-W02', ['A'], 4],
      ['2025-W06', ['B'], 4],
    ])
    expect(r.instruments[1]!.versions).toHaveLength(1)
    expect(r.instruments[1]!.versions[0]!.ownShare).toEqual({ value: null, n: 0, smallSample: true })
  })
})

describe('isoWeek', () => {
  it('follows ISO 8601 at year ends (common practice: 2021-01-03 is in 2020-W53, 2024-12-30 in 2025-W01)', () => {
    expect(isoWeek(at('2021-01-03T12:00:00Z'))).toBe('2020-W53')
    expect(isoWeek(at('2021-01-04T00:00:00Z'))).toBe('2021-W01')
    expect(isoWeek(at('2024-12-30T00:00:00Z'))).toBe('2025-W01')
  })
})

describe('GET /api/audit', () => {
  let t: TestContext
  let campaign: Campaign
  let lead: Awaited<ReturnType<typeof signedInAgent>>
  let classifier: Awaited<ReturnType<typeof signedInAgent>>
  let people: User[]

  beforeAll(async () => {
    t = await createTestContext()
    campaign = await Campaign.create({ code: `AU-${randomBytes(3).toString('hex')}`, name: 'Audit fields', description: '' })
    const l = await makeUser('lead')
    lead = await signedInAgent(t.app, l.user.email, l.password)
    const c = await makeUser('classifier')
    classifier = await signedInAgent(t.app, c.user.email, c.password)
    people = [(await makeUser('classifier', { name: 'Audit A' })).user, (await makeUser('classifier', { name: 'Audit B' })).user]
    const version = await LibraryVersion.create({ name: `audit-${randomBytes(3).toString('hex')}`, description: '', publishedAt: null, publishedBy: null })
    const calls: Array<[number, number, number, string]> = [
      // [person, type code, class code, when]
      [0, 20, 6, '2025-02-03T10:00:00Z'],
      [1, 20, 6, '2025-02-03T11:00:00Z'],
      [0, 42, 4, '2025-02-10T10:00:00Z'],
      [1, 44, 4, '2025-02-10T11:00:00Z'],
    ]
    for (let i = 0; i < 2; i++) {
      const s = await Spectrum.create({
        campaignId: campaign.id,
        submittedBy: l.user.id,
        batchId: null,
        statusReason: null,
        objectName: `audit-${i}`,
        raDeg: null,
        decDeg: null,
        obsDate: null,
        exposureS: null,
        instrument: '',
        resolutionFwhm: null,
        resolvingPower: null,
        vMag: null,
        parallaxMas: null,
        parallaxErrorMas: null,
        ebv: null,
        notes: '',
        fileName: 'x.txt',
        fileSha256: randomBytes(32).toString('hex'),
        fileSize: 1,
        format: 'text',
        hdu: null,
        pixels: 1,
        wlMin: 3800,
        wlMax: 5000,
        dispersion: 1,
        snr: null,
        vacuumConverted: false,
        readInfo: '{}',
      })
      const m = await Measurement.create({
        spectrumId: s.id,
        pipelineVersion: '1.0.0',
        isCurrent: true,
        snr: 50,
        rv: 0,
        rvError: 1,
        pseudoContinuum: false,
        warnings: '[]',
        ratios: '[]',
        gridStart: 3800,
        gridStep: 1,
        gridLength: 0,
        flux: Buffer.alloc(0),
        continuum: Buffer.alloc(0),
        rectified: Buffer.alloc(0),
        mask: Buffer.alloc(0),
        seconds: 0,
      })
      const sug = await Suggestion.create({
        spectrumId: s.id,
        measurementId: m.id,
        libraryVersionId: version.id,
        pipelineVersion: '1.0.0',
        isCurrent: true,
        spectralType: i ? 'G2 III' : 'A0 V',
        letter: i ? 'G' : 'A',
        subtype: i ? 2 : 0,
        typeCode: i ? 42 : 20,
        luminosityClass: i ? 'III' : 'V',
        classCode: i ? 4 : 6,
        uncertaintySubtypes: 1,
        uncertaintyClasses: 0.5,
        bestStandardId: null,
        candidates: '[]',
        votes: '[]',
        flags: '[]',
        probabilities: '[]',
      })
      for (const [person, typeCode, classCode, when] of calls.slice(2 * i, 2 * i + 2)) {
        await ReviewCall.create({
          spectrumId: s.id,
          userId: people[person]!.id,
          kind: 'call',
          firstCall: 1,
          correctsCallId: null,
          spectralType: '',
          letter: '',
          subtype: 0,
          typeCode,
          luminosityClass: '',
          classCode,
          peculiarities: '[]',
          notes: '',
          confidence: 3,
          uncertain: false,
          acceptedSuggestion: false,
          suggestionId: sug.id,
          suggestionShown: false,
          secondsSpent: 40 + person * 20,
          createdAt: new Date(when),
        })
      }
      if (i === 0) {
        await Classification.create({
          spectrumId: s.id,
          source: 'consensus',
          spectralType: 'A0 V',
          letter: 'A',
          subtype: 0,
          typeCode: 20,
          luminosityClass: 'V',
          classCode: 6,
          peculiarities: '[]',
          decidedBy: people[1]!.id,
          nCalls: 2,
          callIds: '[]',
          agreement: 'exact',
          typeSpread: 0,
          classSpread: 0,
          suggestionId: sug.id,
          disputeId: null,
          note: '',
        })
      }
    }
  })
  afterAll(async () => {
    await t.close()
    await closeDatabase()
  })

  it('gives a lead the figures of a campaign, with n on every figure', async () => {
    const res = await lead.agent.get(`/api/audit?campaign=${campaign.id}`).expect(200)
    const a = res.body.audit
    expect(a.campaign).toMatchObject({ id: campaign.id, name: 'Audit fields' })
    expect(a.spectra).toBe(2)
    expect(a.calls).toBe(4)
    expect(a.pairs).toHaveLength(1)
    expect(a.pairs[0]).toMatchObject({ a: { name: 'Audit A' }, b: { name: 'Audit B' }, n: 2, exactType: { value: 0.5, n: 2, smallSample: true } })
    expect(a.vsSuggestion.map((p: { n: number; exactType: { value: number } }) => [p.n, p.exactType.value])).toEqual([
      [2, 1],
      [2, 0.5],
    ])
    // Audit B: 20−20 against the decision; 44 − median(42, 44) = +1 on the undecided spectrum → +0.5.
    expect(a.classifiers[1]).toMatchObject({ name: 'Audit B', typeOffset: { value: 0.5, n: 2 }, medianSecondsPerCall: { value: 60, n: 2 } })
    expect(a.byWeek.map((w: { key: string }) => w.key)).toEqual(['2025-W06', '2025-W07'])
    expect(a.confusion.callsVsConsensus.type.labels).toEqual(['A', 'G'])
  })

  it('limits the calls to the date range, the end date included', async () => {
    const res = await lead.agent.get(`/api/audit?campaign=${campaign.id}&from=2025-02-01&to=2025-02-03`).expect(200)
    expect(res.body.audit.calls).toBe(2)
    expect(res.body.audit.from).toBe('2025-02-01T00:00:00.000Z')
    expect(res.body.audit.to).toBe('2025-02-04T00:00:00.000Z')
  })

  it('reads numeric rows whole, or in parts when the text would be longer than one reply may carry', async () => {
    const columns = ['rc.id', 'rc.type_code', 'rc.class_code', 'rc.seconds_spent', 'rc.type_code / 8', 'NULL']
    const from = 'FROM review_calls rc JOIN spectra sp ON sp.id = rc.spectrum_id WHERE sp.campaign_id = :campaign'
    // The same rows read through the ORM.
    const spectra = await Spectrum.findAll({ where: { campaignId: campaign.id }, attributes: ['id'] })
    const stored = await ReviewCall.findAll({ where: { spectrumId: spectra.map((x) => x.id) }, order: [['id', 'ASC']] })
    const expected = stored.map((c) => [c.id, c.typeCode, c.classCode, c.secondsSpent, c.typeCode / 8, null])
    const sorted = (list: Array<Array<number | null>>) => [...list].sort((a, b) => a[0]! - b[0]!)
    expect(sorted(await numericRows(columns, from, { campaign: campaign.id }))).toEqual(expected)
    // 40 characters hold one row of these, not two: the rows come in parts.
    expect(sorted(await numericRows(columns, from, { campaign: campaign.id }, 40))).toEqual(expected)
  })

  it('keeps a computed report through sign-ins, and computes it again when a name it shows changes', async () => {
    let computed = 0
    setAuditRunner((query, ref) => {
      computed++
      return auditReportJson(query, ref)
    })
    try {
      const query = { campaignId: campaign.id, from: new Date('2025-01-01T00:00:00Z'), to: undefined }
      await getAuditJson(query)
      expect(computed).toBe(1)
      // A sign-in writes the person's row (last sign-in time); the figures do not change.
      await people[0]!.update({ lastLoginAt: new Date() })
      await getAuditJson(query)
      expect(computed).toBe(1)
      await people[0]!.update({ name: 'Audit A.' })
      const renamed = JSON.parse(await getAuditJson(query)) as { audit: { pairs: Array<{ a: { name: string } }> } }
      expect(computed).toBe(2)
      expect(renamed.audit.pairs[0]!.a.name).toBe('Audit A.')
    } finally {
      setAuditRunner(null)
      await people[0]!.update({ name: 'Audit A' })
    }
  })

  it('answers 503 with Retry-After when the report’s thread could not reach the database, and the report once it can', async () => {
    // The worker thread's answer when its own connection fails (an error's class does not cross threads).
    setAuditRunner(async () => auditFromWorker({ databaseUnavailable: 'connect ECONNREFUSED 127.0.0.1:1' }))
    try {
      const url = `/api/audit?campaign=${campaign.id}&from=2025-01-02`
      const down = await lead.agent.get(url).expect(503)
      expect(down.headers['retry-after']).toBeDefined()
      expect(down.body.error.code).toBe('database_unavailable')
      // The failed report is not kept: the next request computes it.
      setAuditRunner(auditReportJson)
      await lead.agent.get(url).expect(200)
    } finally {
      setAuditRunner(null)
    }
  })

  it('tags the report, answers 304 while it stands (RFC 9110 conditional GET), and a new tag once a name in it changes', async () => {
    const url = `/api/audit?campaign=${campaign.id}`
    const first = await lead.agent.get(url).expect(200)
    const tag = first.headers.etag as string
    expect(tag).toMatch(/^"[\w-]+"$/)
    const again = await lead.agent.get(url).set('If-None-Match', tag).expect(304)
    expect(again.text).toBe('')
    try {
      await people[0]!.update({ name: 'Audit A. R.' })
      const renamed = await lead.agent.get(url).set('If-None-Match', tag).expect(200)
      expect(renamed.headers.etag).not.toBe(tag)
      expect(JSON.stringify(renamed.body)).toContain('Audit A. R.')
    } finally {
      await people[0]!.update({ name: 'Audit A' })
    }
  })

  it('refuses classifiers, a missing campaign and a range that ends before it starts', async () => {
    await classifier.agent.get(`/api/audit?campaign=${campaign.id}`).expect(403)
    const missing = await lead.agent.get('/api/audit').expect(422)
    expect(missing.body.error.details.fields.campaign).toBeDefined()
    await lead.agent.get('/api/audit?campaign=999999999').expect(404)
    const backwards = await lead.agent.get(`/api/audit?campaign=${campaign.id}&from=2025-03-01&to=2025-02-01`).expect(422)
    expect(backwards.body.error.details.fields.to).toBe('must be after from')
  })
})
