/// <reference lib="dom" />
// The editor creates a studio-range reel on the production overview, drops three frame grabs,
// one PNG cut short and one file that is not a picture on its upload area, and watches them
// being measured without reloading the page; the table's units and filters change what it
// shows; a producer sees it all without controls; a QC reviewer waives the caution frame with
// a note; the overview counts it all.
// Screens are saved to test-results/screens/ for a person to look at.
//
// The frames are made here with sharp (320 × 180, RGB on a studio-range reel, BT.601, the demo
// production's NTSC spec: luma 7.5–100 IRE, composite caution from 115, fail above 120 IRE):
//  - normal: a grey ramp of codes 40…200 → 17.6…85.2 IRE, no chroma → pass;
//  - super-white: the ramp with a patch at code 250 → 7.5 + 92.5·(250 − 16)/219 = 106.3 IRE → fail;
//  - yellow: the ramp with a patch R = G = 235, B = 110. With R′ = G′ = 1, B′ = 94/219 = 0.429:
//    Y′ = 0.886 + 0.114·0.429 = 0.935; U = 0.492111·(B′ − Y′) = −0.249, V = 0.877283·(R′ − Y′) = 0.057;
//    C = 0.255; Y′ + C = 1.190 → 7.5 + 92.5·1.190 = 117.6 IRE composite, inside the caution band → caution.
//  (SMPTE 170M — memory — for the IRE scale and U/V weights; `npm run analyse -- FILE --range studio` gives
//  the same three verdicts, 106.3 IRE and 117.6 IRE.)
// The fourth PNG is the yellow one cut after 1,500 bytes: its header (320 × 180) passes the upload
// checks, so it becomes a frame, and the worker then fails to decode it and says why.
import { randomBytes } from 'node:crypto'
import sharp from 'sharp'
import type { Browser, BrowserContext, Page } from 'playwright-core'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { DEMO_PRODUCTION, DEMO_USERS } from '../../server/seed/demo'
import { launchBrowser, screen } from '../support/browser'
import { APP_URL } from '../support/env'

const editor = DEMO_USERS.find((u) => u.role === 'editor')!
const reviewer = DEMO_USERS.find((u) => u.role === 'reviewer')!
const producer = DEMO_USERS.find((u) => u.role === 'producer')!
const reelName = `Day 3 — Camera C ${randomBytes(3).toString('hex')}`
const W = 320
const H = 180

let browser: Browser
let editorCtx: BrowserContext
let reviewerCtx: BrowserContext
let producerCtx: BrowserContext
let page: Page
let reviewerPage: Page
let reelUrl = ''
let productionUrl = ''
const files: { name: string; mimeType: string; buffer: Buffer }[] = []
let truncated: { name: string; mimeType: string; buffer: Buffer }

const url = (path: string) => `${APP_URL()}${path}`
const VIEWPORT = { width: 1280, height: 800 }

async function frame(fill: (x: number, y: number) => [number, number, number]) {
  const data = Buffer.alloc(W * H * 3)
  for (let y = 0; y < H; y++) {
    for (let x = 0; x < W; x++) data.set(fill(x, y), (y * W + x) * 3)
  }
  return sharp(data, { raw: { width: W, height: H, channels: 3 } }).png().toBuffer()
}
// A seeded corner pixel makes each run's pictures new, so none is refused as a duplicate of an earlier run.
const seed = randomBytes(3)
const ramp = (x: number, y: number): [number, number, number] => {
  if (x === 0 && y === 0) return [seed[0]! % 100 + 60, seed[1]! % 100 + 60, seed[2]! % 100 + 60]
  const v = Math.round(40 + (160 * x) / (W - 1))
  return [v, v, v]
}
const inPatch = (x: number, y: number) => x >= 200 && x < 280 && y >= 40 && y < 120

