/** One-dimensional spectrum: wavelengths in Å (air, ascending), flux in any linear unit. */
export interface Spectrum1D {
  wavelength: Float64Array
  flux: Float64Array
  /** 1σ flux error, same unit as flux; absent when the file carries none. */
  error?: Float64Array
  /** 1 where a pixel is unusable (non-finite, flagged); absent when every pixel is good. */
  mask?: Uint8Array
}
