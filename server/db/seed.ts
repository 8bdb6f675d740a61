import { createFileStore } from '../storage'
import type { Sequelize } from 'sequelize'
import type { Config } from '../config'
import type { AppContext } from '../context'
import { JobRunner } from '../jobs/runner'
import { createLogger } from '../lib/logger'
import { startFakeSmtp } from '../mail/fake-smtp'
import { createMailer } from '../mail/mailer'
import { Campaign, CampaignMember, Dispute, Instrument, Spectrum, Suggestion, User } from '../models'
import { settleDispute } from '../services/disputes.service'
import { createRelease } from '../services/releases.service'
import { recordCall } from '../services/review.service'
import { submitFiles } from '../services/spectra.service'
import { ensureDefaultLibrary } from '../services/standards.service'
import { hashPassword } from '../services/users.service'
import { spectralTypeLabel } from '../../shared/calibration'
import { DEMO_ENTRIES, DEMO_RANGE, DEMO_RESOLUTION_FWHM, demoFits, demoObservation, demoText, seededRandom, type DemoEntry } from './demo-spectra'

/** The invented demo scenario: one observatory, two campaigns, one person per role (and a second classifier). */
export const DEMO_PEOPLE = [
  { email: 'lead@kestrel-ridge.example', name: 'Maren Olukoya', role: 'lead', password: 'lead-demo-2026' },
  { email: 'classifier@kestrel-ridge.example', name: 'Ilse Varga', role: 'classifier', password: 'classifier-demo-2026' },
  { email: 'classifier2@kestrel-ridge.example', name: 'Tomasz Achterberg', role: 'classifier', password: 'classifier2-demo-2026' },
  { email: 'observer@kestrel-ridge.example', name: 'Rohan Delacroix', role: 'observer', password: 'observer-demo-2026' },
] as const

export const DEMO_OBSERVATORY = 'Kestrel Ridge Observatory'
export const DEMO_CAMPAIGN_CODE = 'KRO-NFS26'
export const DEMO_QUICK_CAMPAIGN_CODE = 'KRO-QL26'
/** The demo's spectrograph; uploads that name it as their setup are linked to it. */
export const DEMO_INSTRUMENT = 'KRO-LRS, 600 l/mm grating'

const DAY = 86_400_000

/** Seeds once: a database that already holds the demo campaign is left as it is. Returns whether it seeded. */
export async function seedDemo(sequelize: Sequelize, config: Config): Promise<boolean> {
  if (await Campaign.findOne({ where: { code: DEMO_CAMPAIGN_CODE } })) return false
  const people = await sequelize.transaction(async (transaction) => {
    const survey = await Campaign.create(
      {
        code: DEMO_CAMPAIGN_CODE,
        name: 'Northern Fields Survey 2026',
        description: 'Low-resolution classification spectra of field stars taken with the 1.1 m telescope at Kestrel Ridge; two blind calls per spectrum.',
        observatory: DEMO_OBSERVATORY,
        callsRequired: 2,
        blindReview: true,
      },
      { transaction },
    )
    const quick = await Campaign.create(
      {
        code: DEMO_QUICK_CAMPAIGN_CODE,
        name: 'Quick-look checks 2026',
        description: 'Bright comparison stars checked by one classifier, with the suggestion in view.',
        observatory: DEMO_OBSERVATORY,
        callsRequired: 1,
        blindReview: false,
      },
      { transaction },
    )
    const made: Record<string, User> = {}
    for (const p of DEMO_PEOPLE) {
      const user = await User.create({ email: p.email, name: p.name, role: p.role, passwordHash: await hashPassword(p.password, config.BCRYPT_ROUNDS), lastLoginAt: null }, { transaction })
      made[p.email] = user
      for (const c of [survey, quick]) await CampaignMember.create({ campaignId: c.id, userId: user.id }, { transaction })
    }
    // Both campaigns observe with the same spectrograph; each has its own record of it, as standards are grouped per campaign.
    for (const c of [survey, quick]) {
      await Instrument.create(
        {
          campaignId: c.id,
          name: DEMO_INSTRUMENT,
          resolutionFwhm: DEMO_RESOLUTION_FWHM,
          wlMin: DEMO_RANGE[0],
          wlMax: DEMO_RANGE[1],
          notes: 'Low-resolution long-slit spectrograph on the 1.1 m telescope; 2″ slit.',
          createdBy: made['lead@kestrel-ridge.example']!.id,
        },
        { transaction },
      )
    }
    return { survey, quick, users: made }
  })
  await seedDemoSpectra(sequelize, config, people)
  return true
}

interface SeedPeople {
  survey: Campaign
  quick: Campaign
  users: Record<string, User>
}