async function signIn(p: Page, who: { email: string; password: string }, path: string) {
  await p.goto(url(path))
  await p.waitForURL((u) => u.pathname === '/login')
  // Typing before the app has hydrated would submit the bare HTML form instead of signing in.
  await p.waitForFunction(() => !!(document.querySelector('#__nuxt') as { __vue_app__?: unknown } | null)?.__vue_app__)
  await p.getByTestId('login-email').fill(who.email)
  await p.getByTestId('login-password').fill(who.password)
  await p.getByTestId('login-submit').click()
  await p.waitForURL((u) => u.pathname === path)
}

const row = (p: Page, name: string) => p.locator(`[data-testid="frame-row"][data-name="${name}"]`)
const cell = (p: Page, name: string, col: string) => row(p, name).locator(`td[data-col="${col}"]`)

beforeAll(async () => {
  files.push(
    { name: 'C001_normal.png', mimeType: 'image/png', buffer: await frame(ramp) },
    { name: 'C002_superwhite.png', mimeType: 'image/png', buffer: await frame((x, y) => (inPatch(x, y) ? [250, 250, 250] : ramp(x, y))) },
    { name: 'C003_yellow.png', mimeType: 'image/png', buffer: await frame((x, y) => (inPatch(x, y) ? [235, 235, 110] : ramp(x, y))) },
  )
  truncated = { name: 'C004_cut_short.png', mimeType: 'image/png', buffer: files[2]!.buffer.subarray(0, 1500) }
  browser = await launchBrowser()
  editorCtx = await browser.newContext({ viewport: VIEWPORT })
  reviewerCtx = await browser.newContext({ viewport: VIEWPORT })
  producerCtx = await browser.newContext({ viewport: VIEWPORT })
  page = await editorCtx.newPage()
  reviewerPage = await reviewerCtx.newPage()
})

afterAll(async () => {
  await browser?.close()
})

