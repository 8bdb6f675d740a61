import { zipSync } from 'fflate'
import { writeCsv, writeEcsv } from './csv'
import { writeFits } from './fits'
import { writeFixedWidth } from './mrt'
import { EXPORT_FORMATS, type ExportFormat } from '../../shared/api/releases'
import type { ExportTable } from './table'
import { prepareForExport } from './text'
import { writeVotable } from './votable'

export * from './table'
export { CATALOGUE_COLUMNS, CATALOGUE_NOTES } from './catalogue'
export { csvNumber, writeCsv, writeEcsv } from './csv'
export { writeFits, headerCards, commentCards, FITS_BLOCK, FITS_INT_NULL } from './fits'
export { writeFixedWidth, cdsUnit } from './mrt'
export { writeVotable, xmlEscape } from './votable'
export { neutraliseFormula, prepareForExport, transliterate } from './text'

export { EXPORT_FORMATS, type ExportFormat }

/**
 * The fixed-width table and its ReadMe together, as a zip: `<stem>.dat` and `ReadMe`, the ReadMe's
 * file summary and byte-by-byte description naming `<stem>.dat`. Entry times are the release's, so
 * the bytes repeat.
 */
export function writeFixedWidthZip(table: ExportTable, stem: string): Buffer {
  const dataName = `${stem}.dat`
  const fixed = writeFixedWidth(table, dataName)
  const mtime = new Date(`${table.date}Z`)
  return Buffer.from(zipSync({ ReadMe: [fixed.readme, { mtime }], [dataName]: [fixed.data, { mtime }] }, { level: 6 }))
}

/**
 * File bytes, media type and file-name extension of one table in one format (text cells made safe
 * for the format first, see text.ts); `stem` names the files inside a zip.
 */
export function writeTable(source: ExportTable, format: ExportFormat, stem = source.name): { body: Buffer; contentType: string; extension: string } {
  const table = prepareForExport(source, format)
  switch (format) {
    case 'csv':
      return { body: writeCsv(table), contentType: 'text/csv; charset=utf-8; header=present', extension: 'csv' }
    case 'ecsv':
      return { body: writeEcsv(table), contentType: 'text/plain; charset=utf-8', extension: 'ecsv' }
    case 'votable':
      return { body: writeVotable(table), contentType: 'application/x-votable+xml; charset=utf-8', extension: 'vot' }
    case 'fits':
      return { body: writeFits(table), contentType: 'application/fits', extension: 'fits' }
    case 'mrt':
      return { body: writeFixedWidthZip(table, stem), contentType: 'application/zip', extension: 'zip' }
  }
}
