import type { Response } from 'express'

/** Sends float32 columns as one binary body, with their layout as JSON in `x-series-layout`. */
export function sendSeries(res: Response, series: { layout: object; body: Buffer }): void {
  res.set('content-type', 'application/octet-stream')
  res.set('x-series-layout', JSON.stringify(series.layout))
  res.send(series.body)
}
