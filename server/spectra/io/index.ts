export { readSpectrum, READERS, fitsReader } from './read'
export { textReader } from './text'
export { unpackZip, gunzipBounded, isGzip, type ZipEntry, type ZipLimits, type UnzipResult, type ZipRefusalCode } from './zip'
export {
  REFUSAL_CODES,
  DEFAULT_READ_OPTIONS,
  toSpectrum1D,
  type ReadOptions,
  type ReadResult,
  type ReadSuccess,
  type ReadRefusal,
  type ReadMeta,
  type ReadSpectrum,
  type RefusalCode,
  type SpectrumFormat,
  type SpectrumHdu,
  type HeaderValue,
} from './types'
