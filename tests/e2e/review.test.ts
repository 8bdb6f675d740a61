import { afterAll, beforeAll, describe, expect, inject, it } from 'vitest'
import type { Page } from 'playwright-core'
import { openBrowser, screenshot, signIn as signInAt } from './browser'

// A classifier of the seeded demo works three queue items with the keyboard alone: no clicks
// after signing in. Items are taken from the queue as the server orders it, never by fixed id.
const baseUrl = inject('baseUrl')
const CLASSIFIER = { email: 'classifier@kestrel-ridge.example', password: 'classifier-demo-2026' }
let browser: Awaited<ReturnType<typeof openBrowser>>

beforeAll(async () => {
  browser = await openBrowser()
})
afterAll(async () => {
  await browser.close()
})

const signIn = (page: Page, who: { email: string; password: string }) => signInAt(page, baseUrl, who)

const reviewId = (page: Page): number | null => {
  const m = /\/review\/(\d+)$/.exec(new URL(page.url()).pathname)
  return m ? Number(m[1]) : null
}

describe('Spectrum review from the keyboard', () => {
  const called: number[] = []

  it('lands the classifier on the review queue, with the items that need a call', async () => {
    const { page } = browser
    await signIn(page, CLASSIFIER)
    await page.waitForURL(`${baseUrl}/review`)
    await page.getByTestId('queue-row').first().waitFor()
    expect(await page.getByTestId('queue-row').count()).toBeGreaterThanOrEqual(3)
    await screenshot(page, 'review-queue')
  })

  it('reviews three spectra in a row using only keys, seeing each suggestion after the blind call', async () => {
    const { page } = browser
    await page.locator('body').focus()
    // Queue: ↓ and ↑ move the highlighted row, Enter opens it.
    const second = await page.getByTestId('queue-row').nth(1).getAttribute('data-spectrum-id')
    await page.keyboard.press('ArrowDown')
    await expect.poll(() => page.locator('[data-testid="queue-row"][data-selected="true"]').getAttribute('data-spectrum-id')).toBe(second)
    await page.keyboard.press('ArrowUp')
    await page.keyboard.press('Enter')
    await page.waitForURL(/\/review\/\d+$/)

    for (let k = 0; k < 3; k++) {
      const id = reviewId(page)
      expect(id).not.toBeNull()
      await page.getByTestId('call-form').waitFor()
      await page.getByTestId('review-plot').waitFor()
      await page.getByTestId('key-map').waitFor()
      await page.locator('[data-testid="matrix-tile-0-0"] [data-testid="matrix-tile-type"]').waitFor()
      const blind = await page.getByTestId('blind-note').isVisible()

      if (k === 0) {
        // The neighbour matrix: → highlights the later type, Enter shows it in the large plot and re-centres.
        const right = (await page.locator('[data-testid="matrix-tile-0-1"] [data-testid="matrix-tile-type"]').textContent())!.trim()
        await page.keyboard.press('ArrowRight')
        await expect.poll(() => page.getByTestId('matrix-tile-0-1').getAttribute('aria-selected')).toBe('true')
        await page.keyboard.press('Enter')
        await expect.poll(() => page.getByTestId('overlay-current').textContent()).toContain(right)
        await expect.poll(() => page.getByTestId('overlay-current').textContent()).toContain('one subtype later')
        await expect.poll(async () => (await page.locator('[data-testid="matrix-tile-0-0"] [data-testid="matrix-tile-type"]').textContent())?.trim()).toBe(right)
        // ↑ then Enter: one class brighter.
        await page.keyboard.press('ArrowUp')
        await page.keyboard.press('Enter')
        await expect.poll(() => page.getByTestId('overlay-current').textContent()).toContain('one class brighter')
        // The region strip: r steps to the next region, d shows ratios, m the labels, w back to the whole region.
        await page.keyboard.press('r')
        await expect.poll(() => page.getByTestId('region-violet').getAttribute('aria-pressed')).toBe('true')
        await page.keyboard.press('d')
        await expect.poll(() => page.getByTestId('neighbour-matrix').getAttribute('data-mode')).toBe('ratio')
        await page.keyboard.press('m')
        await expect.poll(() => page.getByTestId('marker-mode').textContent()).toContain('all lines')
        await screenshot(page, blind ? 'review-blind' : 'review-spectrum')
        await page.keyboard.press('w')
        await expect.poll(() => page.getByTestId('region-whole').getAttribute('aria-pressed')).toBe('true')
        await page.keyboard.press('d')
      }

      if (blind) {
        expect(await page.getByTestId('call-accept').count()).toBe(0)
        expect(await page.getByTestId('suggestion-type').count()).toBe(0)
        // A key that cannot work here says why.
        await page.keyboard.press('y')
        await page.locator('.n-message', { hasText: 'Blind review: the suggestion is hidden' }).first().waitFor()
      }
      if (!blind && (await page.getByTestId('call-accept').isVisible())) {
        await page.keyboard.press('y')
      } else {
        await page.keyboard.press('/')
        await page.keyboard.type(k === 1 ? 'B9.5' : 'A1')
        await page.keyboard.press('Tab')
        await page.keyboard.type(k === 1 ? 'IV' : 'V')
        await page.keyboard.press('Alt+3')
        if (k === 2) {
          await page.keyboard.press('Escape')
          await page.keyboard.press('Control+Enter')
        } else await page.keyboard.press('Enter')
      }
      if (blind) {
        // After a blind call the suggestion is shown before moving on; Space goes on.
        await page.getByTestId('blind-reveal').waitFor({ timeout: 15_000 })
        expect(((await page.getByTestId('reveal-suggestion').textContent()) ?? '').trim()).toMatch(/^[OBAFGKM]\d/)
        await page.getByTestId('suggestion-type').waitFor()
        if (k === 0) await screenshot(page, 'review-blind-reveal')
        await page.locator('body').focus()
        await page.keyboard.press(' ')
      }
      try {
        await page.waitForURL((url) => url.pathname !== `/review/${id}`, { timeout: 15_000 })
      } catch (e) {
        await screenshot(page, `review-stuck-${k}`)
        throw e
      }
      called.push(id!)
    }
    await screenshot(page, 'review-after-three')
  })

  it('recorded one call of the classifier on each, and the queue no longer offers them', async () => {
    const { page } = browser
    for (const id of called) {
      const res = await page.request.get(`${baseUrl}/api/spectra/${id}/review`)
      expect(res.status()).toBe(200)
      const body = (await res.json()) as { myCall: { confidence: number; spectralType: string } | null }
      expect(body.myCall).not.toBeNull()
    }
    const queue = (await (await page.request.get(`${baseUrl}/api/queue`)).json()) as { items: { spectrumId: number }[] }
    for (const id of called) expect(queue.items.map((i) => i.spectrumId)).not.toContain(id)
  })

  it('shows the spectrum’s history in the side tab', async () => {
    const { page } = browser
    await page.goto(`${baseUrl}/review/${called[0]}`)
    await page.getByTestId('call-closed').waitFor()
    await page.locator('.n-tabs-tab', { hasText: 'History' }).click()
    await page.getByTestId('history-event').first().waitFor()
    const kinds = await page.getByTestId('history-event').evaluateAll((els) => els.map((e) => e.getAttribute('data-kind')))
    expect(kinds[0]).toBe('upload')
    expect(kinds).toContain('call')
    await screenshot(page, 'review-history')
  })

  it('looks right in the dark theme', async () => {
    const { page } = browser
    await page.evaluate("localStorage.setItem('lineweight.theme', 'dark')")
    await page.goto(`${baseUrl}/review`)
    await page.getByTestId('queue-filters').waitFor()
    await screenshot(page, 'review-queue-dark')
    const first = page.getByTestId('queue-row').first()
    if (await first.count()) {
      await first.click()
      await page.getByTestId('review-plot').waitFor()
      await page.waitForTimeout(500)
      await screenshot(page, 'review-spectrum-dark')
    }
    await page.evaluate("localStorage.removeItem('lineweight.theme')")
  })
})
