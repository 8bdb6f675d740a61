import { afterAll, beforeAll, describe, expect, inject, it } from 'vitest'
import { openBrowser, screenshot, signIn } from './browser'

// Demo sign-ins from the seeded scenario (server/db/seed.ts).
const OBSERVER = { email: 'observer@kestrel-ridge.example', password: 'observer-demo-2026' }
const LEAD = { email: 'lead@kestrel-ridge.example', password: 'lead-demo-2026' }

const baseUrl = inject('baseUrl')
let browser: Awaited<ReturnType<typeof openBrowser>>
beforeAll(async () => {
  browser = await openBrowser()
})
afterAll(async () => {
  await browser.close()
})

const me = (secret: string) => fetch(`${baseUrl}/api/me`, { headers: { authorization: `Bearer ${secret}` } })

describe('personal API tokens in the browser', () => {
  it('an observer makes a token on My account, a pipeline uses it, and a lead revokes it on People', async () => {
    const { page } = browser
    await signIn(page, baseUrl, OBSERVER)
    await page.goto(`${baseUrl}/account`)
    await page.getByTestId('token-name').fill('Nightly reduction on kr-pipe-01')
    await page.getByTestId('token-create').click()
    const secret = (await page.getByTestId('token-secret').textContent())!.trim()
    expect(secret).toMatch(/^lw_/)
    await screenshot(page, 'observer-account-token')

    const used = await me(secret)
    expect(used.status).toBe(200)
    expect(((await used.json()) as { user: { email: string } }).user.email).toBe(OBSERVER.email)

    await signIn(page, baseUrl, LEAD)
    await page.goto(`${baseUrl}/people`)
    const row = page.locator('[data-testid^="token-row-"]').filter({ hasText: 'Nightly reduction on kr-pipe-01' })
    await row.waitFor()
    expect(await row.textContent()).toContain('1 request')
    await screenshot(page, 'lead-people-tokens')
    await row.getByRole('button', { name: 'Revoke' }).click()
    await page.getByTestId('confirm-ok').click()
    await row.getByText('Revoked').waitFor()
    expect((await me(secret)).status).toBe(401)
  })

  it('shows every route on the API reference page', async () => {
    const { page } = browser
    await signIn(page, baseUrl, OBSERVER)
    await page.goto(`${baseUrl}/api-reference`)
    await page.getByTestId('api-tag-Spectra').waitFor()
    const doc = (await (await page.request.get(`${baseUrl}/api/openapi.json`)).json()) as { paths: Record<string, object> }
    const routes = Object.values(doc.paths).reduce((n: number, ops) => n + Object.keys(ops).length, 0)
    expect(await page.locator('.n-collapse-item').count()).toBe(routes)
    await page.locator('.n-collapse-item__header').filter({ hasText: '/spectra/known' }).first().click()
    await page.getByText('Request body').first().waitFor()
    await screenshot(page, 'api-reference')
  })
})
