// The frame page and the compare page, end to end: the demo editor uploads two frames the
// test draws (100 % bars, which overshoot the composite limit of the NTSC spec, and 75 %
// bars, which pass), opens the frame, plots a line, switches units; a reviewer waives the
// hot frame; the editor's own attempt is refused; the compare page sets the two frames side
// by side. Screens go to test-results/screens/ for a person to look at.
// Sources of the expected figures: ITU-R BT.601-7 Table 3 (codes 16/235, 64/940 — memory),
// ITU-R BT.801-1 Table 1 (bar codes — memory; computed from the BT.601 equations),
// SMPTE 170M and EG 1 (IRE levels, the 75 %/100 % bar table — computed, SMPTE 170M weights from memory,
// tolerance ≥ 0.5 IRE and 1° as tables from rounded coefficients need), composite limits of the NTSC spec (NTSC practice).
import type { Browser, BrowserContext, Page } from 'playwright-core'
import sharp from 'sharp'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { DEMO_PRODUCTION, DEMO_TEAM, DEMO_USERS } from '../../server/seed/demo'
import { lineAtOffset } from '../../app/utils/picture'
import { type Client, signedIn } from '../support/api'
import { launchBrowser, screen } from '../support/browser'
import { APP_URL } from '../support/env'

const editor = DEMO_USERS.find((u) => u.role === 'editor')!
const reviewer = DEMO_USERS.find((u) => u.role === 'reviewer')!
const url = (path: string) => `${APP_URL()}${path}`
const VIEWPORT = { width: 1280, height: 800 }
const W = 720
const H = 480

type Rgb = [number, number, number]
const BAR_ORDER: Rgb[] = [[1, 1, 1], [1, 1, 0], [0, 1, 1], [0, 1, 0], [1, 0, 1], [1, 0, 0], [0, 0, 1], [0, 0, 0]]

/**
 * Eight equal bars over the top two thirds (white, yellow, cyan, green, magenta, red, blue,
 * black at `barCode`), and two patches below. Equal bars average to grey (their Cb and Cr
 * codes sum to 8 × 128, ITU-R BT.801-1 Table 1 — memory; computed), so the frame's mean hue is the hue of `patch`.
 */
function frame(barCode: number, patch: Rgb, right: Rgb): Promise<Buffer> {
  const data = Buffer.alloc(W * H * 3)
  for (let y = 0; y < H; y++) {
    for (let x = 0; x < W; x++) {
      const c: Rgb = y < (H * 2) / 3
        ? BAR_ORDER[Math.floor((x * 8) / W)]!.map((v) => v * barCode) as Rgb
        : x < W / 2 ? patch : right
      data.set(c, (y * W + x) * 3)
    }
  }
  return sharp(data, { raw: { width: W, height: H, channels: 3 } }).png().toBuffer()
}

let browser: Browser
let editorCtx: BrowserContext
let reviewerCtx: BrowserContext
let ed: Page
let rv: Page
let editorApi: Client
let hotId = 0
let normalId = 0
let reelId = 0

/** Server-rendered controls do nothing until the page has hydrated. */
async function openFrame(page: Page, id: number) {
  await page.goto(url(`/frames/${id}`))
  await page.locator(`[data-testid="frame-page"][data-frame-id="${id}"][data-hydrated="yes"]`).waitFor()
}

async function signIn(page: Page, user: { email: string, password: string }) {
  await page.goto(url('/login'))
  await page.getByTestId('login-email').fill(user.email)
  await page.getByTestId('login-password').fill(user.password)
  await page.getByTestId('login-submit').click()
  await page.waitForURL((u) => u.pathname === '/')
}

async function analysed(id: number) {
  const deadline = Date.now() + 90_000
  for (;;) {
    const r = await editorApi.get(`/api/frames/${id}`)
    if (r.body?.frame?.status === 'done') return r.body
    if (r.body?.frame?.status === 'failed') throw new Error(`frame ${id} failed: ${r.body.frame.failReason}`)
    if (Date.now() > deadline) throw new Error(`frame ${id} not analysed in time (${r.status} ${r.body?.frame?.status})`)
    await new Promise((res) => setTimeout(res, 300))
  }
}

