import { randomInt } from 'node:crypto'
import { afterAll, beforeAll, describe, expect, inject, it } from 'vitest'
import type { Page } from 'playwright-core'
import { realA0V, syntheticTextSpectrum } from '../helpers/spectra'
import { openBrowser, screenshot } from './browser'

const OBSERVER = { email: 'observer@kestrel-ridge.example', password: 'observer-demo-2026' }

describe('the observer submits a night and looks at a spectrum', () => {
  const baseUrl = process.env.E2E_BASE_URL ?? inject('baseUrl')
  let browser: Awaited<ReturnType<typeof openBrowser>>
  let page: Page
  // A fresh seed each run, so the text spectrum is never a duplicate of an earlier run's.
  const seed = randomInt(1_000_000)

  beforeAll(async () => {
    browser = await openBrowser()
    page = browser.page
  })
  afterAll(async () => {
    await browser?.close()
  })

  it('signs in and opens Submit from the navigation', async () => {
    await page.goto(`${baseUrl}/sign-in`)
    await page.getByTestId('signin-email').fill(OBSERVER.email)
    await page.getByTestId('signin-password').fill(OBSERVER.password)
    await page.getByTestId('signin-submit').click()
    await page.getByTestId('user-name').waitFor()
    await page.getByTestId('nav-submit').click()
    await page.getByTestId('submit-drop-zone').waitFor()
    expect(await page.title()).toContain('Submit')
  })

  it('sends a mixed batch and sees which files were taken and why the rest were not', async () => {
    await page.getByTestId('submit-campaign').click()
    await page.locator('.n-base-select-option', { hasText: 'KRO-NFS26' }).first().click()
    await page.getByTestId('submit-instrument').fill('Kestrel Ridge 1.2 m · long-slit · 600 l/mm')
    await page.getByTestId('submit-file-input').setInputFiles([
      { name: 'night-a0v.fits', mimeType: 'application/fits', buffer: realA0V() },
      { name: `kr-field-${seed}.txt`, mimeType: 'text/plain', buffer: syntheticTextSpectrum(seed) },
      { name: 'guider-log.txt', mimeType: 'text/plain', buffer: Buffer.from('seeing 1.2 arcsec\nclouds none\n') },
    ])
    await expect.poll(() => page.getByTestId('submit-result-row').count()).toBe(3)
    await page.getByTestId('submit-button').click()
    await expect.poll(() => page.locator('[data-testid="submit-result-row"][data-outcome="waiting"], [data-testid="submit-result-row"][data-outcome="uploading"]').count(), { timeout: 60_000 }).toBe(0)

    const text = page.locator(`[data-testid="submit-result-row"][data-file="kr-field-${seed}.txt"]`)
    expect(await text.getAttribute('data-outcome')).toBe('accepted')
    const junk = page.locator('[data-testid="submit-result-row"][data-file="guider-log.txt"]')
    expect(await junk.getAttribute('data-outcome')).toBe('refused')
    expect((await junk.getByTestId('submit-result-message').innerText()).length).toBeGreaterThan(10)
    // The real file may already be in a reused database: then it is a duplicate with a link, never an error.
    const fits = page.locator('[data-testid="submit-result-row"][data-file="night-a0v.fits"]')
    expect(['accepted', 'duplicate']).toContain(await fits.getAttribute('data-outcome'))
    expect(await page.getByTestId('submit-summary').innerText()).toMatch(/accepted/)
    await screenshot(page, 'observer-submit-results')
  })

  it('corrects the details of an accepted spectrum', async () => {
    await page.locator(`[data-testid="submit-result-row"][data-file="kr-field-${seed}.txt"]`).getByTestId('submit-result-edit').click()
    await page.getByTestId('spectrum-edit-form').waitFor()
    await page.getByTestId('edit-object').fill(`KR-${seed}`)
    await page.getByTestId('edit-ra').fill('14:03:12.5')
    await page.getByTestId('edit-dec').fill('+12:30:05')
    await page.getByTestId('spectrum-edit-save').click()
    await page.getByTestId('spectrum-edit-form').waitFor({ state: 'detached' })
    expect(await page.getByTestId('spectrum-meta-object').innerText()).toBe(`KR-${seed}`)
    expect(await page.getByTestId('spectrum-metadata').innerText()).toContain('14:03:12.50')
  })

  it('refuses a declination out of range with the field named', async () => {
    await page.getByTestId('spectrum-edit').click()
    await page.getByTestId('edit-dec').fill('+95')
    await page.getByTestId('spectrum-edit-save').click()
    await page.getByText('Declination must be').first().waitFor()
    await page.getByTestId('spectrum-edit-cancel').click()
  })

  it('sees the observed and rectified plots, zooms to a named region and reads the line table', async () => {
    await page.getByTestId('spectrum-plot-observed').locator('canvas').waitFor()
    // Processing runs in the background; reload until the measurement is there.
    await expect
      .poll(
        async () => {
          if ((await page.getByTestId('spectrum-plot-rectified').count()) > 0) return true
          await page.reload()
          await page.getByTestId('spectrum-plot-observed').locator('canvas').waitFor()
          return (await page.getByTestId('spectrum-plot-rectified').count()) > 0
        },
        { timeout: 60_000, interval: 2000 },
      )
      .toBe(true)
    await page.getByTestId('spectrum-plot-rectified').locator('canvas').waitFor()
    expect(await page.getByTestId('spectrum-line-row').count()).toBeGreaterThan(5)
    await screenshot(page, 'observer-spectrum')
    await page.getByTestId('spectrum-region-delta').click()
    await page.waitForTimeout(600)
    await screenshot(page, 'observer-spectrum-delta')
  })

  it('finds the batch on My spectra, and filters it', async () => {
    await page.getByTestId('nav-spectra').click()
    await page.getByTestId('spectra-row').first().waitFor()
    await page.getByTestId('spectra-search').fill(`KR-${seed}`)
    await expect.poll(() => page.getByTestId('spectra-row').count(), { timeout: 10_000 }).toBe(1)
    await page.getByTestId('spectra-search').fill('')
    await page.getByTestId('spectra-row').nth(1).waitFor()
    await screenshot(page, 'observer-my-spectra')
  })

  it('looks right in the dark theme too', async () => {
    await page.getByTestId('theme-toggle').click()
    await page.getByTestId('spectra-row').first().getByTestId('spectra-row-link').click()
    await page.getByTestId('spectrum-plot-observed').locator('canvas').waitFor()
    await page.waitForTimeout(500)
    await screenshot(page, 'observer-spectrum-dark')
    await page.getByTestId('nav-submit').click()
    await page.getByTestId('submit-drop-zone').waitFor()
    await screenshot(page, 'observer-submit-dark')
  })
})
