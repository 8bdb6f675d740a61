import { cellKey, coverageCell, type CoverageCell } from '@shared/coverage'
import type { DecisionRecord } from '@shared/api/instruments'
import type { StandardSummary, VersionSummary } from '@shared/api/standards'

const names = (list: string[]) => (list.length <= 1 ? list.join('') : `${list.slice(0, -1).join(', ')} and ${list[list.length - 1]}`)

/** "agreed by Ilse Varga and Tomasz Achterberg" / "settled by Maren Olukoya". */
export function decisionText(d: DecisionRecord): string {
  if (d.how === 'settled') return `settled by ${d.decidedBy?.name ?? 'a lead'}`
  return `agreed by ${names(d.calls.map((c) => c.classifier.name))}`
}

/** The instrument's standards in a version. */
export function instrumentStandardsIn(standards: readonly StandardSummary[], instrumentId: number, version: VersionSummary | null): StandardSummary[] {
  if (!version) return []
  return standards.filter((s) => s.instrumentId === instrumentId && s.versionIds.includes(version.id))
}

/** The cells a set of standards fills, with a hover text naming the standards in each. */
export function coverageOf(standards: readonly StandardSummary[]): { cells: CoverageCell[]; titles: Record<string, string> } {
  const cells = new Map<string, CoverageCell>()
  const titles: Record<string, string> = {}
  for (const s of standards) {
    const cell = coverageCell(s.typeCode, s.classCode)
    const key = cellKey(cell)
    cells.set(key, cell)
    const who = s.provenance ? `${s.provenance.objectName} (#${s.provenance.spectrumId})` : (s.star ?? `standard #${s.id}`)
    titles[key] = titles[key] ? `${titles[key]}; ${who}` : `${cell.label}: ${who}`
  }
  return { cells: [...cells.values()], titles }
}

/** The cells a version added for the instrument (a promotion's new standards). */
export function cellsAddedBy(version: VersionSummary | null, instrumentId: number, standards: readonly StandardSummary[]): CoverageCell[] {
  if (!version?.changes || version.changes.action !== 'promote' || version.changes.instrument.id !== instrumentId) return []
  const ids = new Set(version.changes.standards.map((s) => s.standardId))
  return coverageOf(standards.filter((s) => ids.has(s.id))).cells
}
