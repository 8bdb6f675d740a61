import { mkdirSync, mkdtempSync, rmSync } from 'node:fs'
import { tmpdir } from 'node:os'
import { join } from 'node:path'
import { chromium, type BrowserContext, type Page } from 'playwright-core'

export const SCREENSHOTS = join(process.cwd(), '.test-artifacts', 'screenshots')

/** Debian's chromium, headless, with the network chatter switched off (this machine has no internet). */
export async function openBrowser(): Promise<{ context: BrowserContext; page: Page; close(): Promise<void> }> {
  const profile = mkdtempSync(join(tmpdir(), 'lineweight-chromium-'))
  const context = await chromium.launchPersistentContext(profile, {
    executablePath: process.env.CHROMIUM_PATH ?? '/usr/bin/chromium',
    headless: true,
    viewport: { width: 1440, height: 900 },
    args: ['--headless', '--no-sandbox', '--disable-gpu', '--disable-quic', '--no-first-run', '--disable-background-networking', '--disable-component-update', '--disable-sync'],
  })
  const page = context.pages()[0] ?? (await context.newPage())
  return {
    context,
    page,
    async close() {
      await context.close()
      rmSync(profile, { recursive: true, force: true })
    },
  }
}

export async function screenshot(page: Page, name: string): Promise<void> {
  mkdirSync(SCREENSHOTS, { recursive: true })
  await page.screenshot({ path: join(SCREENSHOTS, `${name}.png`), fullPage: true })
}

/** Signs in through the form, starting from no session, and waits for the signed-in header. */
export async function signIn(page: Page, baseUrl: string, who: { email: string; password: string }): Promise<void> {
  await page.context().clearCookies()
  await page.goto(`${baseUrl}/sign-in`)
  await page.getByTestId('signin-email').fill(who.email)
  await page.getByTestId('signin-password').fill(who.password)
  await page.getByTestId('signin-password').press('Enter')
  await page.getByTestId('user-name').waitFor()
}
