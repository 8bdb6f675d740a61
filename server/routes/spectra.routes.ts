import { pipeline } from 'node:stream/promises'
import type { SpectrumPage } from '../../shared/api/spectra'
import type { AppContext } from '../context'
import { sendSeries } from '../lib/series'
import { currentUser } from '../middleware/auth'
import { boundedUpload } from '../middleware/body-limit'
import { multipartToDisk, uploadBudget, uploadSlots } from '../middleware/upload'
import { idParams } from '../schemas/common'
import { dataQuery, listQuery, spectrumCorrection, submitBody } from '../schemas/spectra.schemas'
import { getPreparedSeries, measurementsOf, requeueSpectrum } from '../services/measurements.service'
import { liveStatus } from '../services/status.service'
import { visibleSuggestionsOf } from '../services/suggestions.service'
import { getRawFile, getSpectrumDetail, getSpectrumSeries, listSpectra, submitFiles, updateSpectrumMetadata, withdrawSpectrum } from '../services/spectra.service'
import { SUBMITTERS, defineRoutes } from './route'

export function spectraRoutes(ctx: AppContext) {
  const budget = uploadBudget(ctx.config.UPLOAD_BYTES_PER_MINUTE, ctx.config.UPLOAD_FILES_PER_MINUTE)
  return defineRoutes([
    {
      method: 'get',
      path: '/spectra/:id/status',
      access: 'signed-in',
      schema: { params: idParams },
      handler: async (req, res) => {
        res.json(await liveStatus(currentUser(req), res.locals.params.id))
      },
    },
    {
      method: 'post',
      path: '/spectra',
      access: SUBMITTERS,
      before: [
        boundedUpload(ctx.config.UPLOAD_MAX_REQUEST_BYTES),
        budget.before,
        uploadSlots(ctx.config.UPLOADS_PER_USER, ctx.config.UPLOADS_TOTAL),
        multipartToDisk(ctx.files.incomingDir, ctx.config),
        budget.countFiles,
      ],
      schema: { body: submitBody },
      handler: async (req, res) => {
        const files = ((req.files as Express.Multer.File[] | undefined) ?? []).map((f) => ({ name: Buffer.from(f.originalname, 'latin1').toString('utf8'), path: f.path }))
        const results = await submitFiles(ctx, currentUser(req), files, res.locals.body)
        const accepted = results.filter((r) => r.outcome === 'accepted').length
        res.status(files.length === 0 ? 422 : 200).json({
          results,
          accepted,
          refused: results.length - accepted,
          ...(files.length === 0 ? { error: { code: 'no_files', message: 'Choose at least one file.', details: null } } : {}),
        })
      },
    },
    {
      method: 'get',
      path: '/spectra',
      access: 'signed-in',
      schema: { query: listQuery },
      handler: async (req, res) => {
        res.json(await listSpectra(currentUser(req), res.locals.query))
      },
    },
    {
      method: 'get',
      path: '/spectra/:id',
      access: 'signed-in',
      schema: { params: idParams },
      handler: async (req, res) => {
        const user = currentUser(req)
        const spectrum = await getSpectrumDetail(user, res.locals.params.id)
        const [measurements, suggestions] = await Promise.all([measurementsOf(spectrum.id), visibleSuggestionsOf(user, spectrum.id)])
        res.json({ spectrum, measurements, suggestions } satisfies SpectrumPage)
      },
    },
    {
      method: 'post',
      path: '/spectra/:id/process',
      access: SUBMITTERS,
      schema: { params: idParams },
      handler: async (req, res) => {
        await requeueSpectrum(ctx, currentUser(req), res.locals.params.id)
        res.status(202).json({ message: 'The spectrum is queued for processing.' })
      },
    },
    {
      method: 'get',
      path: '/spectra/:id/prepared',
      access: 'signed-in',
      schema: { params: idParams, query: dataQuery },
      handler: async (req, res) => {
        sendSeries(res, await getPreparedSeries(currentUser(req), res.locals.params.id, res.locals.query))
      },
    },
    {
      method: 'patch',
      path: '/spectra/:id',
      access: SUBMITTERS,
      schema: { params: idParams, body: spectrumCorrection },
      handler: async (req, res) => {
        res.json({ spectrum: await updateSpectrumMetadata(ctx, currentUser(req), res.locals.params.id, res.locals.body) })
      },
    },
    {
      method: 'delete',
      path: '/spectra/:id',
      access: SUBMITTERS,
      schema: { params: idParams },
      handler: async (req, res) => {
        res.json(await withdrawSpectrum(ctx, currentUser(req), res.locals.params.id))
      },
    },
    {
      method: 'get',
      path: '/spectra/:id/data',
      access: 'signed-in',
      schema: { params: idParams, query: dataQuery },
      handler: async (req, res) => {
        sendSeries(res, await getSpectrumSeries(currentUser(req), res.locals.params.id, res.locals.query))
      },
    },
    {
      method: 'get',
      path: '/spectra/:id/file',
      access: 'signed-in',
      schema: { params: idParams },
      handler: async (req, res) => {
        const file = await getRawFile(ctx, currentUser(req), res.locals.params.id)
        res.attachment(file.name)
        res.set('content-type', 'application/octet-stream')
        res.set('content-length', String(file.size))
        await pipeline(file.body, res)
      },
    },
  ])
}
