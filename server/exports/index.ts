import { writeCsv } from './csv'
import { writeFits } from './fits'
import { writeFixedWidth } from './mrt'
import type { ExportFormat } from '../../shared/api/releases'
import type { ExportTable } from './table'
import { prepareForExport } from './text'
import { writeVotable } from './votable'

export * from './table'
export { CATALOGUE_COLUMNS, CATALOGUE_NOTES } from './catalogue'
export { writeCsv } from './csv'
export { writeFits, headerCards, commentCards, FITS_BLOCK, FITS_INT_NULL } from './fits'
export { writeFixedWidth, cdsUnit } from './mrt'
export { writeVotable, xmlEscape } from './votable'
export { neutraliseFormula, prepareForExport, transliterate } from './text'

export type { ExportFormat }
export const EXPORT_FORMATS = ['csv', 'votable', 'fits', 'mrt'] as const satisfies readonly ExportFormat[]

/** File bytes, media type and file-name extension of one table in one format. */
export function writeTable(source: ExportTable, format: ExportFormat): { body: Buffer; contentType: string; extension: string } {
  const table = prepareForExport(source, format)
  switch (format) {
    case 'csv':
      return { body: writeCsv(table), contentType: 'text/csv; charset=utf-8; header=present', extension: 'csv' }
    case 'votable':
      return { body: writeVotable(table), contentType: 'application/x-votable+xml; charset=utf-8', extension: 'vot' }
    case 'fits':
      return { body: writeFits(table), contentType: 'application/fits', extension: 'fits' }
    case 'mrt':
      return { body: writeFixedWidth(table).combined, contentType: 'text/plain; charset=us-ascii', extension: 'txt' }
  }
}
