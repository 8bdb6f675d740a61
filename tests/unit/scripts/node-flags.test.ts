import { readFileSync } from 'node:fs'
import { describe, expect, it } from 'vitest'
import { WORKER_NODE_FLAGS, root } from '../../../scripts/lib/setup.mjs'

describe('the worker processes’ Node flags', () => {
  it('are the ones `npm run worker` starts with', () => {
    const scripts = (JSON.parse(readFileSync(`${root}/package.json`, 'utf8')) as { scripts: Record<string, string> }).scripts
    expect(scripts.worker).toBe(`tsx ${WORKER_NODE_FLAGS.join(' ')} server/worker.ts`)
  })
})
