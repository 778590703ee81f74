// An editor's reel of SD colour bars set to BT.709 by mistake: the reel page warns that the
// size is usually BT.601, the editor changes the matrix before sign-off and the verdicts
// follow from the kept originals; timecodes read from the file names appear in the table
// and on the frame page ("no timecode" where there is none); the frame's scopes carry their
// numbers as text in the chosen unit. 75 % bars (SMPTE EG 1 — memory) coded BT.601 stay
// within the −20 IRE composite floor; read as BT.709 the blue bar falls below it.
// Screens at 1440 and 390 px go to test-results/screens/.
import { randomBytes } from 'node:crypto'
import sharp from 'sharp'
import type { Browser, BrowserContext, Page } from 'playwright-core'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { DEMO_PRODUCTION, DEMO_USERS } from '../../server/seed/demo'
import { launchBrowser, screen } from '../support/browser'
import { APP_URL } from '../support/env'

const editor = DEMO_USERS.find((u) => u.role === 'editor')!
const reelName = `Bars check ${randomBytes(3).toString('hex')} (fictional)`
const url = (path: string) => `${APP_URL()}${path}`
const DESKTOP = { width: 1440, height: 900 }
const PHONE = { width: 390, height: 844 }

let browser: Browser
let ctx: BrowserContext
let page: Page
let reelUrl = ''

/** 75 % bars, full-range 8-bit RGB (0.75 × 255 = 191, computed); a seeded pixel keeps each run's file new. */
async function bars(width: number, height: number) {
  const cols = [[191, 191, 191], [191, 191, 0], [0, 191, 191], [0, 191, 0], [191, 0, 191], [191, 0, 0], [0, 0, 191]]
  const px = Buffer.alloc(width * height * 3)
  for (let y = 0; y < height; y++) for (let x = 0; x < width; x++) px.set(cols[Math.min(6, Math.floor((x * 7) / width))]!, (y * width + x) * 3)
  px.set(randomBytes(3).map((b) => 60 + (b % 100)), 0)
  return sharp(px, { raw: { width, height, channels: 3 } }).png().toBuffer()
}

const row = (name: string) => page.locator(`[data-testid="frame-row"][data-name="${name}"]`)

async function signIn(path: string) {
  await page.goto(url(path))
  await page.waitForURL((u) => u.pathname === '/login')
  await page.waitForFunction(() => !!(document.querySelector('#__nuxt') as { __vue_app__?: unknown } | null)?.__vue_app__)
  await page.getByTestId('login-email').fill(editor.email)
  await page.getByTestId('login-password').fill(editor.password)
  await page.getByTestId('login-submit').click()
  await page.waitForURL((u) => u.pathname === path)
}

async function both(name: string) {
  await page.setViewportSize(PHONE)
  await screen(page, `${name}-390`)
  await page.setViewportSize(DESKTOP)
  await screen(page, `${name}-1440`)
}

beforeAll(async () => {
  browser = await launchBrowser()
  ctx = await browser.newContext({ viewport: DESKTOP })
  page = await ctx.newPage()
})
afterAll(async () => { await browser?.close() })