beforeAll(async () => {
  editorApi = await signedIn(editor.email, editor.password)
  const me = await editorApi.get('/api/me')
  const team = me.body.teams.find((t: { name: string }) => t.name === DEMO_TEAM)
  const productions = await editorApi.get(`/api/teams/${team.id}/productions`)
  const production = productions.body.find((p: { name: string }) => p.name === DEMO_PRODUCTION.name)
  const reel = await editorApi.post(`/api/productions/${production.id}/reels`, { name: `Day 2 — Camera B ${Date.now().toString(36)}`, sourceLabel: 'Camera B' })
  expect(reel.status).toBe(201)
  reelId = reel.body.id
  // 100 % bars with a 75 % yellow patch and a white patch; 75 % bars (8-bit 191) with a 75 % red patch and black.
  const hot = await frame(255, [191, 191, 0], [255, 255, 255])
  const normal = await frame(191, [191, 0, 0], [0, 0, 0])
  const up = await editorApi.uploadFrames(reelId, [{ name: 'B012_bars100.png', bytes: hot }, { name: 'B013_bars75.png', bytes: normal }])
  expect(up.status).toBe(201)
  hotId = up.body.files[0]!.frameId!
  normalId = up.body.files[1]!.frameId!
  await analysed(hotId)
  await analysed(normalId)

  browser = await launchBrowser()
  editorCtx = await browser.newContext({ viewport: VIEWPORT })
  reviewerCtx = await browser.newContext({ viewport: VIEWPORT })
  ed = await editorCtx.newPage()
  rv = await reviewerCtx.newPage()
})

afterAll(async () => {
  await browser?.close()
})

