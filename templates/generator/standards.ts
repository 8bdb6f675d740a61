/**
 * Which standards the default model library holds, and the microturbulence of each class.
 */
import { LUMINOSITY_CLASSES, effectiveTemperature, isCalibrated, spectralTypeFromCode, surfaceGravity, typeCode, type LuminosityClass, type SpectralLetter } from '../../shared/calibration'

/** Spectral types of the grid: about one subtype apart, O5–M5. */
// prettier-ignore
export const MODEL_TYPES: readonly string[] = [
  'O5', 'O7', 'O9', 'B0', 'B1', 'B2', 'B3', 'B5', 'B7', 'B8', 'B9', 'A0', 'A1', 'A2', 'A3', 'A5', 'A7',
  'F0', 'F2', 'F5', 'F8', 'G0', 'G2', 'G5', 'G8', 'K0', 'K1', 'K2', 'K3', 'K4', 'K5',
  'M0', 'M1', 'M2', 'M3', 'M4', 'M5',
]

/**
 * Microturbulence ξ per class, km s⁻¹: about 2 km/s in dwarfs rising to 5–10 km/s in
 * supergiants (Gray 2005, ch. 17; common practice).
 */
export const MICROTURBULENCE: Readonly<Record<LuminosityClass, number>> = {
  V: 2,
  IV: 2,
  III: 2.5,
  II: 3.5,
  Ib: 5,
  Ia: 8,
}

/** One planned standard. */
export interface PlannedStandard {
  id: string
  spectralType: string
  letter: SpectralLetter
  subtype: number
  typeCode: number
  luminosityClass: LuminosityClass
  teff: number
  logg: number
  vmicro: number
}

/**
 * The grid in manifest order (type, then class from V to Ia). Skipped: O IV (no calibration in
 * use; O-star scales give V, III and I) and class IV from K4 on (the subgiant table ends at K3).
 */
export function plannedStandards(): PlannedStandard[] {
  const out: PlannedStandard[] = []
  for (const label of MODEL_TYPES) {
    const letter = label[0] as SpectralLetter
    const subtype = Number(label.slice(1))
    const code = typeCode(letter, subtype)
    for (const luminosityClass of [...LUMINOSITY_CLASSES].reverse()) {
      if (letter === 'O' && luminosityClass === 'IV') continue
      if (!isCalibrated(code, luminosityClass)) continue
      const parts = spectralTypeFromCode(code)
      out.push({
        id: `${label}-${luminosityClass}`,
        spectralType: `${label} ${luminosityClass}`,
        letter: parts.letter,
        subtype: parts.subtype,
        typeCode: code,
        luminosityClass,
        teff: Math.round(effectiveTemperature(code, luminosityClass)),
        logg: Math.round(surfaceGravity(code, luminosityClass) * 1000) / 1000,
        vmicro: MICROTURBULENCE[luminosityClass],
      })
    }
  }
  return out
}
