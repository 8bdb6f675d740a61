/**
 * Refractive index of standard air at vacuum wavelength λ (Å), by the IAU-adopted formula of
 * Morton (2000, ApJS 130, 403, eq. 8), which follows Ciddor (1996, Appl. Opt. 35, 1566).
 * Valid for λ > 2000 Å.
 */
export function airRefractiveIndex(vacuumWavelength: number): number {
  const s = 1e4 / vacuumWavelength
  const s2 = s * s
  return 1 + 8.34254e-5 + 2.406147e-2 / (130 - s2) + 1.5998e-4 / (38.9 - s2)
}

/** Vacuum → air wavelength (Å), Morton (2000) / Ciddor (1996). Wavelengths below 2000 Å are returned unchanged, as is the convention. */
export function vacuumToAir(vacuumWavelength: number): number {
  if (vacuumWavelength < 2000) return vacuumWavelength
  return vacuumWavelength / airRefractiveIndex(vacuumWavelength)
}

/**
 * Air → vacuum wavelength (Å): inverts {@link vacuumToAir} by fixed-point iteration
 * (three steps reach 1e-9 Å in the optical).
 */
export function airToVacuum(airWavelength: number): number {
  if (airWavelength < 2000) return airWavelength
  let vac = airWavelength
  for (let k = 0; k < 4; k++) vac = airWavelength * airRefractiveIndex(vac)
  return vac
}

/** Converts an ascending array of vacuum wavelengths (Å) to air; returns a new array. */
export function vacuumToAirArray(vacuum: Float64Array): Float64Array {
  const out = new Float64Array(vacuum.length)
  for (let i = 0; i < vacuum.length; i++) out[i] = vacuumToAir(vacuum[i]!)
  return out
}
