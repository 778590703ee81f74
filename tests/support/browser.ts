import { mkdirSync } from 'node:fs'
import { join } from 'node:path'
import { chromium, type Browser, type Page } from 'playwright-core'

// Debian's chromium (installed by `npm test` when missing); never a downloaded browser.
const ARGS = ['--headless', '--no-sandbox', '--disable-gpu', '--disable-quic', '--no-first-run',
  '--disable-background-networking', '--disable-component-update', '--disable-sync']

/** Playwright gives each launch a fresh temporary profile of its own. */
export async function launchBrowser(): Promise<Browser> {
  return chromium.launch({ executablePath: '/usr/bin/chromium', args: ARGS })
}

export const SCREEN_DIR = join(process.cwd(), 'test-results', 'screens')

/** Saves a full-page screenshot under test-results/screens/ for a person to look at. */
export async function screen(page: Page, name: string) {
  mkdirSync(SCREEN_DIR, { recursive: true })
  await page.screenshot({ path: join(SCREEN_DIR, `${name}.png`), fullPage: true })
}