/** Submits the demo observations as the observer, measures them, and walks each to its state. */
async function seedDemoSpectra(sequelize: Sequelize, config: Config, people: SeedPeople): Promise<void> {
  const logger = createLogger('warn')
  // The demo's notifications go through the same mail path as the running server's.
  const smtp = config.MAIL_MODE === 'fake' ? await startFakeSmtp(0) : null
  const mailer = createMailer(smtp ? { ...config, SMTP_PORT: smtp.port } : config)
  const runner = new JobRunner({ sequelize, logger, threads: 1, inline: true })
  const ctx: AppContext = { config, sequelize, mailer, logger, jobs: runner, files: await createFileStore(config) }
  try {
    await ensureDefaultLibrary(sequelize)
    await runner.start()
    const observer = people.users['observer@kestrel-ridge.example']!
    const now = Date.now()
    const ids = new Map<DemoEntry, number>()
    for (const [k, entry] of DEMO_ENTRIES.entries()) {
      const obs = demoObservation(entry, 2026 + k)
      const date = new Date(now - (entry.daysAgo + 2) * DAY).toISOString().slice(0, 19)
      const bytes = entry.format === 'fits' ? demoFits(entry, obs, date) : demoText(entry, obs, date)
      const name = `${entry.objectName.replace(' ', '_').toLowerCase()}.${entry.format === 'fits' ? 'fits' : 'txt'}`
      const [result] = await submitFiles(ctx, observer, [{ name, bytes }], {
        campaignId: entry.fate === 'quick-look' ? people.quick.id : people.survey.id,
        wavelengthMedium: 'file',
        objectName: entry.objectName,
        ra: entry.ra,
        dec: entry.dec,
        vMag: entry.vMag,
        ...(entry.parallaxMas !== undefined ? { parallaxMas: entry.parallaxMas, parallaxErrorMas: 0.1 * entry.parallaxMas } : {}),
        resolutionFwhm: DEMO_RESOLUTION_FWHM,
        instrument: DEMO_INSTRUMENT,
        obsDate: `${date}Z`,
      })
      if (result?.outcome !== 'accepted') throw new Error(`demo spectrum ${entry.objectName} was not accepted: ${JSON.stringify(result)}`)
      ids.set(entry, result.spectrumId)
      await sequelize.query('UPDATE spectra SET created_at = ?, updated_at = ? WHERE id = ?', {
        replacements: [new Date(now - (entry.daysAgo + 1) * DAY), new Date(now - (entry.daysAgo + 1) * DAY), result.spectrumId],
      })
    }
    await runner.idle()
    await walkToStates(ctx, people, ids, now)
    await createRelease(people.users['lead@kestrel-ridge.example']!, {
      campaignId: people.survey.id,
      title: 'Northern Fields Survey 2026, early release',
      description: 'The spectra agreed or settled in the first weeks of the survey.',
    })
  } finally {
    await runner.stop()
    mailer.close()
    await smtp?.close()
  }
}

/** The demo's classifiers call what the standards show: the suggestion's type, a whole subtype, and its class (the brighter end of an intermediate one). */
interface DemoCall {
  code: number
  luminosityClass: string
}

function callOf(c: DemoCall, subtypes = 0): { spectralType: string; luminosityClass: string } {
  return { spectralType: spectralTypeLabel(Math.min(69, Math.max(0, Math.round(c.code) + subtypes))), luminosityClass: c.luminosityClass }
}

async function suggestedCall(spectrumId: number): Promise<DemoCall | null> {
  const s = await Suggestion.findOne({ where: { spectrumId, isCurrent: true } })
  return s ? { code: s.typeCode, luminosityClass: s.luminosityClass.split('-')[0]! } : null
}

const CLASS_STEP: Record<string, string> = { Ia: 'Ib', Iab: 'Ib', Ib: 'II', II: 'III', III: 'IV', IV: 'V', V: 'IV' }

async function walkToStates(ctx: AppContext, people: SeedPeople, ids: Map<DemoEntry, number>, now: number): Promise<void> {
  const first = people.users['classifier@kestrel-ridge.example']!
  const second = people.users['classifier2@kestrel-ridge.example']!
  const lead = people.users['lead@kestrel-ridge.example']!
  const rand = seededRandom(42)
  const seconds = () => Math.round(25 + 150 * rand())
  const at = (entry: DemoEntry, hours: number) => new Date(now - entry.daysAgo * DAY + hours * 3_600_000)
  const call = (user: User, id: number, when: Date, type: { spectralType: string; luminosityClass: string } | 'accept') =>
    recordCall(ctx, user, id, { ...(type === 'accept' ? {} : type), notes: '', confidence: 2 + Math.round(rand()), acceptedSuggestion: type === 'accept', secondsSpent: seconds() }, when)

  for (const [entry, id] of ids) {
    const spectrum = await Spectrum.findByPk(id)
    if (spectrum?.status !== 'suggested') continue
    const suggested = await suggestedCall(id)
    if (!suggested) continue
    const truth = callOf(suggested)
    switch (entry.fate) {
      case 'suggested':
        break
      case 'one-call':
        await call(first, id, at(entry, 2), truth)
        break
      case 'agreed':
        await call(first, id, at(entry, 2), truth)
        // The second classifier tends to call a little later types, which the audit shows.
        await call(second, id, at(entry, 5), callOf(suggested, rand() < 0.5 ? 1 : 0))
        break
      case 'disputed':
      case 'settled': {
        await call(first, id, at(entry, 2), truth)
        const cls = suggested.luminosityClass
        await call(second, id, at(entry, 6), { spectralType: callOf(suggested, 4).spectralType, luminosityClass: CLASS_STEP[cls] ?? cls })
        if (entry.fate === 'settled') {
          const dispute = await Dispute.findOne({ where: { spectrumId: id } })
          if (dispute) {
            const note =
              truth.spectralType.startsWith('K') || truth.spectralType.startsWith('M')
                ? 'Compared the TiO band depths and Ca I 4226 with the standards; the first call stands.'
                : 'Checked He I 4471 against Mg II 4481 and the Balmer wings with the standards; the first call stands.'
            await settleDispute(ctx, lead, dispute.id, { ...truth, note }, at(entry, 30))
          }
        }
        break
      }
      case 'quick-look':
        await call(first, id, at(entry, 1), 'accept')
        break
    }
  }
}
