import { derivedApi } from '../../shared/api/derived'
import { releasesApi } from '../../shared/api/releases'
import { derivedFor } from '../services/derived.service'
import { createRelease, downloadRelease, getRelease, listReleases, previewRelease, supersedeRelease } from '../services/releases.service'
import { findVisibleSpectrum } from '../services/visibility'
import { suggestionHiddenFrom } from '../services/suggestions.service'
import { LEAD, route } from './route'

export function releaseRoutes() {
  return [
    route(releasesApi.list, { access: 'signed-in', handler: async ({ query, user }) => ({ releases: await listReleases(user, { campaignId: query.campaign }) }) }),
    route(releasesApi.freeze, { access: LEAD, handler: async ({ body, user }) => ({ release: await createRelease(user, body) }) }),
    route(releasesApi.preview, { access: LEAD, handler: async ({ query }) => ({ preview: await previewRelease(query.campaign, query.includeDecider) }) }),
    route(releasesApi.get, { access: 'signed-in', handler: ({ params, query, user }) => getRelease(user, params.id, query) }),
    route(releasesApi.supersede, { access: LEAD, handler: async ({ params, body, user }) => ({ release: await supersedeRelease(user, params.id, body) }) }),
    route(releasesApi.download, {
      access: 'signed-in',
      handler: async ({ params, query, user }, { res }) => {
        const file = await downloadRelease(user, params.id, query.format)
        res.attachment(file.fileName)
        res.set('content-type', file.contentType)
        res.send(file.body)
      },
    }),
  ]
}

/** Derived physical parameters belong with the catalogue columns they feed. */
export function derivedRoutes() {
  return [
    route(derivedApi.get, {
      access: 'signed-in',
      handler: async ({ params, user }) => {
        const spectrum = await findVisibleSpectrum(user, params.id)
        const hidden = await suggestionHiddenFrom(user, spectrum.id)
        return { derived: await derivedFor(spectrum.id, spectrum, { suggestion: !hidden }) }
      },
    }),
  ]
}