describe('a reel from creation to decisions', () => {
  it('lets the editor create a studio-range reel from the production overview', async () => {
    await signIn(page, editor, '/')
    await page.getByTestId('production-row').filter({ hasText: DEMO_PRODUCTION.name }).getByTestId('production-link').click()
    await page.waitForURL((u) => /^\/productions\/\d+$/.test(u.pathname))
    productionUrl = new URL(page.url()).pathname
    expect(await page.getByTestId('production-spec').textContent()).toBe('NTSC broadcast with setup')

    await page.getByTestId('new-reel-open').click()
    // The name is required: the form says so before anything is sent.
    await page.getByTestId('new-reel-submit').click()
    await expect.poll(() => page.getByTestId('new-reel-form').innerText()).toContain('Enter a reel name')
    await page.getByTestId('new-reel-name').fill(reelName)
    await page.getByTestId('new-reel-source').fill('Camera C')
    await page.getByTestId('new-reel-range-studio').check()
    await page.getByTestId('new-reel-matrix-601').check()
    await screen(page, 'reel-01-new-reel-form')
    await page.getByTestId('new-reel-submit').click()

    await page.waitForURL((u) => /^\/reels\/\d+$/.test(u.pathname))
    reelUrl = new URL(page.url()).pathname
    await page.getByRole('heading', { level: 1, name: reelName }).waitFor()
    expect(await page.getByTestId('reel-range').textContent()).toBe('Studio range')
    expect(await page.getByTestId('reel-matrix').textContent()).toBe('BT.601')
    expect(await page.getByTestId('reel-spec').textContent()).toBe('NTSC broadcast with setup')
    await page.getByTestId('frames-empty').waitFor()
    await screen(page, 'reel-02-empty-reel')
  })

  it('uploads four PNGs through the drop zone’s file input, refuses a text file at once, and shows them measured or failed without a reload', async () => {
    // Anything that survives on window proves the page was never reloaded.
    await page.evaluate(() => { (window as unknown as { lwMarker: number }).lwMarker = 4417 })
    await page.getByTestId('file-input').setInputFiles([
      ...files,
      truncated,
      { name: 'shot-notes.txt', mimeType: 'text/plain', buffer: Buffer.from('not a picture') },
    ])
    const refused = page.locator('[data-testid="upload-item"][data-name="shot-notes.txt"]')
    await expect.poll(() => refused.getAttribute('data-state')).toBe('refused')
    expect(await refused.getByTestId('upload-reason').textContent()).toBe('“.txt” files are not read: send PNG, TIFF, JPEG or WebP stills, or raw .uyvy, .yuv or .v210')

    for (const f of [...files, truncated]) {
      await expect.poll(() => page.locator(`[data-testid="upload-item"][data-name="${f.name}"]`).getAttribute('data-state'), { timeout: 30_000 }).toBe('queued')
    }
    expect(await page.getByTestId('upload-summary').textContent()).toMatch(/^5 of 5 sent · 4 stored · 1 refused · \d of 4 analysed/)

    // The rows appear and reach "done" by polling alone.
    for (const f of files) {
      await expect.poll(() => cell(page, f.name, 'status').locator('[data-testid="frame-status"]').getAttribute('data-status'), { timeout: 60_000 }).toBe('done')
    }
    expect(await page.evaluate(() => (window as unknown as { lwMarker?: number }).lwMarker)).toBe(4417)
    // No file carries a timecode (in its metadata or name): the table says so.
    expect(await page.getByTestId('frame-timecode').allInnerTexts()).toEqual(['no timecode', 'no timecode', 'no timecode', 'no timecode'])
    // Sent in parallel, confirmed in file order: the reel's index follows the file names.
    expect(await page.getByTestId('frame-row').evaluateAll((rows) => rows.map((r) => [r.querySelector('td[data-col="seq"] [data-testid="frame-seq"]')?.textContent?.trim(), r.getAttribute('data-name')])))
      .toEqual([['#1', 'C001_normal.png'], ['#2', 'C002_superwhite.png'], ['#3', 'C003_yellow.png'], ['#4', 'C004_cut_short.png']])

    // The cut-short PNG fails in the worker; its reason is shown in the table and in the list of failed frames.
    await expect.poll(() => cell(page, truncated.name, 'status').locator('[data-testid="frame-status"]').getAttribute('data-status'), { timeout: 60_000 }).toBe('failed')
    expect(await cell(page, truncated.name, 'name').getByTestId('frame-fail-reason').textContent()).toMatch(/cannot be decoded/)
    await page.getByTestId('failed-frames').getByTestId('failed-frame').filter({ hasText: truncated.name }).waitFor()
    expect(await page.getByTestId('failed-frames').innerText()).toMatch(/1 frame could not be measured[\s\S]*C004_cut_short\.png[\s\S]*cannot be decoded/)
    await expect.poll(() => page.getByTestId('reel-finished').textContent()).toBe('4 of 4')
    // One truth for each file: once the table shows every frame finished, so does the upload list.
    await expect.poll(() => page.getByTestId('upload-summary').textContent())
      .toBe('5 of 5 sent · 4 stored · 1 refused · 4 of 4 analysed, 1 not measured')
    for (const f of files) {
      expect(await page.locator(`[data-testid="upload-item"][data-name="${f.name}"]`).getAttribute('data-frame-status')).toBe('done')
      expect(await page.locator(`[data-testid="upload-item"][data-name="${f.name}"]`).getByTestId('upload-state').innerText())
        .toBe('stored · measured')
    }
    expect(await page.locator(`[data-testid="upload-item"][data-name="${truncated.name}"]`).getAttribute('data-frame-status')).toBe('failed')
    await screen(page, 'reel-03-uploaded-and-measured')
  })

  it('gives each frame the verdict the engine computes, and its levels in IRE', async () => {
    const verdict = (name: string) => cell(page, name, 'verdict').locator('[data-testid="verdict-badge"]').getAttribute('data-verdict')
    expect(await verdict('C001_normal.png')).toBe('pass')
    expect(await verdict('C002_superwhite.png')).toBe('fail')
    expect(await verdict('C003_yellow.png')).toBe('caution')
    expect(await cell(page, 'C001_normal.png', 'verdict').innerText()).toContain('Pass')

    // 7.5 + 92.5·(200 − 16)/219 = 85.2; the super-white patch 106.3; the yellow composite 117.6 (see the top of this file).
    expect(await cell(page, 'C001_normal.png', 'lumaMax').innerText()).toBe('85.2')
    expect(await cell(page, 'C002_superwhite.png', 'lumaMax').innerText()).toBe('106.3')
    expect(await cell(page, 'C003_yellow.png', 'compMax').innerText()).toBe('117.6')
    expect(await page.getByTestId('count-pass').textContent()).toBe('1')
    expect(await page.getByTestId('count-caution').textContent()).toBe('1')
    expect(await page.getByTestId('count-fail').textContent()).toBe('1')
    // An editor sees decisions but cannot make them.
    expect(await page.getByTestId('select-row').count()).toBe(0)
    expect(await page.getByTestId('decide-role-note').count()).toBe(1)
  })

  it('shows the same levels in 8-bit codes and millivolts when the unit is switched, keeping composite in IRE', async () => {
    await page.getByTestId('scale-switch').locator('label').filter({ has: page.locator('input[data-scale="code8"]') }).click()
    // Luma 106.3 IRE is code 250 (the patch itself); 85.2 IRE is code 200.
    await expect.poll(() => cell(page, 'C002_superwhite.png', 'lumaMax').innerText()).toBe('250')
    expect(await cell(page, 'C001_normal.png', 'lumaMax').innerText()).toBe('200')
    expect(await cell(page, 'C001_normal.png', 'lumaMin').innerText()).toBe('40')
    // Composite has no code value: it stays in IRE and its heading says so.
    expect(await cell(page, 'C003_yellow.png', 'compMax').innerText()).toBe('117.6')
    expect(await page.locator('th[data-col="compMax"]').innerText()).toMatch(/\(IRE\)/i)
    expect(await page.locator('th[data-col="lumaMax"]').innerText()).toMatch(/\(8-bit\)/i)
    await screen(page, 'reel-04-unit-8-bit')

    await page.getByTestId('scale-switch').locator('label').filter({ has: page.locator('input[data-scale="mv"]') }).click()
    // (250 − 16)/219 × 700 mV = 748 mV; (200 − 16)/219 × 700 = 588 mV.
    await expect.poll(() => cell(page, 'C002_superwhite.png', 'lumaMax').innerText()).toBe('748')
    expect(await cell(page, 'C001_normal.png', 'lumaMax').innerText()).toBe('588')

    await page.getByTestId('scale-switch').locator('label').filter({ has: page.locator('input[data-scale="ire0"]') }).click()
    // Without setup the composite follows: (117.6 − 7.5)/92.5 × 100 = 119.0.
    await expect.poll(() => cell(page, 'C003_yellow.png', 'compMax').innerText()).toBe('119.0')

    await page.getByTestId('scale-switch').locator('label').filter({ has: page.locator('input[data-scale="ire"]') }).click()
    await expect.poll(() => cell(page, 'C002_superwhite.png', 'lumaMax').innerText()).toBe('106.3')
  })

  it('filters by verdict on the server and keeps the filter in the address', async () => {
    await page.getByTestId('filter-verdict').selectOption('fail')
    await page.waitForURL((u) => u.searchParams.get('verdict') === 'fail')
    await expect.poll(() => page.getByTestId('frame-row').count()).toBe(1)
    expect(await page.getByTestId('frame-row').getAttribute('data-name')).toBe('C002_superwhite.png')
    expect(await page.getByTestId('frames-range').textContent()).toBe('1–1 of 1')
    await screen(page, 'reel-05-filtered-fail')

    // A search that matches nothing says so; clearing the filters brings every frame back.
    await page.getByTestId('filter-search').fill('nothing-like-this')
    await page.getByTestId('frames-none-match').waitFor()
    await page.getByTestId('filter-clear').click()
    await expect.poll(() => page.getByTestId('frame-row').count()).toBe(4)
    expect(new URL(page.url()).search).toBe('')
  })

  it('shows a producer the same reel with no upload area and no decision controls', async () => {
    const p = await producerCtx.newPage()
    await signIn(p, producer, reelUrl)
    await row(p, 'C003_yellow.png').waitFor()
    expect(await p.getByTestId('drop-zone').count()).toBe(0)
    expect(await p.getByTestId('reel-no-upload').count()).toBe(1)
    expect(await p.getByTestId('select-row').count()).toBe(0)
    expect(await p.getByTestId('decide-role-note').count()).toBe(1)
    await screen(p, 'reel-06-producer')
    await p.close()
  })

  it('lets a QC reviewer waive the caution frame, asking for a note first', async () => {
    await signIn(reviewerPage, reviewer, reelUrl)
    const yellow = row(reviewerPage, 'C003_yellow.png')
    await yellow.getByTestId('select-row').check()
    await reviewerPage.getByTestId('bulk-decision').waitFor()
    expect(await reviewerPage.getByTestId('bulk-count').textContent()).toBe('1 frame selected')
    await reviewerPage.getByTestId('bulk-decision').locator('label').filter({ hasText: 'Waived' }).click()
    await reviewerPage.getByTestId('bulk-apply').click()
    await expect.poll(() => reviewerPage.getByTestId('bulk-decision').innerText()).toContain('A note is required to waive frames')

    await reviewerPage.getByTestId('bulk-note').fill('Specular glint on the sign; the grade keeps it.')
    await screen(reviewerPage, 'reel-07-bulk-waive')
    await reviewerPage.getByTestId('bulk-apply').click()
    await expect.poll(() => reviewerPage.getByTestId('decision-notice').textContent()).toBe('1 frame waived.')
    await expect.poll(() => yellow.locator('[data-testid="decision-badge"]').getAttribute('data-decision')).toBe('waived')
    expect(await yellow.locator('td[data-col="decision"]').innerText()).toContain('Specular glint on the sign')

    // The decision filter is the server's: "waived" lists exactly that frame, "undecided" the other two.
    await reviewerPage.getByTestId('filter-decision').selectOption('waived')
    await expect.poll(() => reviewerPage.getByTestId('frame-row').count()).toBe(1)
    await reviewerPage.getByTestId('filter-decision').selectOption('none')
    await expect.poll(() => reviewerPage.getByTestId('frame-row').evaluateAll((rows) => rows.map((r) => r.getAttribute('data-name'))))
      .toEqual(['C001_normal.png', 'C002_superwhite.png', 'C004_cut_short.png'])
    // A frame that could not be measured cannot be decided.
    expect(await row(reviewerPage, 'C004_cut_short.png').getByTestId('select-row').isDisabled()).toBe(true)
    await screen(reviewerPage, 'reel-08-undecided')
  })

  it('counts the reel on the production overview by verdict, decision and progress', async () => {
    await page.goto(url(productionUrl))
    const reelRow = page.getByTestId('reel-row').filter({ hasText: reelName })
    await reelRow.waitFor()
    expect(await reelRow.getByTestId('reel-total').textContent()).toBe('4')
    expect((await reelRow.getByTestId('reel-verdicts').innerText()).replace(/\s+/g, ' ')).toBe('1 pass 1 caution 1 fail')
    expect((await reelRow.getByTestId('reel-decisions').innerText()).replace(/\s+/g, ' ')).toBe('Accepted 0 · Rejected 0 Waived 1 · Undecided 2')
    expect(await reelRow.getByTestId('reel-analysed').innerText()).toBe('4/4')
    expect(await reelRow.innerText()).toContain('1 failed')
    await screen(page, 'reel-09-production-overview')
  })
})
