import { readFileSync } from 'node:fs'
import { describe, expect, it } from 'vitest'
import { SERVER_NODE_FLAGS, WORKER_NODE_FLAGS, root } from '../../../scripts/lib/setup.mjs'

const scripts = (JSON.parse(readFileSync(`${root}/package.json`, 'utf8')) as { scripts: Record<string, string> }).scripts

describe('the worker processes’ Node flags', () => {
  it('are the ones `npm run worker` starts with', () => {
    expect(scripts.worker).toBe(`tsx ${WORKER_NODE_FLAGS.join(' ')} server/worker.ts`)
  })
})

describe('the web server’s Node flags', () => {
  it('are the ones `npm run serve` starts with', () => {
    expect(scripts.serve).toBe(`tsx ${SERVER_NODE_FLAGS.join(' ')} server/index.ts`)
  })
})
