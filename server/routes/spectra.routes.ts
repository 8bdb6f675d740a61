import { pipeline } from 'node:stream/promises'
import { spectraApi } from '../../shared/api/spectra'
import { statusApi } from '../../shared/api/status'
import type { AppContext } from '../context'
import { sendSeries } from '../lib/series'
import { boundedUpload } from '../middleware/body-limit'
import { multipartToDisk, uploadBudget, uploadSlots } from '../middleware/upload'
import { getPreparedSeries, measurementsOf, requeueSpectrum } from '../services/measurements.service'
import { liveStatus } from '../services/status.service'
import { visibleSuggestionsOf } from '../services/suggestions.service'
import { getRawFile, getSpectrumDetail, getSpectrumSeries, knownFiles, listSpectra, submitFiles, updateSpectrumMetadata, withdrawSpectrum } from '../services/spectra.service'
import { SUBMITTERS, route } from './route'

export function spectraRoutes(ctx: AppContext) {
  const budget = uploadBudget(ctx.config.UPLOAD_BYTES_PER_MINUTE, ctx.config.UPLOAD_FILES_PER_MINUTE)
  return [
    route(statusApi.get, { access: 'signed-in', handler: ({ params, user }) => liveStatus(user, params.id) }),
    route(spectraApi.submit, {
      access: SUBMITTERS,
      before: [
        boundedUpload(ctx.config.UPLOAD_MAX_REQUEST_BYTES),
        budget.before,
        uploadSlots(ctx.config.UPLOADS_PER_USER, ctx.config.UPLOADS_TOTAL),
        multipartToDisk(ctx.files.incomingDir, ctx.config),
        budget.countFiles,
      ],
      handler: async ({ body, user }, { req, res }) => {
        const files = ((req.files as Express.Multer.File[] | undefined) ?? []).map((f) => ({ name: Buffer.from(f.originalname, 'latin1').toString('utf8'), path: f.path }))
        const results = await submitFiles(ctx, user, files, body)
        const accepted = results.filter((r) => r.outcome === 'accepted').length
        if (files.length === 0) res.status(422)
        return {
          results,
          accepted,
          refused: results.length - accepted,
          ...(files.length === 0 ? { error: { code: 'no_files', message: 'Choose at least one file.', details: null } } : {}),
        }
      },
    }),
    route(spectraApi.known, { access: SUBMITTERS, handler: ({ body, user }) => knownFiles(user, body) }),
    route(spectraApi.list, { access: 'signed-in', handler: ({ query, user }) => listSpectra(user, query) }),
    route(spectraApi.get, {
      access: 'signed-in',
      handler: async ({ params, user }) => {
        const spectrum = await getSpectrumDetail(user, params.id)
        const [measurements, suggestions] = await Promise.all([measurementsOf(spectrum.id), visibleSuggestionsOf(user, spectrum.id)])
        return { spectrum, measurements, suggestions }
      },
    }),
    route(spectraApi.process, {
      access: SUBMITTERS,
      handler: async ({ params, user }) => {
        await requeueSpectrum(ctx, user, params.id)
        return { message: 'The spectrum is queued for processing.' }
      },
    }),
    route(spectraApi.prepared, { access: 'signed-in', handler: async ({ params, query, user }, { res }) => sendSeries(res, await getPreparedSeries(user, params.id, query)) }),
    route(spectraApi.update, { access: SUBMITTERS, handler: async ({ params, body, user }) => ({ spectrum: await updateSpectrumMetadata(ctx, user, params.id, body) }) }),
    route(spectraApi.withdraw, { access: SUBMITTERS, handler: ({ params, user }) => withdrawSpectrum(ctx, user, params.id) }),
    route(spectraApi.data, { access: 'signed-in', handler: async ({ params, query, user }, { res }) => sendSeries(res, await getSpectrumSeries(user, params.id, query)) }),
    route(spectraApi.file, {
      access: 'signed-in',
      handler: async ({ params, user }, { res }) => {
        const file = await getRawFile(ctx, user, params.id)
        res.attachment(file.name)
        res.set('content-type', 'application/octet-stream')
        res.set('content-length', String(file.size))
        await pipeline(file.body, res)
      },
    }),
  ]
}
