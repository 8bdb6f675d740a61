/** `npm run bench`: every benchmark in turn, one table at the end (single thread; figures are per core). */
import { existsSync } from 'node:fs'
import { runMatchBench } from './match'
import { runReaderBench } from './readers'

const results: Record<string, number> = {}
Object.assign(results, await runReaderBench())
if (existsSync(new URL('./measure.ts', import.meta.url))) {
  const { runMeasureBench } = (await import('./measure')) as { runMeasureBench: () => Promise<Record<string, number>> }
  for (const [k, v] of Object.entries(await runMeasureBench())) results[`measure.${k}`] = v
}
Object.assign(results, await runMatchBench())
const width = Math.max(...Object.keys(results).map((k) => k.length))
console.log(`${'benchmark'.padEnd(width)}  value`)
console.log(`${'-'.repeat(width)}  -----`)
for (const [k, v] of Object.entries(results)) console.log(`${k.padEnd(width)}  ${v}`)
