import { existsSync, readFileSync, readdirSync, statSync } from 'node:fs'
import { dirname, join, relative, resolve } from 'node:path'
import { describe, expect, it } from 'vitest'

// The server's modules as a graph of the imports that load code (type-only imports are erased).
const ROOT = join(process.cwd(), 'server')

function sources(dir: string): string[] {
  return readdirSync(dir).flatMap((name) => {
    const path = join(dir, name)
    if (statSync(path).isDirectory()) return sources(path)
    return path.endsWith('.ts') && !path.endsWith('.d.ts') ? [path] : []
  })
}

function target(from: string, specifier: string): string | null {
  const base = resolve(dirname(from), specifier)
  if (existsSync(`${base}.ts`)) return `${base}.ts`
  if (existsSync(join(base, 'index.ts'))) return join(base, 'index.ts')
  return null
}

const graph = new Map<string, string[]>()
for (const file of sources(ROOT)) {
  const text = readFileSync(file, 'utf8')
  const deps: string[] = []
  for (const m of text.matchAll(/^(import|export)\s+(type\s+)?([^'";]*?\s+from\s+)?'(\.[^']+)'/gm)) {
    if (m[2]) continue
    const to = target(file, m[4]!)
    if (to && to.startsWith(ROOT)) deps.push(to)
  }
  graph.set(file, deps)
}

/** Every cycle found by a depth-first walk, as module paths relative to server/. */
function cycles(): string[] {
  const found = new Set<string>()
  const state = new Map<string, 'open' | 'done'>()
  const stack: string[] = []
  const visit = (node: string) => {
    state.set(node, 'open')
    stack.push(node)
    for (const dep of graph.get(node) ?? []) {
      if (state.get(dep) === 'open') found.add([...stack.slice(stack.indexOf(dep)), dep].map((p) => relative(ROOT, p)).join(' → '))
      else if (!state.has(dep)) visit(dep)
    }
    stack.pop()
    state.set(node, 'done')
  }
  for (const node of graph.keys()) if (!state.has(node)) visit(node)
  return [...found]
}

describe('server imports', () => {
  it('form no cycle (services, jobs and the numeric core load in one order)', () => {
    expect(graph.size).toBeGreaterThan(100)
    expect(graph.get(join(ROOT, 'jobs', 'process.ts'))).toContain(join(ROOT, 'services', 'measurements.service.ts'))
    expect(cycles()).toEqual([])
  })

  it('keep the numeric core free of the database and the web server', () => {
    const core = [...graph.keys()].filter((f) => f.startsWith(join(ROOT, 'spectra')))
    const outside = core.flatMap((f) => (graph.get(f) ?? []).filter((d) => !d.startsWith(join(ROOT, 'spectra'))).map((d) => `${relative(ROOT, f)} → ${relative(ROOT, d)}`))
    expect(outside).toEqual([])
    const packages = core.filter((f) => /from '(express|sequelize|mariadb)'/.test(readFileSync(f, 'utf8'))).map((f) => relative(ROOT, f))
    expect(packages).toEqual([])
  })
})