describe('the frame page', () => {
  it('shows the hot frame failing the composite limits, with the spec and engine named', async () => {
    await signIn(ed, editor)
    await openFrame(ed, hotId)
    expect(await ed.getByTestId('verdict-badge').first().getAttribute('data-verdict')).toBe('fail')
    // SMPTE EG 1 bars (computed): 100 % bars reach +130.8 and −23.3 IRE, beyond the spec's +120 / −20 (NTSC practice).
    const limits = await ed.getByTestId('verdict-reason').evaluateAll((els) => els.map((e) => e.getAttribute('data-limit')))
    expect(limits.sort()).toEqual(['composite-max', 'composite-min'])
    const high = await ed.locator('[data-testid="verdict-reason"][data-limit="composite-max"]').innerText()
    const measured = Number(/measured\s*([\d.]+) IRE/.exec(high)![1])
    expect(Math.abs(measured - 130.8)).toBeLessThanOrEqual(0.5)
    expect(high).toContain('120.0 IRE')
    expect(await ed.getByTestId('verdict-spec').innerText()).toMatch(/NTSC broadcast with setup \(version \d+\) · engine \d+\.\d+\.\d+/)
    expect(await ed.getByTestId('keyboard-hint').innerText()).toContain('next frame')
    await screen(ed, 'frame-01-hot-frame-as-editor')
  })

  it('plots the line clicked on the picture and remembers it in the address', async () => {
    const pic = ed.getByTestId('frame-picture')
    const box = (await pic.boundingBox())!
    const y = box.height * 0.3
    const want = lineAtOffset(y, box.height, H)
    await pic.click({ position: { x: box.width / 2, y } })
    await expect.poll(() => ed.getByTestId('line-number').textContent()).toBe(String(want))
    expect(new URL(ed.url()).searchParams.get('line')).toBe(String(want))
    const chart = ed.getByTestId('line-plot-chart')
    await chart.waitFor()
    // One point per sample of the 720-sample line.
    expect(await chart.getAttribute('data-samples')).toBe(String(W))
    expect(await chart.locator('canvas').count()).toBeGreaterThan(0)
    // The marker sits on the picture at the chosen line.
    const marker = (await ed.getByTestId('line-marker').boundingBox())!
    expect(Math.abs(marker.y - (box.y + ((want + 0.5) / H) * box.height))).toBeLessThan(2)
    // Hovering the start of the line reads the first bar: white, 100 IRE (SMPTE 170M), no chroma.
    const cb = (await chart.boundingBox())!
    await chart.hover({ position: { x: 60, y: cb.height / 2 } })
    await chart.hover({ position: { x: 70, y: cb.height / 2 } })
    await expect.poll(() => chart.innerText()).toMatch(/Luma 100\.0 IRE/)
    await screen(ed, 'frame-02-line-plot')
  })

  it('plots a typed line number too', async () => {
    await ed.getByTestId('line-input').fill('400')
    await ed.getByTestId('line-go').click()
    await expect.poll(() => ed.getByTestId('line-number').textContent()).toBe('400')
    expect(new URL(ed.url()).searchParams.get('line')).toBe('400')
    await ed.getByTestId('line-input').fill('480')
    await ed.getByTestId('line-go').click()
    expect(await ed.getByTestId('line-panel').innerText()).toContain('Enter a line from 0 to 479')
  })

  it('paints the range overlay and explains its colours', async () => {
    await ed.getByTestId('overlay-toggle').check()
    // The marks come as a layer over the picture, which stays as it was.
    await expect.poll(() => ed.getByTestId('overlay-image').getAttribute('src')).toContain('/images/overlay')
    expect(await ed.getByTestId('frame-image').getAttribute('data-overlay')).toBe('on')
    expect(await ed.getByTestId('frame-image').getAttribute('src')).not.toContain('/images/overlay')
    await expect.poll(() => ed.getByTestId('overlay-image').evaluate(img => (img as HTMLImageElement).naturalWidth)).toBeGreaterThan(0)
    expect(await ed.getByTestId('overlay-legend').innerText()).toMatch(/Above a maximum[\s\S]*Below a minimum/)
    await ed.getByTestId('waveform-mode-both').check({ force: true })
    await ed.getByTestId('waveform-waveform-flat').waitFor()
    expect(await ed.getByTestId('waveform-waveform-luma').count()).toBe(1)
    await ed.getByTestId('histogram-chart').first().locator('canvas').first().waitFor()
    await screen(ed, 'frame-03-overlay-and-scopes')
  })

  it('switches the values between units and keeps the choice', async () => {
    const max = ed.getByTestId('value-luma-max')
    // SMPTE 170M: full-range 255 is white, 100 IRE with setup; BT.601 Table 3: code 235, 940 at 10 bits.
    expect(await max.textContent()).toBe('100.0 IRE')
    expect(await ed.getByTestId('value-luma-min').textContent()).toBe('7.5 IRE')
    await ed.getByTestId('unit-select').selectOption('code8')
    await expect.poll(() => max.textContent()).toBe('235')
    expect(await ed.getByTestId('value-luma-min').textContent()).toBe('16')
    await ed.getByTestId('unit-select').selectOption('code10')
    await expect.poll(() => max.textContent()).toBe('940')
    await ed.getByTestId('unit-select').selectOption('ire0')
    await expect.poll(() => ed.getByTestId('value-luma-min').textContent()).toBe('0.0 IRE')
    await ed.getByTestId('unit-select').selectOption('code8')
    await screen(ed, 'frame-04-values-in-codes')
    await openFrame(ed, hotId)
    await expect.poll(() => ed.getByTestId('value-luma-max').textContent()).toBe('235')
    // Composite extremes read through the luma code: 130.8 IRE lies above code 235 (SMPTE 170M).
    expect(Number(await ed.getByTestId('value-composite-max').textContent())).toBeGreaterThan(235)
  })

  it('shows the editor the decision read-only, and the server refuses an editor’s decision', async () => {
    expect(await ed.getByTestId('decision-form').count()).toBe(0)
    expect(await ed.getByTestId('decision-readonly').innerText()).toContain('QC reviewers and owners decide')
    const refused = await editorApi.request('PUT', `/api/frames/${hotId}/decision`, { decision: 'waived', note: 'Looks fine to me' })
    expect(refused.status).toBe(403)
    expect((await editorApi.get(`/api/frames/${hotId}`)).body.decision).toBeNull()
  })

  it('lets a reviewer waive the hot frame with a note, and asks for the note first', async () => {
    await signIn(rv, reviewer)
    await openFrame(rv, hotId)
    await rv.getByTestId('decision-waived').check({ force: true })
    await rv.getByTestId('decision-save').click()
    await expect.poll(() => rv.getByTestId('decision-form').innerText()).toContain('A note is required to waive a frame')
    const note = 'Bars at 100 % on purpose for the head of the reel; the delivery uses the 75 % set.'
    await rv.getByTestId('decision-note-input').fill(note)
    await rv.getByTestId('decision-save').click()
    await expect.poll(() => rv.getByTestId('decision-current').getAttribute('data-decision')).toBe('waived')
    expect(await rv.getByTestId('decision-note').innerText()).toContain(note)
    expect(await rv.getByTestId('decision-current').innerText()).toContain(reviewer.name)
    await screen(rv, 'frame-05-waived-by-reviewer')

    await openFrame(ed, hotId)
    await expect.poll(() => ed.getByTestId('decision-current').getAttribute('data-decision')).toBe('waived')
    expect(await ed.getByTestId('decision-note').innerText()).toContain(note)
    await screen(ed, 'frame-06-decision-seen-by-editor')
  })

  it('moves to the next and previous frame of the reel by keyboard', async () => {
    await rv.getByRole('heading', { level: 1 }).click()
    // J and K are shuttle keys in editing software: they must not move between frames.
    await rv.keyboard.press('j')
    await rv.keyboard.press('k')
    expect(new URL(rv.url()).pathname).toBe(`/frames/${hotId}`)
    await rv.keyboard.press(']')
    await rv.locator(`[data-testid="frame-page"][data-frame-id="${normalId}"][data-hydrated="yes"]`).waitFor()
    expect(new URL(rv.url()).pathname).toBe(`/frames/${normalId}`)
    expect(await rv.getByTestId('verdict-badge').first().getAttribute('data-verdict')).toBe('pass')
    await rv.keyboard.press('ArrowLeft')
    await rv.locator(`[data-testid="frame-page"][data-frame-id="${hotId}"][data-hydrated="yes"]`).waitFor()
    expect(new URL(rv.url()).pathname).toBe(`/frames/${hotId}`)
    // Keys typed into a field stay in the field.
    await rv.getByTestId('line-input').focus()
    await rv.keyboard.press(']')
    await rv.keyboard.press('a')
    await rv.waitForTimeout(300)
    expect(new URL(rv.url()).pathname).toBe(`/frames/${hotId}`)
  })
})

