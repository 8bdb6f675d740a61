import { afterAll, beforeAll, describe, expect, inject, it } from 'vitest'
import type { Page } from 'playwright-core'
import { openBrowser, screenshot, signIn as signInAt } from './browser'

// Demo sign-ins from the seeded scenario (server/db/seed.ts).
const PEOPLE = {
  lead: { email: 'lead@kestrel-ridge.example', password: 'lead-demo-2026' },
  classifier: { email: 'classifier@kestrel-ridge.example', password: 'classifier-demo-2026' },
  observer: { email: 'observer@kestrel-ridge.example', password: 'observer-demo-2026' },
} as const

const baseUrl = inject('baseUrl')
let browser: Awaited<ReturnType<typeof openBrowser>>

beforeAll(async () => {
  browser = await openBrowser()
})
afterAll(async () => {
  await browser.close()
})

const signIn = (page: Page, role: keyof typeof PEOPLE) => signInAt(page, baseUrl, PEOPLE[role])

async function navEntries(page: Page): Promise<string[]> {
  const ids = await page.locator('[data-testid^="nav-"]').evaluateAll((els) => els.map((e) => e.getAttribute('data-testid') ?? ''))
  return [...new Set(ids)]
}

describe('signing in as each role', () => {
  it('shows the lead the People screen and its menu', async () => {
    const { page } = browser
    await signIn(page, 'lead')
    expect(await navEntries(page)).toEqual(expect.arrayContaining(['nav-people', 'nav-outbox', 'nav-account']))
    await page.goto(`${baseUrl}/people`)
    await page.getByTestId('people-row').first().waitFor()
    expect(await page.getByTestId('people-row').count()).toBeGreaterThanOrEqual(4)
    await screenshot(page, 'lead-people')
  })

  for (const role of ['classifier', 'observer'] as const) {
    it(`keeps the ${role} out of People and sends them home`, async () => {
      const { page } = browser
      await signIn(page, role)
      const entries = await navEntries(page)
      expect(entries).not.toContain('nav-people')
      expect(entries).not.toContain('nav-outbox')
      await screenshot(page, `${role}-home`)
      await page.goto(`${baseUrl}/people`)
      await page.waitForURL((url) => !url.pathname.startsWith('/people'))
      expect(new URL(page.url()).pathname).not.toBe('/people')
      await screenshot(page, `${role}-sent-away`)
    })
  }

  it('signs out back to the sign-in screen', async () => {
    const { page } = browser
    await signIn(page, 'observer')
    await page.getByTestId('user-menu').click()
    await page.getByTestId('sign-out').click()
    await page.getByTestId('signin-email').waitFor()
    const res = await page.request.get(`${baseUrl}/api/me`)
    expect(res.status()).toBe(401)
  })

  it('answers an unknown address with the not-found screen', async () => {
    const { page } = browser
    await page.goto(`${baseUrl}/no/such/screen`)
    await page.getByTestId('not-found').waitFor()
    await screenshot(page, 'not-found')
  })
})
