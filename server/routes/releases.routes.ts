import { currentUser } from '../middleware/auth'
import { idParams } from '../schemas/common'
import { createReleaseBody, downloadQuery, listReleasesQuery, previewReleaseQuery, releaseRowsQuery, supersedeReleaseBody } from '../schemas/releases.schemas'
import { derivedFor } from '../services/derived.service'
import { suggestionHiddenFrom } from '../services/suggestions.service'
import { createRelease, downloadRelease, getRelease, listReleases, previewRelease, supersedeRelease } from '../services/releases.service'
import { findVisibleSpectrum } from '../services/spectra.service'
import { LEAD, defineRoutes } from './route'

export function releaseRoutes() {
  return defineRoutes([
    {
      method: 'get',
      path: '/releases',
      access: 'signed-in',
      schema: { query: listReleasesQuery },
      handler: async (req, res) => {
        res.json({ releases: await listReleases(currentUser(req), { campaignId: res.locals.query.campaign }) })
      },
    },
    {
      method: 'post',
      path: '/releases',
      access: LEAD,
      schema: { body: createReleaseBody },
      handler: async (req, res) => {
        res.status(201).json({ release: await createRelease(currentUser(req), res.locals.body) })
      },
    },
    {
      method: 'get',
      path: '/releases/preview',
      access: LEAD,
      schema: { query: previewReleaseQuery },
      handler: async (_req, res) => {
        res.json({ preview: await previewRelease(res.locals.query.campaign, res.locals.query.includeDecider) })
      },
    },
    {
      method: 'get',
      path: '/releases/:id',
      access: 'signed-in',
      schema: { params: idParams, query: releaseRowsQuery },
      handler: async (req, res) => {
        res.json(await getRelease(currentUser(req), res.locals.params.id, res.locals.query))
      },
    },
    {
      method: 'post',
      path: '/releases/:id/supersede',
      access: LEAD,
      schema: { params: idParams, body: supersedeReleaseBody },
      handler: async (req, res) => {
        res.status(201).json({ release: await supersedeRelease(currentUser(req), res.locals.params.id, res.locals.body) })
      },
    },
    {
      method: 'get',
      path: '/releases/:id/download',
      access: 'signed-in',
      schema: { params: idParams, query: downloadQuery },
      handler: async (req, res) => {
        const file = await downloadRelease(currentUser(req), res.locals.params.id, res.locals.query.format)
        res.attachment(file.fileName)
        res.set('content-type', file.contentType)
        res.send(file.body)
      },
    },
  ])
}

/** Derived physical parameters belong with the catalogue columns they feed. */
export function derivedRoutes() {
  return defineRoutes([
    {
      method: 'get',
      path: '/spectra/:id/derived',
      access: 'signed-in',
      schema: { params: idParams },
      handler: async (req, res) => {
        const user = currentUser(req)
        const spectrum = await findVisibleSpectrum(user, res.locals.params.id)
        const hidden = await suggestionHiddenFrom(user, spectrum.id)
        res.json({ derived: await derivedFor(spectrum.id, spectrum, { suggestion: !hidden }) })
      },
    },
  ])
}
