/**
 * Wavelength units and air/vacuum words, shared by the FITS and text readers.
 */

/** Å per unit, keyed by normalised spelling (lower case, no spaces, µ/μ → u). */
// prettier-ignore
const ANGSTROM_PER_UNIT: Record<string, number> = {
  angstrom: 1, angstroms: 1, angstroem: 1, angstrem: 1, ang: 1, angs: 1, a: 1, aa: 1, 'å': 1, 'Å': 1,
  '0.1nm': 1, '1e-10m': 1, '10**-10m': 1,
  nm: 10, nanometer: 10,  nanometers: 10, nanometre: 10, nanometres: 10,
  um: 1e4, micron: 1e4, microns: 1e4, micrometer: 1e4, micrometers: 1e4, micrometre: 1e4, micrometres: 1e4, mum: 1e4,
  mm: 1e7,
  cm: 1e8,
  m: 1e10, meter: 1e10, meters: 1e10, metre: 1e10, metres: 1e10,
}

function normaliseUnit(unit: string): string {
  return unit.trim().replace(/[µμ]/g, 'u').replace(/\s+/g, '').toLowerCase()
}

/**
 * Å per unit for a wavelength unit string as files spell it (FITS CUNIT/TUNIT, IRAF
 * `units=angstroms`, text headers). Returns undefined for an unknown unit.
 * Spellings: FITS Standard 4.0 §4.3 (Angstrom, nm, um, m) plus common practice (angstroms, micron, AA, Å).
 */
export function angstromsPerUnit(unit: string): number | undefined {
  const key = normaliseUnit(unit)
  // Å is upper-case only and toLowerCase() keeps it; check both spellings.
  return ANGSTROM_PER_UNIT[key] ?? ANGSTROM_PER_UNIT[unit.trim()]
}

/** True for a unit string that says nothing (empty, "none", "pixel"). */
export function isBlankUnit(unit: string | undefined): boolean {
  if (unit === undefined) return true
  const key = normaliseUnit(unit)
  return key === '' || key === 'none' || key === 'unknown'
}

/**
 * Reads "vacuum" or "air" from free text (a comment, a unit, a HISTORY line). A conversion
 * ("converted from air to vacuum", "air-to-vacuum") names the medium the numbers are in last, so
 * that one counts. Returns undefined when the text says neither, or both without a conversion.
 */
export function vacuumFromText(text: string): boolean | undefined {
  const converted = /\b(?:convert|transform|shift)\w*\b[^.;]{0,60}?\bto\s+(air|vac\w*)\b/i.exec(text) ?? /\b(?:air|vac\w*)[\s-]+to[\s-]+(air|vac\w*)\b/i.exec(text)
  if (converted) return converted[1]!.toLowerCase().startsWith('vac')
  const vac = /\b(vac(uum)?|in vacuo)\b/i.test(text)
  const air = /\bair\b/i.test(text)
  if (vac === air) return undefined
  return vac
}
