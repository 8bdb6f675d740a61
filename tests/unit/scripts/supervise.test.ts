import { spawn } from 'node:child_process'
import { setTimeout as sleep } from 'node:timers/promises'
import { describe, expect, it } from 'vitest'
import { supervise } from '../../../scripts/lib/setup.mjs'

describe('supervise', () => {
  it('starts a crashed process again with a doubling pause, up to the cap', async () => {
    const starts: number[] = []
    const delays: number[] = []
    const s = supervise({
      name: 'crasher',
      minDelayMs: 100,
      maxDelayMs: 400,
      healthyMs: 60_000,
      onRestart: ({ delay }) => delays.push(delay),
      start: () => {
        starts.push(Date.now())
        return spawn(process.execPath, ['-e', 'process.exit(3)'], { stdio: 'ignore' })
      },
    })
    while (starts.length < 5) await sleep(20)
    await s.stop()
    expect(delays.slice(0, 4)).toEqual([100, 200, 400, 400])
    const gaps = starts.slice(1).map((t, i) => t - starts[i]!)
    for (const [i, gap] of gaps.entries()) expect(gap).toBeGreaterThanOrEqual(delays[i]!)
  })

  it('does not retry an exit code that means a configuration mistake', async () => {
    let fatal: number | null = null
    let starts = 0
    supervise({
      minDelayMs: 50,
      fatalCodes: [78],
      onFatal: (code) => (fatal = code),
      start: () => {
        starts++
        return spawn(process.execPath, ['-e', 'process.exit(78)'], { stdio: 'ignore' })
      },
    })
    while (fatal === null) await sleep(20)
    await sleep(200)
    expect(fatal).toBe(78)
    expect(starts).toBe(1)
  })

  it('stops the running process and starts no other', async () => {
    let starts = 0
    const s = supervise({ minDelayMs: 10, start: () => (starts++, spawn(process.execPath, ['-e', 'setInterval(() => {}, 1000)'], { stdio: 'ignore' })) })
    await sleep(200)
    const child = s.child!
    await s.stop()
    expect(child.exitCode !== null || child.signalCode !== null).toBe(true)
    await sleep(100)
    expect(starts).toBe(1)
  })
})
