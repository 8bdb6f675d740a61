import { decodeSeries, parseSeriesLayout, type DecodedSeries } from '@/lib/series'
import { ApiError, getBinary, type RequestOptions } from './http'

/** A binary series (float32 columns with an `x-series-layout` header), decoded; a body that does not fit its layout is an ApiError `bad_series`. */
export async function getSeries(path: string, options: Pick<RequestOptions, 'query' | 'signal'> = {}): Promise<DecodedSeries> {
  const response = await getBinary(path, options)
  const layoutHeader = response.headers.get('x-series-layout')
  const body = await response.arrayBuffer()
  try {
    return decodeSeries(body, parseSeriesLayout(layoutHeader))
  } catch (e) {
    throw new ApiError(0, 'bad_series', e instanceof Error ? e.message : String(e))
  }
}
