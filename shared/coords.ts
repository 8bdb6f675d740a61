/** Parsing of equatorial coordinates as observers type them: degrees or sexagesimal. */

export type CoordResult = { ok: true; degrees: number } | { ok: false; message: string }

const SEXAGESIMAL = /^([+-])?\s*(\d{1,3})(?:[:\sh°]+)(\d{1,2})(?:[:\sm'′]+)(\d{1,2}(?:\.\d*)?)\s*[s"″]?$/i

function parseSexagesimal(text: string): { sign: number; a: number; b: number; c: number } | null {
  const m = SEXAGESIMAL.exec(text.trim())
  if (!m) return null
  return { sign: m[1] === '-' ? -1 : 1, a: Number(m[2]), b: Number(m[3]), c: Number(m[4]) }
}

/** Right ascension: "14:03:12.5", "14h03m12.5s", "14 03 12.5" (hours) or decimal degrees "210.802". */
export function parseRightAscension(text: string): CoordResult {
  const t = text.trim()
  if (t === '') return { ok: false, message: 'is empty' }
  if (/^[+-]?\d+(\.\d*)?$/.test(t)) {
    const deg = Number(t)
    return deg >= 0 && deg < 360 ? { ok: true, degrees: deg } : { ok: false, message: 'must be between 0 and 360 degrees' }
  }
  const s = parseSexagesimal(t)
  if (!s || s.sign < 0) return { ok: false, message: 'must be hours:minutes:seconds or decimal degrees' }
  if (s.a >= 24 || s.b >= 60 || s.c >= 60) return { ok: false, message: 'hours must be below 24, minutes and seconds below 60' }
  return { ok: true, degrees: 15 * (s.a + s.b / 60 + s.c / 3600) }
}

/** Declination: "-12:30:05", "-12°30′05″", "-12 30 05" or decimal degrees "-12.5". */
export function parseDeclination(text: string): CoordResult {
  const t = text.trim()
  if (t === '') return { ok: false, message: 'is empty' }
  if (/^[+-]?\d+(\.\d*)?$/.test(t)) {
    const deg = Number(t)
    return Math.abs(deg) <= 90 ? { ok: true, degrees: deg } : { ok: false, message: 'must be between −90 and +90 degrees' }
  }
  const s = parseSexagesimal(t)
  if (!s) return { ok: false, message: 'must be degrees:arcminutes:arcseconds or decimal degrees' }
  if (s.b >= 60 || s.c >= 60) return { ok: false, message: 'arcminutes and arcseconds must be below 60' }
  const deg = s.a + s.b / 60 + s.c / 3600
  if (deg > 90) return { ok: false, message: 'must be between −90 and +90 degrees' }
  return { ok: true, degrees: s.sign * deg }
}

const pad = (n: number, width: number, digits = 0) => n.toFixed(digits).padStart(width + (digits ? digits + 1 : 0), '0')

/** Degrees → "hh:mm:ss.ss". */
export function formatRightAscension(degrees: number): string {
  let total = Math.round((degrees / 15) * 3600 * 100) / 100
  total = ((total % 86400) + 86400) % 86400
  const h = Math.floor(total / 3600)
  const m = Math.floor((total - h * 3600) / 60)
  const s = total - h * 3600 - m * 60
  return `${pad(h, 2)}:${pad(m, 2)}:${pad(s, 2, 2)}`
}

/** Degrees → "±dd:mm:ss.s". */
export function formatDeclination(degrees: number): string {
  const sign = degrees < 0 ? '-' : '+'
  const total = Math.round(Math.abs(degrees) * 3600 * 10) / 10
  const d = Math.floor(total / 3600)
  const m = Math.floor((total - d * 3600) / 60)
  const s = total - d * 3600 - m * 60
  return `${sign}${pad(d, 2)}:${pad(m, 2)}:${pad(s, 2, 1)}`
}
