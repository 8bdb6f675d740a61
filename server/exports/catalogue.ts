import type { ExportColumn } from './table'

const F = (width: number, decimals: number) => ({ notation: 'F' as const, width, decimals })
const E = (width: number, decimals: number) => ({ notation: 'E' as const, width, decimals })

/**
 * The columns of a catalogue release, in file order. Every writer reads this table; a release
 * stores a copy of it beside its rows, so a later change here never alters a frozen release.
 */
// prettier-ignore
export const CATALOGUE_COLUMNS: readonly ExportColumn[] = [
  { name: 'SpId', description: 'Lineweight spectrum identifier', unit: '', ucd: 'meta.id;meta.main', type: 'int', width: 7, nullable: false },
  { name: 'Object', description: 'Object name as submitted', unit: '', ucd: 'meta.id', type: 'string', width: 6, nullable: false },
  { name: 'RAdeg', description: 'Right ascension (ICRS)', unit: 'deg', ucd: 'pos.eq.ra;meta.main', type: 'double', format: F(10, 6), nullable: true },
  { name: 'DEdeg', description: 'Declination (ICRS)', unit: 'deg', ucd: 'pos.eq.dec;meta.main', type: 'double', format: F(10, 6), nullable: true },
  { name: 'ObsDate', description: 'Start of the observation (UTC, ISO 8601)', unit: '', ucd: 'time.epoch;obs', type: 'datetime', nullable: true },
  { name: 'MJD', description: 'Start of the observation as a Modified Julian Date (UTC)', unit: 'd', ucd: 'time.epoch', type: 'double', format: F(12, 5), nullable: true },
  { name: 'SpType', description: 'MK spectral type and luminosity class, with peculiarity notes', unit: '', ucd: 'src.spType', type: 'string', width: 6, nullable: false },
  { name: 'TypeCode', description: 'Numeric spectral type (O0 = 0, B0 = 10, A0 = 20, F0 = 30, G0 = 40, K0 = 50, M0 = 60)', unit: '', ucd: 'meta.code.class;src.spType', type: 'double', format: F(5, 1), nullable: true },
  { name: 'LumClass', description: 'MK luminosity class', unit: '', ucd: 'src.class.luminosity', type: 'string', width: 4, nullable: true },
  { name: 'ClassCode', description: 'Numeric luminosity class (Ia = 1, Ib = 2, II = 3, III = 4, IV = 5, V = 6)', unit: '', ucd: 'meta.code.class;src.class.luminosity', type: 'double', format: F(5, 2), nullable: true },
  { name: 'e_TypeCode', description: 'Uncertainty of the spectral type, in subtypes', unit: '', ucd: 'stat.error;src.spType', type: 'double', format: F(4, 1), nullable: true },
  { name: 'e_ClassCode', description: 'Uncertainty of the luminosity class, in classes', unit: '', ucd: 'stat.error;src.class.luminosity', type: 'double', format: F(4, 1), nullable: true },
  { name: 'Pec', description: 'Peculiarity notes of the spectral type (e, n, p, Si, ...)', unit: '', ucd: 'meta.note;src.spType', type: 'string', width: 3, nullable: true },
  { name: 'SugType', description: 'Type and class the pipeline suggested, beside the decided SpType', unit: '', ucd: 'src.spType;meta.modelled', type: 'string', width: 7, nullable: true },
  { name: 'Decision', description: 'How the classification was decided: single call, consensus of N calls, accepted suggestion, or settled by a lead', unit: '', ucd: 'meta.code', type: 'string', width: 8, nullable: false },
  { name: 'DecidedBy', description: 'Who decided the classification (the settling lead, or the classifiers of a consensus)', unit: '', ucd: 'meta.curation', type: 'string', width: 9, nullable: true },
  { name: 'Ncalls', description: 'Number of independent classifier calls', unit: '', ucd: 'meta.number', type: 'int', width: 3, nullable: false },
  { name: 'Agreement', description: 'How the calls agreed: exact, within (the campaign tolerance), settled (they disagreed) or single (one call, nothing to compare)', unit: '', ucd: 'meta.code.qual', type: 'string', width: 7, nullable: true },
  { name: 'LibVer', description: 'Standards-library version of the suggestion', unit: '', ucd: 'meta.version;meta.dataset', type: 'string', width: 6, nullable: true },
  { name: 'PipeVer', description: 'Version of the processing pipeline that measured the spectrum', unit: '', ucd: 'meta.version', type: 'string', width: 7, nullable: true },
  { name: 'Instrument', description: 'Instrument or spectrograph as submitted', unit: '', ucd: 'meta.id;instr', type: 'string', width: 10, nullable: true },
  { name: 'ResPower', description: 'Resolving power R = lambda / FWHM of the spectrum, as submitted or read from the file', unit: '', ucd: 'spect.resolution', type: 'double', format: F(7, 0), nullable: true },
  { name: 'WlMin', description: 'Shortest wavelength of the observed spectrum (air)', unit: 'nm', ucd: 'em.wl;stat.min', type: 'double', format: F(8, 2), nullable: true },
  { name: 'WlMax', description: 'Longest wavelength of the observed spectrum (air)', unit: 'nm', ucd: 'em.wl;stat.max', type: 'double', format: F(8, 2), nullable: true },
  { name: 'FileName', description: 'Name of the file the spectrum was read from', unit: '', ucd: 'meta.id;meta.file', type: 'string', width: 8, nullable: true },
  { name: 'SNR', description: 'Signal-to-noise ratio per pixel (DER_SNR) in the classification region', unit: '', ucd: 'stat.snr', type: 'double', format: F(7, 1), nullable: true },
  { name: 'RV', description: 'Radial velocity from cross-correlation (not corrected to the heliocentre)', unit: 'km/s', ucd: 'spect.dopplerVeloc.opt', type: 'double', format: F(8, 1), nullable: true },
  { name: 'e_RV', description: 'Uncertainty of RV', unit: 'km/s', ucd: 'stat.error;spect.dopplerVeloc.opt', type: 'double', format: F(6, 1), nullable: true },
  { name: 'Vmag', description: 'Apparent V magnitude given by the observer', unit: 'mag', ucd: 'phot.mag;em.opt.V', type: 'double', format: F(6, 2), nullable: true },
  { name: 'EBV', description: 'Colour excess E(B-V) given by the observer', unit: 'mag', ucd: 'phot.color.excess', type: 'double', format: F(5, 2), nullable: true },
  { name: 'Plx', description: 'Trigonometric parallax given by the observer', unit: 'mas', ucd: 'pos.parallax', type: 'double', format: F(8, 3), nullable: true },
  { name: 'e_Plx', description: 'Uncertainty of Plx', unit: 'mas', ucd: 'stat.error;pos.parallax', type: 'double', format: F(7, 3), nullable: true },
  { name: 'Teff', description: 'Effective temperature from the type calibration (estimate, not a measurement)', unit: 'K', ucd: 'phys.temperature.effective', type: 'double', format: F(7, 0), nullable: true },
  { name: 'e_Teff', description: 'Uncertainty of Teff (classification and calibration scatter)', unit: 'K', ucd: 'stat.error;phys.temperature.effective', type: 'double', format: F(6, 0), nullable: true },
  { name: 'MV', description: 'Absolute V magnitude from the MK calibration (estimate)', unit: 'mag', ucd: 'phys.magAbs;em.opt.V', type: 'double', format: F(6, 2), nullable: true },
  { name: 'e_MV', description: 'Uncertainty of MV', unit: 'mag', ucd: 'stat.error;phys.magAbs;em.opt.V', type: 'double', format: F(5, 2), nullable: true },
  { name: 'BC', description: 'Bolometric correction in V from the calibrated Teff (estimate)', unit: 'mag', ucd: 'phot.mag.bc', type: 'double', format: F(6, 2), nullable: true },
  { name: 'Dist', description: 'Spectroscopic distance from Vmag, MV and A(V) = 3.1 E(B-V) (estimate)', unit: 'pc', ucd: 'pos.distance', type: 'double', format: E(10, 3), nullable: true },
  { name: 'e_Dist', description: 'Uncertainty of Dist', unit: 'pc', ucd: 'stat.error;pos.distance', type: 'double', format: E(10, 3), nullable: true },
  { name: 'DistPlx', description: 'Distance as 1/Plx', unit: 'pc', ucd: 'pos.distance;pos.parallax', type: 'double', format: E(10, 3), nullable: true },
  { name: 'e_DistPlx', description: 'Uncertainty of DistPlx', unit: 'pc', ucd: 'stat.error;pos.distance;pos.parallax', type: 'double', format: E(10, 3), nullable: true },
  { name: 'Lum', description: 'Luminosity from MV and BC (estimate)', unit: 'solLum', ucd: 'phys.luminosity', type: 'double', format: E(10, 3), nullable: true },
  { name: 'e_Lum', description: 'Uncertainty of Lum', unit: 'solLum', ucd: 'stat.error;phys.luminosity', type: 'double', format: E(10, 3), nullable: true },
  { name: 'Rad', description: 'Radius from L = 4 pi R^2 sigma Teff^4 (estimate)', unit: 'solRad', ucd: 'phys.size.radius', type: 'double', format: E(10, 3), nullable: true },
  { name: 'e_Rad', description: 'Uncertainty of Rad', unit: 'solRad', ucd: 'stat.error;phys.size.radius', type: 'double', format: E(10, 3), nullable: true },
  { name: 'DFlag', description: 'Why derived parameters are missing (e.g. outside the MK grid); blank when derived', unit: '', ucd: 'meta.code.qual', type: 'string', width: 5, nullable: true },
]

/** Notes every catalogue file carries. */
export const CATALOGUE_NOTES: readonly string[] = [
  'Teff, MV, BC, Dist, Lum and Rad are calibration estimates from the decided MK type, not measurements. Teff and MV follow the calibrations named in the Lineweight documentation; BC_V is that of Flower (1996) as corrected by Torres (2010); solar values are the IAU 2015 nominal ones.',
  'Uncertainties of derived values combine the spread over the classification uncertainty with an adopted calibration scatter, in quadrature (1 sigma).',
]
