import { afterAll, beforeAll, describe, expect, inject, it } from 'vitest'
import type { Page } from 'playwright-core'
import { openBrowser, screenshot, signIn } from './browser'

// The demo lead (server/db/seed.ts) grows the demo spectrograph's own standards from the team's
// agreed spectra: two candidates promoted, and the new version's coverage on screen.
const LEAD = { email: 'lead@kestrel-ridge.example', password: 'lead-demo-2026' }
const CLASSIFIER = { email: 'classifier@kestrel-ridge.example', password: 'classifier-demo-2026' }
const INSTRUMENT = 'KRO-LRS, 600 l/mm grating'

describe("a lead promotes agreed spectra as an instrument's standards", () => {
  const baseUrl = process.env.E2E_BASE_URL ?? inject('baseUrl')
  let browser: Awaited<ReturnType<typeof openBrowser>>
  let page: Page

  beforeAll(async () => {
    browser = await openBrowser()
    page = browser.page
  })
  afterAll(async () => {
    await browser?.close()
  })

  it('shows a classifier the candidates without the means to promote them', async () => {
    await signIn(page, baseUrl, CLASSIFIER)
    await page.goto(`${baseUrl}/standards`)
    await page.getByTestId('instrument-facts').waitFor({ timeout: 30_000 })
    await page.getByTestId('candidate-row').first().waitFor({ timeout: 30_000 })
    expect(await page.getByTestId('candidates-promote').count()).toBe(0)
    expect(await page.getByTestId('instrument-new').count()).toBe(0)
    expect(await page.locator('[data-testid="candidate-row"] input[type="checkbox"], [data-testid="candidate-row"] .n-checkbox').count()).toBe(0)
  })

  it('promotes two candidates and sees the new version and its coverage', async () => {
    await signIn(page, baseUrl, LEAD)
    await page.goto(`${baseUrl}/standards`)
    await page.getByTestId('instrument-facts').waitFor({ timeout: 30_000 })
    expect(await page.getByTestId('instrument-select').textContent()).toContain(INSTRUMENT)
    // The best candidate of each cell; others of the same cell (marked "also") would not add coverage.
    const rows = page.locator('[data-testid="candidate-row"][data-first-in-cell="true"]')
    await rows.first().waitFor({ timeout: 30_000 })
    expect(await rows.count()).toBeGreaterThanOrEqual(2)
    const before = Number(await page.getByTestId('coverage-count').textContent())
    const cells = [await rows.nth(0).getAttribute('data-cell'), await rows.nth(1).getAttribute('data-cell')]
    const spectra = [await rows.nth(0).getAttribute('data-spectrum'), await rows.nth(1).getAttribute('data-spectrum')]
    expect(cells[0]).not.toBe(cells[1])
    // Each candidate's gap is outlined on the coverage grid.
    expect(await page.locator('[data-testid="coverage-cell"][data-state="candidate"]').count()).toBeGreaterThanOrEqual(2)
    await screenshot(page, 'lead-instrument-candidates')

    await rows.nth(0).locator('.n-checkbox').click()
    await rows.nth(1).locator('.n-checkbox').click()
    const promote = page.getByTestId('candidates-promote')
    await expect.poll(() => promote.isEnabled()).toBe(true)
    expect(await promote.textContent()).toContain('Promote 2 candidates')
    await promote.click()
    const dialog = page.getByTestId('standards-change-dialog')
    await dialog.waitFor()
    expect(await page.locator('[data-testid="standards-change-items"] li').count()).toBe(2)
    expect(await page.getByTestId('standards-change-items').textContent()).toMatch(/agreed by|settled by/)
    await page.getByTestId('standards-change-note').fill("First standards of the spectrograph, from the survey's agreed spectra.")
    await screenshot(page, 'lead-instrument-promote')
    await page.getByTestId('standards-change-submit').click()
    await dialog.waitFor({ state: 'hidden', timeout: 30_000 })

    // The new version is active and shown; its coverage has the two new cells, marked as added by it.
    const active = page.locator('[data-testid="standards-version"][data-active="true"]')
    await expect.poll(async () => (await active.getAttribute('data-name')) ?? '', { timeout: 30_000 }).toContain('KRO-LRS')
    await expect.poll(async () => Number(await page.getByTestId('coverage-count').textContent()), { timeout: 30_000 }).toBe(before + 2)
    expect(await page.locator('[data-testid="coverage-cell"][data-state="new"]').count()).toBe(2)
    const changes = page.getByTestId('version-changes')
    await changes.waitFor()
    const text = (await changes.textContent()) ?? ''
    for (const id of spectra) expect(text).toContain(`#${id}`)
    expect(text).toMatch(/agreed unanimously by|settled by/)
    // Neither is a candidate any more.
    for (const id of spectra) expect(await page.locator(`[data-testid="candidate-row"][data-spectrum="${id}"]`).count()).toBe(0)
    await screenshot(page, 'lead-instrument-coverage')

    // Its standards, with where each comes from.
    await page.locator('.n-tabs-tab', { hasText: 'Its standards' }).click()
    await expect.poll(() => page.getByTestId('instrument-standard-row').count()).toBe(2)
    expect(await page.getByTestId('instrument-standards').textContent()).toMatch(/by Maren Olukoya/)
  })
})
