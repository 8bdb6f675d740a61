import { spawnSync } from 'node:child_process'
import { existsSync, mkdtempSync, readFileSync, writeFileSync } from 'node:fs'
import { tmpdir } from 'node:os'
import { join } from 'node:path'
import { afterAll, beforeAll, describe, expect, inject, it } from 'vitest'
import type { Page } from 'playwright-core'
import { openBrowser, screenshot } from './browser'

// The demo lead (server/db/seed.ts) audits the demo campaign, freezes a release and downloads it.
const LEAD = { email: 'lead@kestrel-ridge.example', password: 'lead-demo-2026' }
const CAMPAIGN = 'KRO-NFS26'

/** What each download must be served as (server/exports). */
const FORMATS = [
  { format: 'csv', type: 'text/csv', file: 'catalogue.csv' },
  { format: 'ecsv', type: 'text/plain', file: 'catalogue.ecsv' },
  { format: 'votable', type: 'application/x-votable+xml', file: 'catalogue.vot' },
  { format: 'fits', type: 'application/fits', file: 'catalogue.fits' },
  { format: 'mrt', type: 'application/zip', file: 'catalogue.zip' },
] as const

describe('the lead audits the demo campaign and publishes a catalogue release', () => {
  const baseUrl = process.env.E2E_BASE_URL ?? inject('baseUrl')
  let browser: Awaited<ReturnType<typeof openBrowser>>
  let page: Page
  let campaignId = 0
  let releaseId = 0
  // Two runs against one database must not collide on the title.
  const title = `Northern fields, journey release ${Date.now().toString(36)}`

  beforeAll(async () => {
    browser = await openBrowser()
    page = browser.page
  })
  afterAll(async () => {
    await browser?.close()
  })

  it('signs in and finds the three lead screens in the navigation', async () => {
    await page.goto(`${baseUrl}/sign-in`)
    await page.getByTestId('signin-email').fill(LEAD.email)
    await page.getByTestId('signin-password').fill(LEAD.password)
    await page.getByTestId('signin-submit').click()
    await page.getByTestId('user-name').waitFor()
    for (const id of ['nav-standards', 'nav-audit', 'nav-releases']) await page.getByTestId(id).first().waitFor()

    const res = await page.request.get(`${baseUrl}/api/campaigns`)
    expect(res.status()).toBe(200)
    const { campaigns } = (await res.json()) as { campaigns: Array<{ id: number; code: string }> }
    campaignId = campaigns.find((c) => c.code === CAMPAIGN)?.id ?? 0
    expect(campaignId).toBeGreaterThan(0)
  })

  it('opens the agreement audit for the demo campaign and drills into a confusion-matrix cell', async () => {
    await page.goto(`${baseUrl}/audit?campaign=${campaignId}`)
    await page.getByTestId('audit-summary').waitFor({ timeout: 30_000 })
    expect(Number(await page.getByTestId('audit-spectra').textContent())).toBeGreaterThan(0)
    await page.getByTestId('audit-pairs').waitFor()
    await page.getByTestId('audit-suggestion').waitFor()
    await page.getByTestId('audit-classifiers').waitFor()
    expect(await page.getByTestId('audit-suggestion-row').count()).toBeGreaterThan(0)

    const filled = page.locator('[data-testid="heatmap-cell"]:not([data-count="0"])')
    expect(await filled.count()).toBeGreaterThan(0)
    await filled.first().click()
    await page.getByTestId('heatmap-drill').waitFor()
    const link = page.getByTestId('heatmap-spectrum-link').first()
    expect(await link.getAttribute('href')).toMatch(/^\/spectra\/\d+$/)
    await screenshot(page, 'lead-audit')
  })

  it('freezes a release after reading what freezing means', async () => {
    await page.goto(`${baseUrl}/releases`)
    const freeze = page.getByTestId('release-freeze')
    await freeze.waitFor()
    await expect.poll(() => freeze.isEnabled(), { timeout: 10_000 }).toBe(true)
    await freeze.click()

    await page.getByTestId('freeze-campaign').click()
    await page.locator('.n-base-select-option', { hasText: CAMPAIGN }).first().click()
    await page.getByTestId('freeze-title').fill(title)
    await page.getByTestId('freeze-authors').fill('Olukoya, M.; Varga, I.; Achterberg, T.')
    await page.getByTestId('freeze-description').fill('Every agreed or settled spectrum of the demo campaign, frozen by the browser journey.')
    await screenshot(page, 'lead-freeze-details')
    await page.getByTestId('freeze-next').click()
    const confirm = page.getByTestId('freeze-confirm')
    await confirm.waitFor()
    // The preview: how many rows, what is still open in the campaign, and the columns.
    await page.getByTestId('freeze-preview-rows').waitFor()
    const preview = (await (await page.request.get(`${baseUrl}/api/releases/preview?campaign=${campaignId || ''}`)).json().catch(() => null)) as { preview?: { rows: number } } | null
    const rowsText = (await page.getByTestId('freeze-preview-rows').textContent()) ?? ''
    expect(rowsText).toMatch(/^\d+ rows?$/)
    if (preview?.preview) expect(rowsText).toBe(`${preview.preview.rows} ${preview.preview.rows === 1 ? 'row' : 'rows'}`)
    expect(await page.getByTestId('freeze-preview-open').textContent()).toMatch(/still wait|disputed/)
    expect(await page.getByTestId('freeze-preview-columns').textContent()).toMatch(/^\d+ columns$/)
    expect(await confirm.textContent()).toContain('immutable snapshot')
    expect(await page.getByTestId('freeze-confirm-button').isDisabled()).toBe(true)
    await screenshot(page, 'lead-freeze-confirm')
    await page.getByTestId('freeze-understood').click()
    await page.getByTestId('freeze-confirm-button').click()

    // Either the release opens, or the server's reason is on the dialog (and the test says it).
    const outcome = await Promise.race([
      page.waitForURL(/\/releases\/\d+$/, { timeout: 30_000 }).then(() => 'frozen'),
      page
        .getByTestId('freeze-error')
        .waitFor({ timeout: 30_000 })
        .then(async () => `refused: ${await page.getByTestId('freeze-error').textContent()}`),
    ])
    expect(outcome).toBe('frozen')
    releaseId = Number(new URL(page.url()).pathname.split('/').pop())
    const detail = page.getByTestId('release-detail')
    await detail.waitFor()
    expect(Number(await page.getByTestId('release-detail-rows').textContent())).toBeGreaterThan(0)
    await page.getByTestId('release-data-row').first().waitFor()
    await screenshot(page, 'lead-release')
  })

  it('lists the new release as current', async () => {
    await page.getByTestId('release-back').click()
    const row = page.locator(`[data-testid="release-row"][data-id="${releaseId}"]`)
    await row.waitFor()
    expect(await row.getByTestId('release-state').textContent()).toBe('Current')
    await screenshot(page, 'lead-releases')
  })

  it('downloads the release in every format with the page’s session, and astropy reads each back', async () => {
    await page.goto(`${baseUrl}/releases/${releaseId}`)
    await page.getByTestId('release-downloads').waitFor()
    const dir = mkdtempSync(join(tmpdir(), 'lw-e2e-release-'))
    for (const { format, type, file } of FORMATS) {
      const href = await page.getByTestId(`release-download-${format}`).getAttribute('href')
      expect(href).toBe(`/api/releases/${releaseId}/download?format=${format}`)
      // page.request carries the browser context's cookies, as following the link would.
      const res = await page.request.get(`${baseUrl}${href}`)
      expect(res.status(), format).toBe(200)
      expect(res.headers()['content-type'], format).toContain(type)
      expect(res.headers()['content-disposition'], format).toMatch(/attachment/)
      const body = await res.body()
      expect(body.length, format).toBeGreaterThan(100)
      if (format === 'fits') expect(body.subarray(0, 30).toString('latin1')).toMatch(/^SIMPLE {2}=\s+T/)
      writeFileSync(join(dir, file), body)
    }
    // Every file, read back with astropy (Debian's python3-astropy, installed by npm test).
    const detail = (await (await page.request.get(`${baseUrl}/api/releases/${releaseId}?pageSize=200`)).json()) as { columns: unknown[]; params: unknown[]; rows: unknown[]; total: number }
    expect(detail.rows.length).toBe(detail.total)
    writeFileSync(join(dir, 'expected.json'), JSON.stringify({ columns: detail.columns, params: detail.params, rows: detail.rows }))
    const report = join(dir, 'report.json')
    const run = spawnSync('/usr/bin/python3', ['tests/reference/check_exports.py', '--downloads', dir, report], { encoding: 'utf8', timeout: 120_000 })
    expect(run.error).toBeUndefined()
    expect(existsSync(report), run.stderr).toBe(true)
    const result = JSON.parse(readFileSync(report, 'utf8')) as { ok: boolean; checks: { file: string; problems: string[]; valuesCompared: number }[] }
    for (const c of result.checks) {
      expect(c.problems, c.file).toEqual([])
      expect(c.valuesCompared, c.file).toBeGreaterThan(0)
    }
    expect(result.checks).toHaveLength(5)
    expect(result.ok).toBe(true)
  })

  it('shows the standards library with the active version and plots a standard', async () => {
    await page.goto(`${baseUrl}/standards`)
    await page.locator('[data-testid="standards-version"][data-active="true"]').waitFor({ timeout: 30_000 })
    await page.getByTestId('standards-row').first().waitFor()
    await page.getByTestId('standards-plot-toggle').first().click()
    await page.locator('[data-testid="standards-spectrum"] canvas').first().waitFor({ timeout: 20_000 })
    expect(await page.getByTestId('standards-publish').isVisible()).toBe(true)
    await screenshot(page, 'lead-standards')
  })
})
