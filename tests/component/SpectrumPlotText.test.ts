import { describe, expect, it } from 'vitest'
import { formatFluxUnit } from '@/lib/fluxUnit'
import { ewText, fwhmFlag, lineReasonText, resolutionFwhm, signFlag } from '@/lib/lineTable'
import { fmtSnr } from '@/lib/spectrumFormat'
import { familiesForType, regionsWithin } from '@/lib/spectrumPlot'

describe('formatFluxUnit', () => {
  it('writes the header’s flux unit as a unit, whatever its spelling', () => {
    expect(formatFluxUnit('erg/cm2/s/A')).toBe('erg s⁻¹ cm⁻² Å⁻¹')
    expect(formatFluxUnit('ERG/CM2/S/A')).toBe('erg s⁻¹ cm⁻² Å⁻¹')
    expect(formatFluxUnit('10**-17 erg s^-1 cm^-2 Angstrom^-1')).toBe('10⁻¹⁷ erg s⁻¹ cm⁻² Å⁻¹')
    expect(formatFluxUnit('1e-17 erg/s/cm2/AA')).toBe('10⁻¹⁷ erg s⁻¹ cm⁻² Å⁻¹')
    expect(formatFluxUnit('W.m-2.nm-1')).toBe('W m⁻² nm⁻¹')
    expect(formatFluxUnit('ADU')).toBe('ADU')
  })

  it('quotes what it cannot read rather than guessing, and gives nothing for no unit', () => {
    expect(formatFluxUnit('FLAM')).toBe('“FLAM”')
    expect(formatFluxUnit('')).toBeNull()
    expect(formatFluxUnit(null)).toBeNull()
  })
})

describe('line table text', () => {
  it('never writes ± 0.00: the value is rounded to its error’s two significant figures', () => {
    expect(ewText(1.2345, 0.0042)).toBe('1.2345 ± 0.0042')
    expect(ewText(8.91, 0.31)).toBe('8.91 ± 0.31')
    expect(ewText(12.3, 0)).toBe('12.30')
    expect(ewText(null, 0.1)).toBe('—')
  })

  it('says "outside the observed range" instead of quoting a wholly masked side band', () => {
    expect(lineReasonText('masked-pixels: 100 % of the blue side band is masked', 3889, [3900, 5000])).toBe('outside the observed range')
    expect(lineReasonText('masked-pixels: 100 % of the red side band is masked', 4500, [3900, 5000])).toBe('outside the observed range')
    expect(lineReasonText('outside-coverage: needs 3800–3900 Å', 3850, null)).toBe('outside the observed range')
    expect(lineReasonText('masked-pixels: 35 % of the window is masked', 4500, [3900, 5000])).toContain('masked pixels: see the note below')
  })

  it('flags a FWHM narrower than the resolution (λ/R, or two pixels without R)', () => {
    expect(resolutionFwhm(4500, 2000, 1)).toBeCloseTo(2.25, 12)
    expect(resolutionFwhm(4500, null, 0.8)).toBeCloseTo(1.6, 12)
    expect(fwhmFlag(1.5, 2.25)).toContain('narrower than the resolution')
    expect(fwhmFlag(2.1, 2.25)).toBeNull()
    expect(fwhmFlag(3, null)).toBeNull()
  })

  it('flags an EW whose sign disagrees with the depth (absorption is EW > 0, depth > 0)', () => {
    expect(signFlag(1.2, 0.3)).toBeNull()
    expect(signFlag(-0.4, -0.1)).toBeNull()
    expect(signFlag(-0.4, 0.2)).toContain('disagree')
  })
})

describe('fmtSnr', () => {
  it('gives whole numbers from 20, one decimal below, and a cap for noiseless data', () => {
    expect(fmtSnr(84.25)).toBe('84')
    expect(fmtSnr(8.46)).toBe('8.5')
    expect(fmtSnr(14879095573490972)).toBe('> 1000')
    expect(fmtSnr(null)).toBe('—')
  })
})

describe('plot defaults', () => {
  it('labels the line families that matter for the suggested type', () => {
    expect(familiesForType(5)).toEqual(['balmer', 'helium'])
    expect(familiesForType(20)).toEqual(['balmer', 'metal'])
    expect(familiesForType(42)).toEqual(['balmer', 'metal', 'band'])
    expect(familiesForType(62)).toEqual(['metal', 'band'])
    expect(familiesForType(null)).toEqual(['balmer', 'helium', 'metal', 'band'])
  })

  it('offers the named regions the spectrum covers', () => {
    expect(regionsWithin(3850, 5000).map((r) => r.id)).toEqual(['violet', 'delta', 'gamma', 'helium', 'beta'])
    expect(regionsWithin(4300, 4600).map((r) => r.id)).toEqual(['helium'])
    // The wider region cool stars are matched over adds the red: Na D and Hα.
    expect(regionsWithin(3850, 6800).map((r) => r.id)).toEqual(['violet', 'delta', 'gamma', 'helium', 'beta', 'green', 'yellow', 'alpha'])
  })
})

describe('review series', () => {
  it('asks for every pixel of the library grid, so zoomed plots never show decimation steps', async () => {
    const { LIBRARY_GRID_POINTS } = await import('@/api/reviewSeries')
    const { DEFAULT_GRID } = await import('@shared/grid')
    expect(LIBRARY_GRID_POINTS).toBeGreaterThanOrEqual(DEFAULT_GRID.length)
  })
})
