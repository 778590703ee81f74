/// <reference lib="dom" />
// A QC reviewer adds a clip to a reel in the browser, watches it being sent and measured,
// opens its timeline, steps to the first event with the keyboard, opens that frame's full
// scopes and waives it with a note; the event then shows the decision on the reel page.
// The clip is made here by ffmpeg's generators (tests/unit/clips/make-clips.ts): 320 × 180
// grey at 25 fps from 01:00:00:00 with frames 30–39 at 10-bit code 1000 (8-bit 250: 7.5 +
// 92.5 × 234/219 = 106.3 IRE, above the NTSC spec's 100 IRE) — SMPTE ST 12-1 labels (memory):
// frame 30 is 01:00:01:05, frame 39 is 01:00:01:14 (computed).
// Screens go to test-results/screens/ at 1440 and 390 px wide.
import { randomBytes } from 'node:crypto'
import { readFileSync } from 'node:fs'
import type { Browser, Page } from 'playwright-core'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { DEMO_PRODUCTION, DEMO_USERS } from '../../server/seed/demo'
import { launchBrowser, screen } from '../support/browser'
import { APP_URL } from '../support/env'
import { greyClipWithRunsAsync, tempDir } from '../unit/clips/make-clips'

const reviewer = DEMO_USERS.find((u) => u.role === 'reviewer')!
const url = (path: string) => `${APP_URL()}${path}`
const tmp = tempDir()
let browser: Browser
let page: Page
let reelPath = ''

async function signIn(p: Page, who: { email: string; password: string }, path: string) {
  await p.goto(url(path))
  await p.waitForURL((u) => u.pathname === '/login')
  await p.waitForFunction(() => !!(document.querySelector('#__nuxt') as { __vue_app__?: unknown } | null)?.__vue_app__)
  await p.getByTestId('login-email').fill(who.email)
  await p.getByTestId('login-password').fill(who.password)
  await p.getByTestId('login-submit').click()
  await p.waitForURL((u) => u.pathname === path)
}

beforeAll(async () => {
  browser = await launchBrowser()
  page = await (await browser.newContext({ viewport: { width: 1440, height: 900 } })).newPage()
})
afterAll(async () => {
  await browser?.close()
  tmp.remove()
})

describe('a clip from upload to a waived event', () => {
  it('uploads a clip, shows it being sent and measured, and opens its timeline', async () => {
    await signIn(page, reviewer, '/')
    const productions = await page.request.get(url('/api/teams'))
    expect(productions.status()).toBe(200)
    const teams = await productions.json() as { id: number }[]
    let productionId = 0
    for (const t of teams) {
      const list = await (await page.request.get(url(`/api/teams/${t.id}/productions`))).json() as { productions?: { id: number, name: string }[] } | { id: number, name: string }[]
      const rows = Array.isArray(list) ? list : list.productions ?? []
      const hit = rows.find((p) => p.name === DEMO_PRODUCTION.name)
      if (hit) productionId = hit.id
    }
    expect(productionId).toBeGreaterThan(0)
    const reel = await page.request.post(url(`/api/productions/${productionId}/reels`), { data: { name: `Rough cut ${randomBytes(3).toString('hex')}`, sourceRange: 'studio' } })
    expect(reel.status()).toBe(201)
    reelPath = `/reels/${(await reel.json()).id}`
    await page.goto(url(reelPath))
    await page.getByTestId('clips-panel').waitFor()

    const file = tmp.path('rough-cut.mov')
    await greyClipWithRunsAsync(file, { rate: '25', frames: 100, size: '320x180', runs: [{ from: 30, to: 39, code10: 1000 }], timecode: '01:00:00:00' })
    await page.getByTestId('clip-input').setInputFiles({ name: 'rough-cut.mov', mimeType: 'video/quicktime', buffer: readFileSync(file) })
    await page.getByTestId('clip-sends').waitFor()
    await expect.poll(() => page.locator('[data-testid="clip-sends"] li').first().getAttribute('data-state'), { timeout: 60_000 }).toBe('queued')
    await screen(page, 'clip-01-sent')
    const item = page.locator('[data-testid^="clip-"][data-status]').first()
    await expect.poll(() => item.getAttribute('data-status'), { timeout: 120_000 }).toBe('done')
    expect(await item.innerText()).toContain('starts 01:00:00:00')
    // The clip's event frame and its filmstrip frame join the reel's counts without a reload.
    await expect.poll(() => page.getByTestId('count-fail').innerText(), { timeout: 60_000 }).toBe('1')
    expect(await page.getByTestId('reel-finished-none').count()).toBe(0)
    await item.locator('[data-testid^="clip-open-"]').click()
    await page.getByTestId('clip-timeline-chart').waitFor()
    await expect.poll(() => page.getByTestId('clip-events').innerText()).toContain('01:00:01:05 → 01:00:01:14')
    expect(await page.getByTestId('clip-facts').innerText()).toContain('100 frames')
    await screen(page, 'clip-02-timeline-1440')
    await page.setViewportSize({ width: 390, height: 844 })
    await screen(page, 'clip-03-timeline-390')
    await page.setViewportSize({ width: 1440, height: 900 })
  })

  it('steps to the event with the keyboard, clicks it open to its frame\'s scopes and waives it with a note', async () => {
    await page.keyboard.press('n')
    await expect.poll(() => page.getByTestId('clip-event-1').getAttribute('aria-current')).toBe('true')
    await page.getByTestId('clip-event-1').click()
    await page.waitForURL((u) => /^\/frames\/\d+$/.test(u.pathname))
    await page.getByTestId('waveform-images').waitFor({ timeout: 60_000 })
    await page.getByTestId('vectorscope-image').waitFor()
    await screen(page, 'clip-04-event-frame')
    const note = 'Flash frame in the titles, agreed with the online editor.'
    await page.getByTestId('decision-waived').check({ force: true })
    await page.getByTestId('decision-note-input').fill(note)
    await page.getByTestId('decision-save').click()
    await expect.poll(() => page.getByTestId('decision-current').getAttribute('data-decision')).toBe('waived')
    await page.goBack()
    await page.getByTestId('clip-events').waitFor()
    await expect.poll(() => page.getByTestId('clip-event-1').getByTestId('clip-event-decision').innerText()).toBe(`Waived — ${note}`)
    await screen(page, 'clip-05-event-waived')
  })
})
