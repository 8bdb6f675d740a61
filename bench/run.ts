/** `npm run bench`: every benchmark in turn, one table at the end (single thread; figures are per core). */
import { runMatchBench } from './match'
import { runMeasureBench } from './measure'
import { runReaderBench } from './readers'

const results: Record<string, number> = {}
Object.assign(results, await runReaderBench())
for (const [k, v] of Object.entries(await runMeasureBench())) results[`measure.${k}`] = v
Object.assign(results, await runMatchBench())
const width = Math.max(...Object.keys(results).map((k) => k.length))
// Three significant figures are all a shared 2-core machine can vouch for.
const show = (v: number) => (Math.abs(v) >= 100 ? Math.round(v).toString() : v.toPrecision(3))
console.log(`${'benchmark'.padEnd(width)}  value`)
console.log(`${'-'.repeat(width)}  -----`)
for (const [k, v] of Object.entries(results)) console.log(`${k.padEnd(width)}  ${show(v)}`)