describe('the compare page', () => {
  it('picks the second frame from the frame page', async () => {
    await rv.getByRole('heading', { level: 1 }).click()
    await rv.getByTestId('compare-open').click()
    await rv.getByTestId('frame-picker').waitFor()
    await rv.getByTestId(`picker-frame-${normalId}`).waitFor()
    await screen(rv, 'frame-07-compare-picker')
    await rv.getByTestId(`picker-frame-${normalId}`).click()
    await rv.waitForURL((u) => u.pathname === '/compare' && u.searchParams.get('a') === String(hotId) && u.searchParams.get('b') === String(normalId))
  })

  it('shows both frames’ figures and the differences in black, white and hue', async () => {
    await rv.locator('[data-testid="compare-page"][data-hydrated="yes"]').waitFor()
    await rv.getByTestId('compare-differences').waitFor()
    expect(await rv.getByTestId('compare-name-a').innerText()).toBe('B012_bars100.png')
    expect(await rv.getByTestId('compare-name-b').innerText()).toBe('B013_bars75.png')
    const cell = (row: string, col: string) => rv.getByTestId(`diff-${row}`).getByTestId(col).innerText()
    // Black: both frames hold a black bar at 7.5 IRE (SMPTE 170M).
    expect(await cell('black', 'diff-a')).toBe('7.5 IRE')
    expect(await cell('black', 'diff-b')).toBe('7.5 IRE')
    expect(await cell('black', 'diff-delta')).toBe('±0.0 IRE')
    // White: 100 IRE against 75 % grey, 76.9 IRE in the SMPTE EG 1 bar table (±0.5 IRE).
    expect(await cell('white', 'diff-a')).toBe('100.0 IRE')
    const whiteB = parseFloat(await cell('white', 'diff-b'))
    expect(Math.abs(whiteB - 76.9)).toBeLessThanOrEqual(0.5)
    const whiteDelta = (await cell('white', 'diff-delta')).replace('−', '-')
    expect(Math.abs(parseFloat(whiteDelta) - (76.9 - 100))).toBeLessThanOrEqual(0.5)
    // Mean hue: the bars average to grey, so each frame's mean hue is its patch's: 75 % yellow
    // 167.1° and 75 % red 103.5° (SMPTE EG 1 bar table, ±1°); B − A = −63.6°.
    const hueA = parseFloat(await cell('hue', 'diff-a'))
    const hueB = parseFloat(await cell('hue', 'diff-b'))
    expect(Math.abs(hueA - 167.1)).toBeLessThanOrEqual(1)
    expect(Math.abs(hueB - 103.5)).toBeLessThanOrEqual(1)
    const hueDelta = parseFloat((await cell('hue', 'diff-delta')).replace('−', '-'))
    expect(Math.abs(hueDelta - (103.5 - 167.1))).toBeLessThanOrEqual(1)
    // Both sides carry the same scopes.
    for (const side of ['a', 'b']) {
      await rv.getByTestId(`compare-side-${side}`).getByTestId('frame-image').waitFor()
    }
    expect(await rv.getByTestId('vectorscope-image').count()).toBe(2)
    expect(await rv.getByTestId('waveform-waveform-luma').count()).toBe(2)
    await rv.getByTestId('histogram-chart').nth(3).locator('canvas').first().waitFor()
    await screen(rv, 'frame-08-compare')
  })

  it('gives the differences in the unit chosen, and the waveform mode applies to both sides', async () => {
    await rv.getByTestId('unit-select').selectOption('code8')
    await expect.poll(() => rv.getByTestId('diff-white').getByTestId('diff-a').innerText()).toBe('235')
    // BT.601 Table 3 / BT.801-1 Table 1: 75 % grey is code 180; the difference is 180 − 235 = −55 codes (±1 code, BT.801-1 Table 1).
    const delta = parseFloat((await rv.getByTestId('diff-white').getByTestId('diff-delta').innerText()).replace('−', '-'))
    expect(Math.abs(delta - (180 - 235))).toBeLessThanOrEqual(1)
    await rv.getByTestId('waveform-mode-rgb').check({ force: true })
    await expect.poll(() => rv.getByTestId('waveform-waveform-rgb').count()).toBe(2)
    await screen(rv, 'frame-09-compare-codes-rgb-split')
  })
})
