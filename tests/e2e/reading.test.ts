import { randomInt } from 'node:crypto'
import { readFileSync } from 'node:fs'
import { join } from 'node:path'
import { afterAll, beforeAll, describe, expect, inject, it } from 'vitest'
import type { Page } from 'playwright-core'
import { loadCorpus } from '../../bench/corpus'
import { openBrowser, screenshot, signIn } from './browser'

const OBSERVER = { email: 'observer@kestrel-ridge.example', password: 'observer-demo-2026' }
const CORPUS = join(process.cwd(), 'tests', 'fixtures', 'corpus')
// corpus.json (tests/reference/make_reader_corpus.py) states what a right read of each file gives.
const corpus = loadCorpus()

describe('the observer sees how each file was read, has one read again, and withdraws another', () => {
  const baseUrl = process.env.E2E_BASE_URL ?? inject('baseUrl')
  let browser: Awaited<ReturnType<typeof openBrowser>>
  let page: Page
  const run = randomInt(1_000_000)
  // A vacuum text file that says nothing about its medium (the corpus file without its wave_vac header).
  const vacuum = corpus.files.find((e) => e.file === 'txt-wave-vac.txt')!
  const silent = Buffer.from(readFileSync(join(CORPUS, vacuum.file), 'utf8').replace(/^wave_vac flux\n/, '') + `# run ${run}\n`)
  const twoArms = () => {
    const b = Buffer.from(readFileSync(join(CORPUS, 'two-arm-images.fits')))
    const at = b.toString('latin1').indexOf("OBJECT  = 'SYNTH-F5V'")
    b.write(`OBJECT  = 'KR-${String(run).padStart(6, '0')}'`, at, 'latin1')
    return b
  }

  beforeAll(async () => {
    browser = await openBrowser()
    page = browser.page
    await signIn(page, baseUrl, OBSERVER)
  })
  afterAll(async () => {
    await browser?.close()
  })

  it("submits two files and sees the reader's decisions for each", async () => {
    await page.getByTestId('nav-submit').click()
    await page.getByTestId('submit-campaign').click()
    await page.locator('.n-base-select-option', { hasText: 'KRO-NFS26' }).first().click()
    await page.getByTestId('submit-file-input').setInputFiles([
      { name: `silent-${run}.txt`, mimeType: 'text/plain', buffer: silent },
      { name: `arms-${run}.fits`, mimeType: 'application/fits', buffer: twoArms() },
    ])
    await page.getByTestId('submit-button').click()
    await expect.poll(() => page.locator('[data-testid="submit-result-row"][data-outcome="accepted"]').count(), { timeout: 60_000 }).toBe(2)
    const arms = page.locator(`[data-testid="submit-result-row"][data-file="arms-${run}.fits"]`)
    expect(await arms.getByTestId('read-decision-hdu').innerText()).toBe('HDU 2 (BLUE)')
    expect(await arms.getByTestId('read-decision-ignored').getAttribute('title')).toBe('HDU 1 (RED): another spectrum (5600–6959 Å); pick it with the HDU option')
    const text = page.locator(`[data-testid="submit-result-row"][data-file="silent-${run}.txt"]`)
    expect(await text.getByTestId('read-decision-medium').innerText()).toBe('air')
    await screenshot(page, 'observer-submit-decisions')
  })

  it('has the silent vacuum file read again as vacuum, and finds the earlier reading in the history', async () => {
    await page.locator(`[data-testid="submit-result-row"][data-file="silent-${run}.txt"]`).getByTestId('submit-result-link').click()
    await page.getByTestId('spectrum-reading').waitFor()
    expect(await page.getByTestId('read-decision-medium').innerText()).toMatch(/^air\b.*the file does not say/)
    await page.getByTestId('spectrum-reread').click()
    await page.getByTestId('reading-medium').getByText('Vacuum').click()
    await screenshot(page, 'observer-read-differently')
    await page.getByTestId('reading-save').click()
    await page.getByTestId('spectrum-reading-form').waitFor({ state: 'detached' })
    await expect.poll(() => page.getByTestId('read-decision-medium').innerText()).toMatch(/^vacuum, converted to air\b.*your choice \(vacuum\)/)
    // The corpus states the true air range of this file: 3800.0–5299.0 Å.
    expect(vacuum.airRange).toEqual([3800, 5299])
    await expect.poll(() => page.getByTestId('spectrum-metadata').innerText()).toContain('3800–5299 Å')
    await expect
      .poll(
        async () => {
          await page.reload()
          await page.getByTestId('spectrum-history').waitFor()
          return page.locator('[data-testid="spectrum-history-event"][data-kind="reread"]').count()
        },
        { timeout: 30_000 },
      )
      .toBe(1)
    expect(await page.locator('[data-testid="spectrum-history-event"][data-kind="reread"]').innerText()).toMatch(/Read again as vacuum, unit Angstrom \(assumed\): 3800\.0–5299\.0 Å/)
    await screenshot(page, 'observer-read-again')
  })

  it('withdraws the other spectrum, which then is gone from My spectra', async () => {
    await page.getByTestId('nav-spectra').click()
    const row = page.getByText(`KR-${String(run).padStart(6, '0')}`).first()
    await row.click()
    // A spectrum being measured cannot be withdrawn yet (409 'processing'); the page says when it is done.
    await expect.poll(() => page.getByTestId('spectrum-status').getAttribute('data-status'), { timeout: 60_000 }).toMatch(/^(measured|suggested)$/)
    await page.getByTestId('spectrum-withdraw').click()
    await page.getByRole('button', { name: 'Withdraw' }).last().click()
    await page.waitForURL(/\/spectra$/)
    await expect.poll(() => page.getByText(`KR-${String(run).padStart(6, '0')}`).count()).toBe(0)
  })
})