describe('reel settings, timecode and readable scopes', () => {
  it('creates a BT.709 reel at 29.97 drop-frame and reads timecodes from the file names', async () => {
    await signIn('/')
    await page.getByTestId('production-row').filter({ hasText: DEMO_PRODUCTION.name }).getByTestId('production-link').click()
    await page.waitForURL((u) => /^\/productions\/\d+$/.test(u.pathname))
    await page.getByTestId('new-reel-open').click()
    await page.getByTestId('new-reel-name').fill(reelName)
    await page.getByTestId('new-reel-matrix-709').check()
    await page.getByTestId('new-reel-frame-rate').selectOption('29.97')
    await page.getByTestId('new-reel-drop-frame').check()
    await page.getByTestId('new-reel-submit').click()
    await page.waitForURL((u) => /^\/reels\/\d+$/.test(u.pathname))
    reelUrl = new URL(page.url()).pathname
    expect(await page.getByTestId('reel-frame-rate').innerText()).toContain('29.97 fps drop-frame')

    await page.getByTestId('file-input').setInputFiles([
      { name: 'bars_01-00-00-00.png', mimeType: 'image/png', buffer: await bars(720, 486) },
      { name: 'bars_plain.png', mimeType: 'image/png', buffer: await bars(720, 486) },
    ])
    await expect.poll(() => row('bars_plain.png').locator('[data-testid="verdict-badge"]').getAttribute('data-verdict'), { timeout: 90_000 }).toBe('fail')
    await expect.poll(() => row('bars_01-00-00-00.png').locator('[data-testid="verdict-badge"]').getAttribute('data-verdict'), { timeout: 90_000 }).toBe('fail')
    expect(await row('bars_01-00-00-00.png').getByTestId('frame-timecode').innerText()).toBe('01:00:00;00')
    expect(await row('bars_plain.png').getByTestId('frame-timecode').innerText()).toBe('no timecode')
  })

  it('warns that 720×486 is usually BT.601 and lets the editor change the matrix, re-measuring the frames', async () => {
    await page.getByTestId('matrix-warning').waitFor()
    expect((await page.getByTestId('matrix-warning').innerText()).replace(/\s+/g, ' ')).toContain('2 frames are 720×486, a size usually coded BT.601, but this reel measures with BT.709')
    await both('settings-01-reel-matrix-warning')
    await page.getByTestId('matrix-warning-change').click()
    await page.getByTestId('settings-matrix-601').check()
    expect(await page.getByTestId('settings-remeasure-note').innerText()).toContain('all 2 frames again from the kept originals')
    await both('settings-02-reel-settings-form')
    await page.getByTestId('settings-save').click()
    await expect.poll(() => page.getByTestId('settings-notice').innerText()).toContain('being measured again')
    await expect.poll(() => page.getByTestId('reel-matrix').innerText()).toBe('BT.601')
    await expect.poll(() => row('bars_plain.png').locator('[data-testid="verdict-badge"]').getAttribute('data-verdict'), { timeout: 90_000 }).toBe('pass')
    await expect.poll(() => row('bars_01-00-00-00.png').locator('[data-testid="verdict-badge"]').getAttribute('data-verdict'), { timeout: 90_000 }).toBe('pass')
    expect(await page.getByTestId('matrix-warning').count()).toBe(0)
    await both('settings-03-reel-remeasured')
  })

  it('names the frame by its timecode and writes the scope scales as text, in the chosen unit', async () => {
    await row('bars_01-00-00-00.png').getByTestId('frame-link').click()
    await page.waitForURL((u) => /^\/frames\/\d+$/.test(u.pathname))
    await page.getByTestId('waveform-images').waitFor()
    expect(await page.getByTestId('frame-page').innerText()).toContain('TC 01:00:00;00')
    await page.getByTestId('unit-select').first().selectOption('code10')
    await expect.poll(() => page.getByTestId('waveform-images').getAttribute('data-scale')).toBe('code10')
    const labels = await page.getByTestId('waveform-scale-label').allInnerTexts()
    expect(labels).toEqual(expect.arrayContaining(['64', '940']))
    // Readable: the numbers are real text of at least 11 px, not pixels inside the image.
    const size = await page.getByTestId('waveform-scale-label').first().evaluate((el) => parseFloat(getComputedStyle(el).fontSize))
    expect(size).toBeGreaterThanOrEqual(11)
    expect(await page.getByTestId('vectorscope-target-label').allInnerTexts()).toEqual(expect.arrayContaining(['R', 'Mg', 'B', 'Cy', 'G', 'Yl']))
    expect(await page.getByTestId('vectorscope-skin-label').innerText()).toBe('skin tone')
    await both('settings-04-frame-scopes-10-bit')
    await page.getByTestId('unit-select').first().selectOption('ire')
  })

  it('refuses drop-frame at a rate that has none, with a reason', async () => {
    await page.goto(url(reelUrl))
    await page.getByTestId('reel-settings-open').waitFor()
    const id = Number(reelUrl.split('/').pop())
    const res = await page.evaluate(async (reelId) => (await fetch(`/api/reels/${reelId}`, { method: 'PATCH', headers: { 'content-type': 'application/json' }, body: JSON.stringify({ dropFrame: true, frameRate: '25' }) })).status, id)
    expect(res).toBe(422)
  })
})
