import { afterAll, beforeAll, describe, expect, inject, it } from 'vitest'
import type { Page } from 'playwright-core'
import { openBrowser, screenshot, signIn as signInAt } from './browser'

// A lead settles a dispute of the seeded demo; the observer who submitted the spectrum sees the
// result, and the mail that tells them is in the Outbox. The dispute is picked from the list.
const baseUrl = inject('baseUrl')
const LEAD = { email: 'lead@kestrel-ridge.example', password: 'lead-demo-2026' }
const OBSERVER = { email: 'observer@kestrel-ridge.example', password: 'observer-demo-2026' }
let browser: Awaited<ReturnType<typeof openBrowser>>

beforeAll(async () => {
  browser = await openBrowser()
})
afterAll(async () => {
  await browser.close()
})

const signIn = (page: Page, who: { email: string; password: string }) => signInAt(page, baseUrl, who)

describe('settling a dispute', () => {
  let settled: { spectrumId: number; objectName: string; type: string } | null = null

  it('lets the lead compare the calls and settle one', async () => {
    const { page } = browser
    // Prefer a dispute on a spectrum the demo observer submitted, so the rest of the journey can follow it.
    await signIn(page, OBSERVER)
    const mine = (await (await page.request.get(`${baseUrl}/api/spectra?status=disputed&pageSize=100`)).json()) as { items: { id: number }[] }
    const theirs = new Set(mine.items.map((s) => s.id))

    await signIn(page, LEAD)
    await page.goto(`${baseUrl}/disputes`)
    await page.getByTestId('dispute-row').first().waitFor()
    const rows = await page.getByTestId('dispute-row').evaluateAll((els) => els.map((e) => Number(e.getAttribute('data-spectrum-id'))))
    const pick = rows.findIndex((id) => theirs.has(id))
    const row = page.getByTestId('dispute-row').nth(Math.max(0, pick))
    const spectrumId = Number(await row.getAttribute('data-spectrum-id'))
    await row.click()
    await page.getByTestId('dispute-detail').waitFor()
    expect(await page.getByTestId('dispute-call').count()).toBeGreaterThanOrEqual(2)
    await page.getByTestId('dispute-plot').waitFor()
    await screenshot(page, 'dispute-detail')

    await page.getByTestId('settle-submit').click()
    await page.getByText('Say why you settled it this way.').waitFor()

    await page.getByTestId('settle-preset').first().click()
    await page.getByTestId('settle-note').fill('The Balmer wings and Ca II K agree with the first call.')
    const preview = (await page.getByText(/Settles as/).textContent()) ?? ''
    const type = preview.replace('Settles as', '').trim()
    const objectName = (await page.locator('.disputes__title').textContent())?.trim() ?? ''
    await page.getByTestId('settle-submit').click()
    await page.getByText(`is settled as ${type}`).waitFor()

    const after = (await (await page.request.get(`${baseUrl}/api/disputes?state=settled`)).json()) as { disputes: { spectrum: { id: number }; settlement: { spectralType: string } | null }[] }
    const found = after.disputes.find((d) => d.spectrum.id === spectrumId)
    expect(found?.settlement?.spectralType).toBe(type)
    await page.getByTestId('disputes-show').getByText('Settled').click()
    await page.locator(`[data-testid="dispute-row"][data-spectrum-id="${spectrumId}"][data-state="settled"]`).click()
    await page.getByTestId('dispute-settlement').waitFor()
    await screenshot(page, 'dispute-settled')
    settled = { spectrumId, objectName, type }
  })

  it('shows the observer the settled classification', async (ctx) => {
    const { page } = browser
    if (!settled) return ctx.skip()
    await signIn(page, OBSERVER)
    const res = await page.request.get(`${baseUrl}/api/spectra/${settled.spectrumId}`)
    if (res.status() !== 200) return ctx.skip()
    await page.goto(`${baseUrl}/spectra/${settled.spectrumId}`)
    await expect.poll(async () => (await page.getByTestId('spectrum-classification').textContent()) ?? '').toContain(settled.type)
    await screenshot(page, 'observer-settled')
  })

  it('puts the mail to the observer in the Outbox', async (ctx) => {
    const { page } = browser
    if (!settled) return ctx.skip()
    await signIn(page, LEAD)
    await page.goto(`${baseUrl}/outbox`)
    const row = page.getByTestId('outbox-row').filter({ hasText: `${settled.objectName} is classified ${settled.type}` })
    await row.first().waitFor()
    await row.first().click()
    await screenshot(page, 'outbox-settled-mail')
  })
})

describe('sending a dispute to a third classifier', () => {
  it('asks another call, and the lead’s own call makes a majority that decides it', async () => {
    const { page } = browser
    await signIn(page, LEAD)
    await page.goto(`${baseUrl}/disputes`)
    await page.getByTestId('dispute-row').first().waitFor()
    const row = page.locator('[data-testid="dispute-row"][data-state="open"]').first()
    const spectrumId = Number(await row.getAttribute('data-spectrum-id'))
    await row.click()
    await page.getByTestId('dispute-another-call').waitFor()
    await page.getByTestId('dispute-answer-note').fill('Two calls four subtypes apart: a third look at He I 4471 and Mg II 4481, please.')
    await screenshot(page, 'dispute-send-back')
    await page.getByTestId('dispute-another-call').click()
    await page.getByTestId('dispute-action').waitFor()
    expect(await page.getByTestId('dispute-action').textContent()).toContain('Sent to a third classifier')
    await screenshot(page, 'dispute-sent-to-third')

    const list = (await (await page.request.get(`${baseUrl}/api/disputes?state=another-call`)).json()) as {
      disputes: { spectrum: { id: number }; calls: { letter: string; subtype: number; luminosityClass: string }[] }[]
    }
    const sent = list.disputes.find((d) => d.spectrum.id === spectrumId)
    expect(sent).toBeDefined()
    const first = sent!.calls[0]!

    // The lead is the third classifier here: the spectrum is back in their queue, needing one more call.
    await page.goto(`${baseUrl}/review/${spectrumId}`)
    await page.getByTestId('call-form').waitFor()
    await page.locator('body').focus()
    await page.keyboard.press('/')
    await page.keyboard.type(`${first.letter}${first.subtype}`)
    await page.keyboard.press('Tab')
    await page.keyboard.type(first.luminosityClass)
    await page.keyboard.press('Enter')
    await page.getByTestId('blind-reveal').waitFor({ timeout: 15_000 })
    expect(await page.getByTestId('blind-reveal').textContent()).toContain('is agreed')
    await screenshot(page, 'dispute-third-call-agreed')
    const spectrum = (await (await page.request.get(`${baseUrl}/api/spectra/${spectrumId}/review`)).json()) as { spectrum: { status: string }; classification: { nCalls: number } | null }
    expect(spectrum.spectrum.status).toBe('agreed')
    expect(spectrum.classification?.nCalls).toBe(3)
  })
})
