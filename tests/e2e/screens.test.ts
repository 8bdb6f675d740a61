import { afterAll, beforeAll, describe, expect, inject, it } from 'vitest'
import type { Page } from 'playwright-core'
import { openBrowser, screenshot, signIn } from './browser'

// Every screen of every role, light and dark, at 1440×900 (and 1280×720 for the layout checks).
// The screenshots go to .test-artifacts/screenshots/screens-*.png for a person to look at.
const baseUrl = inject('baseUrl')
const PEOPLE = {
  observer: { email: 'observer@kestrel-ridge.example', password: 'observer-demo-2026' },
  classifier: { email: 'classifier2@kestrel-ridge.example', password: 'classifier2-demo-2026' },
  lead: { email: 'lead@kestrel-ridge.example', password: 'lead-demo-2026' },
} as const
type Who = keyof typeof PEOPLE

let browser: Awaited<ReturnType<typeof openBrowser>>
beforeAll(async () => {
  browser = await openBrowser()
})
afterAll(async () => {
  await browser.close()
})

/** The screens each role opens from the navigation, plus one of each detail screen. */
async function screensOf(page: Page, who: Who): Promise<string[]> {
  const nav = await page.locator('[data-testid^="nav-"]').evaluateAll((els) => els.map((e) => e.getAttribute('href')).filter((h): h is string => !!h))
  const extra: string[] = []
  const spectra = (await (await page.request.get(`${baseUrl}/api/spectra?pageSize=5`)).json()) as { items: { id: number }[] }
  if (spectra.items[0]) extra.push(`/spectra/${spectra.items[0].id}`)
  if (who !== 'observer') {
    const queue = (await (await page.request.get(`${baseUrl}/api/queue`)).json()) as { items: { spectrumId: number }[] }
    if (queue.items[0]) extra.push(`/review/${queue.items[0].spectrumId}`)
  }
  const releases = (await (await page.request.get(`${baseUrl}/api/releases`)).json()) as { releases: { id: number }[] }
  if (releases.releases[0]) extra.push(`/releases/${releases.releases[0].id}`)
  return [...new Set([...nav, ...extra])]
}

/** Texts of select boxes that do not fit their box (a truncated choice). */
const truncatedSelects = (page: Page) =>
  page
    .locator('.n-base-selection-label .n-base-selection-input__content, .n-base-selection-label .n-base-selection-input')
    .evaluateAll((els) => els.filter((e) => e.scrollWidth > e.clientWidth + 1 && (e.textContent ?? '').trim() !== '').map((e) => e.textContent ?? ''))

describe('every screen, light and dark', () => {
  for (const who of Object.keys(PEOPLE) as Who[]) {
    it(`shows each screen of the ${who} without errors, with its selects readable`, async () => {
      const { page } = browser
      await page.setViewportSize({ width: 1440, height: 900 })
      await signIn(page, baseUrl, PEOPLE[who])
      const paths = await screensOf(page, who)
      expect(paths.length).toBeGreaterThan(2)
      for (const theme of ['light', 'dark'] as const) {
        await page.evaluate(`localStorage.setItem('lineweight.theme', '${theme}')`)
        for (const path of paths) {
          await page.goto(`${baseUrl}${path}`)
          await page.waitForLoadState('networkidle')
          await page.waitForTimeout(300)
          expect(await page.getByTestId('state-error').count(), `${who} ${path}: a load error`).toBe(0)
          expect(await truncatedSelects(page), `${who} ${path} ${theme}`).toEqual([])
          await screenshot(page, `screens-${who}-${path.replace(/^\//, '').replace(/[^a-z0-9]+/gi, '-') || 'home'}-${theme}`)
        }
      }
      await page.evaluate("localStorage.removeItem('lineweight.theme')")
    })
  }

  it('shows results without scrolling at 1440×900, and folds the navigation at 1280×720', async () => {
    const { page } = browser
    await page.setViewportSize({ width: 1440, height: 900 })
    await signIn(page, baseUrl, PEOPLE.lead)
    for (const [path, first] of [
      ['/spectra', '[data-testid="spectra-row-link"]'],
      ['/review', '[data-testid="queue-row"]'],
      ['/audit', '[data-testid="audit-pairs"] .n-data-table-tbody tr'],
      ['/releases', '[data-testid="release-row"]'],
    ] as const) {
      await page.goto(`${baseUrl}${path}`)
      const row = page.locator(first).first()
      await row.waitFor()
      const box = await row.boundingBox()
      expect(box, path).not.toBeNull()
      expect(box!.y + box!.height, `${path}: the first result is below the fold`).toBeLessThanOrEqual(900)
    }
    expect(await page.getByTestId('app-sider').getAttribute('data-collapsed')).toBe('false')
    await page.setViewportSize({ width: 1280, height: 720 })
    await page.goto(`${baseUrl}/review`)
    await expect.poll(() => page.getByTestId('app-sider').getAttribute('data-collapsed')).toBe('true')
    await page.getByTestId('queue-row').first().waitFor()
    expect(await truncatedSelects(page)).toEqual([])
    await screenshot(page, 'screens-lead-review-1280x720')
    await page.setViewportSize({ width: 1440, height: 900 })
  })
})
