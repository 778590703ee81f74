// What a new user trips on, walked through in Chromium at 1440 px and on a 390 px phone: the
// way from a reel to its sign-off and sheet, sorting the frames table from its headers, units
// written as units, deciding frames from the keyboard with their history kept, a confirmation
// before a FAIL sign-off, and every page usable on a phone. Screens go to
// test-results/screens/journey-*.png for a person to look at.
import type { Browser, Page } from 'playwright-core'
import { parse } from 'csv-parse/sync'
import sharp from 'sharp'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { DEMO_PRODUCTION, DEMO_TEAM } from '../../server/seed/demo'
import { Client } from '../support/api'
import { launchBrowser, screen } from '../support/browser'
import { APP_URL } from '../support/env'
import { closeDb, createTeamWithRoles } from '../support/fixtures'
import { png8 } from '../support/images'

const DESKTOP = { width: 1440, height: 900 }
const PHONE = { width: 390, height: 844 }
const url = (path: string) => `${APP_URL()}${path}`

let browser: Browser
let team: Awaited<ReturnType<typeof createTeamWithRoles>>
let reviewerApi: Client
let reelId = 0
let passId = 0
const hot: number[] = []

async function open(viewport: { width: number; height: number }, who: { email: string; password: string }, path: string): Promise<Page> {
  const ctx = await browser.newContext({ viewport })
  const page = await ctx.newPage()
  await page.goto(url(path))
  await page.waitForURL((u) => u.pathname === '/login')
  await page.waitForFunction(() => !!(document.querySelector('#__nuxt') as { __vue_app__?: unknown } | null)?.__vue_app__)
  await page.getByTestId('login-email').fill(who.email)
  await page.getByTestId('login-password').fill(who.password)
  await page.getByTestId('login-submit').click()
  await page.waitForURL((u) => u.pathname === path)
  return page
}

/**
 * The page scrolls sideways when its content is wider than the window: false, or the
 * innermost elements that stick out (so a failure says what to mend).
 */
const overflowsSideways = (page: Page) => page.evaluate(() => {
  if (document.documentElement.scrollWidth <= window.innerWidth) return false
  const out = [...document.querySelectorAll('body *')].filter((el) => el.getBoundingClientRect().right > window.innerWidth + 0.5
    && ![...el.children].some((c) => c.getBoundingClientRect().right > window.innerWidth + 0.5))
  return out.slice(0, 5).map((el) => `${el.tagName.toLowerCase()}.${el.className}`.slice(0, 120))
})

beforeAll(async () => {
  browser = await launchBrowser()
  team = await createTeamWithRoles()
  reviewerApi = await new Client().login(team.users.reviewer.email, team.users.reviewer.password)
  reelId = (await reviewerApi.post(`/api/productions/${team.productionId}/reels`, { name: 'Night exteriors at the old ferry pier', sourceLabel: 'Camera A' })).body.id
  const grey = await sharp({ create: { width: 96, height: 54, channels: 3, background: { r: 90, g: 110, b: 130 } } }).png().toBuffer()
  // Uniform full-range R'G'B' noise: its saturated pixels carry composite peaks far beyond
  // +120 IRE (SMPTE 170M / EG 1 levels — memory; the 100 % bar figures computed from the BT.601 equations), so both noise frames fail the NTSC spec.
  const up = await reviewerApi.uploadFrames(reelId, [
    { name: 'street_0001.png', bytes: grey },
    { name: 'neon_0002.png', bytes: await png8(96, 54, 8801) },
    { name: 'neon_0003.png', bytes: await png8(96, 54, 8802) },
  ])
  passId = up.body.files[0]!.frameId!
  hot.push(up.body.files[1]!.frameId!, up.body.files[2]!.frameId!)
  for (let i = 0; i < 240; i++) {
    const list = await reviewerApi.get(`/api/reels/${reelId}/frames`)
    if (list.body.frames.every((f: { status: string }) => f.status === 'done')) break
    await new Promise((r) => setTimeout(r, 250))
  }
  const verdicts = (await reviewerApi.get(`/api/reels/${reelId}/frames`)).body.frames.map((f: { verdict: string }) => f.verdict)
  expect(verdicts).toEqual(['pass', 'fail', 'fail'])
})

afterAll(async () => {
  await browser?.close()
  await closeDb()
})

describe('the way to sign-off and the sheet', () => {
  it('shows every role the reel\'s sign-off state on the production\'s reel list, and leads a reviewer to "Sign off this reel"', async () => {
    const page = await open(DESKTOP, team.users.reviewer, `/productions/${team.productionId}`)
    const state = page.getByTestId('reel-row').getByTestId('reel-sheet-state')
    await expect.poll(() => state.getAttribute('data-signed')).toBe('false')
    expect(await state.getAttribute('data-overall')).toBe('fail')
    expect(await state.getByTestId('reel-sheet-result').innerText()).toBe('If signed now: FAIL')
    expect(await state.getByTestId('reel-sheet-status').innerText()).toBe('Not signed off · 1 thing blocks it')
    expect(await state.getByTestId('reel-sheet-link').innerText()).toBe('Sign off this reel →')
    await screen(page, 'journey-01-production-reels-1440')
    await state.getByTestId('reel-sheet-link').click()
    await page.waitForURL((u) => u.pathname === `/sheets/${reelId}`)
    await page.getByTestId('sheet-signoff').waitFor()
    await page.context().close()

    // A producer on a phone: one card per reel, the name on one line, the way to the sheet.
    const phone = await open(PHONE, team.users.producer, `/productions/${team.productionId}`)
    const card = phone.getByTestId('reel-card')
    await card.waitFor()
    expect(await card.getByTestId('reel-sheet-link').innerText()).toBe('See the sheet so far →')
    const name = await card.getByTestId('reel-card-link').boundingBox()
    // "Night exteriors at the old ferry pier" at 16 px wraps at most once in a 340 px card, never a word a line.
    expect(name!.height).toBeLessThan(3 * 24)
    expect(await overflowsSideways(phone)).toBe(false)
    await screen(phone, 'journey-02-production-reels-390')
    await phone.context().close()
  })
})

describe('the frames table', () => {
  it('sorts from its headers with an arrow for the direction, kept in the address; units keep their case; nothing is cut at 1440 px', async () => {
    const page = await open(DESKTOP, team.users.reviewer, `/reels/${reelId}`)
    await page.getByTestId('frame-row').first().waitFor()
    await page.getByTestId('reel-sheet-state').waitFor()
    await page.getByTestId('sort-lumaMax').click()
    await page.waitForURL((u) => u.searchParams.get('sort') === 'lumaMax')
    await expect.poll(() => page.locator('th[data-col="lumaMax"]').getAttribute('aria-sort')).toBe('ascending')
    await page.getByTestId('sort-lumaMax').click()
    await page.waitForURL((u) => u.searchParams.get('dir') === 'desc')
    await expect.poll(() => page.locator('th[data-col="lumaMax"]').getAttribute('aria-sort')).toBe('descending')
    expect(await page.getByTestId('sort-lumaMax').getAttribute('data-dir')).toBe('desc')
    // The grey frame (luma well inside the limits) sorts below the two noise frames.
    await expect.poll(() => page.getByTestId('frame-row').last().getAttribute('data-frame-id')).toBe(String(passId))
    // A reload keeps the order: it lives in the address.
    await page.reload()
    await expect.poll(() => page.locator('th[data-col="lumaMax"]').getAttribute('aria-sort')).toBe('descending')

    await page.getByTestId('scale-switch').locator('label').filter({ has: page.locator('input[data-scale="mv"]') }).click()
    // innerText is what is drawn (CSS upper-casing included): millivolts stay "mV", never "MV".
    await expect.poll(() => page.locator('th[data-col="lumaMax"]').innerText()).toBe('Luma max (mV)')
    const scroller = page.getByTestId('frames-table').locator('xpath=..')
    expect(await scroller.evaluate((el) => el.scrollWidth <= el.clientWidth)).toBe(true)
    await screen(page, 'journey-03-reel-sorted-mv-1440')
    await page.context().close()
  })

  it('is a card per frame on a phone, with verdict and levels on screen', async () => {
    const page = await open(PHONE, team.users.reviewer, `/reels/${reelId}`)
    const cards = page.getByTestId('frame-card')
    await cards.first().waitFor()
    expect(await cards.count()).toBe(3)
    expect(await page.getByTestId('frames-table').isVisible()).toBe(false)
    const hotCard = page.locator(`[data-testid="frame-card"][data-frame-id="${hot[0]}"]`)
    expect(await hotCard.getByTestId('verdict-badge').getAttribute('data-verdict')).toBe('fail')
    expect(await hotCard.innerText()).toMatch(/Luma max \(IRE\)\s+\d+\.\d/)
    expect(await overflowsSideways(page)).toBe(false)
    await screen(page, 'journey-04-reel-390')
    await page.context().close()
  })
})

describe('decisions', () => {
  it('accepts with A and moves to the next undecided frame; R, a note and Ctrl+Enter reject; a change keeps the history', async () => {
    const page = await open(DESKTOP, team.users.reviewer, `/frames/${hot[0]}`)
    await page.locator(`[data-testid="frame-page"][data-frame-id="${hot[0]}"][data-hydrated="yes"]`).waitFor()
    await page.getByRole('heading', { level: 1 }).click()
    await page.keyboard.press('a')
    // The grey frame (#1) is measured and undecided too, but it comes before: the next one after #2 is #3.
    await page.locator(`[data-testid="frame-page"][data-frame-id="${hot[1]}"][data-hydrated="yes"]`).waitFor()
    await page.getByRole('heading', { level: 1 }).click()
    await page.keyboard.press('r')
    await expect.poll(() => page.evaluate(() => document.activeElement?.getAttribute('data-testid'))).toBe('decision-note-input')
    await page.keyboard.type('Neon sign far too hot, regrade')
    await page.keyboard.press('Control+Enter')
    // After #3 the next undecided frame is #1, from the top.
    await page.locator(`[data-testid="frame-page"][data-frame-id="${passId}"][data-hydrated="yes"]`).waitFor()

    await page.goto(url(`/frames/${hot[0]}`))
    await page.locator(`[data-testid="frame-page"][data-frame-id="${hot[0]}"][data-hydrated="yes"]`).waitFor()
    expect(await page.getByTestId('decision-current').getAttribute('data-decision')).toBe('accepted')
    await page.getByTestId('decision-form').locator('label').filter({ has: page.getByTestId('decision-rejected') }).click()
    await page.getByTestId('decision-note-input').fill('On a second look the sign clips, regrade')
    await page.getByTestId('decision-save').click()
    await expect.poll(() => page.getByTestId('decision-history-item').count()).toBe(2)
    const items = page.getByTestId('decision-history-item')
    expect(await items.nth(0).getAttribute('data-decision')).toBe('rejected')
    expect(await items.nth(0).innerText()).toMatch(/^Rejected by Test reviewer, \d{4}-\d\d-\d\d \d\d:\d\d UTC\s*\(standing\)\n“On a second look the sign clips, regrade”$/)
    expect(await items.nth(1).innerText()).toMatch(/^Accepted by Test reviewer, \d{4}-\d\d-\d\d \d\d:\d\d UTC$/)
    await screen(page, 'journey-05-frame-history-1440')
    await page.context().close()

    const phone = await open(PHONE, team.users.producer, `/frames/${hot[0]}`)
    await phone.getByTestId('decision-history').waitFor()
    expect(await overflowsSideways(phone)).toBe(false)
    await screen(phone, 'journey-06-frame-390')
    await phone.context().close()
  })

  it('asks before signing off a reel whose result is FAIL, then shows the signed state and the sheet on the reel page', async () => {
    const page = await open(DESKTOP, team.users.reviewer, `/reels/${reelId}`)
    const state = page.getByTestId('reel-sheet-state')
    await expect.poll(() => state.getByTestId('reel-sheet-status').innerText()).toBe('Not signed off · ready to sign')
    await state.getByTestId('reel-sheet-link').click()
    await page.waitForURL((u) => u.pathname === `/sheets/${reelId}`)
    await page.getByTestId('sheet-ready-to-sign').waitFor()
    await page.getByTestId('sheet-signoff').click()
    await page.getByTestId('sheet-fail-confirm').waitFor()
    expect(await page.getByTestId('sheet-fail-confirm').innerText()).toContain('Sign off with the result FAIL?')
    await screen(page, 'journey-07-fail-confirm-1440')
    // Nothing is signed until the reviewer confirms; Cancel leaves it open.
    await page.getByTestId('sheet-fail-confirm-no').click()
    expect((await reviewerApi.get(`/api/reels/${reelId}`)).body.sheet.signed).toBe(false)
    await page.getByTestId('sheet-signoff').click()
    await page.getByTestId('sheet-fail-confirm-yes').click()
    await page.getByTestId('sheet-open-pdf').waitFor({ timeout: 30_000 })
    await page.getByTestId('sheet-signed').waitFor()
    // The producer-facing page cites the standard without the engineers' caveats.
    const text = await page.locator('main').innerText()
    expect(text).toContain('SMPTE 170M')
    expect(text).toMatch(/Common practice \(no published standard\)/)
    expect(text).not.toMatch(/from memory|no standard found/i)
    await screen(page, 'journey-08-sheet-signed-1440')

    await page.goto(url(`/reels/${reelId}`))
    await expect.poll(() => page.getByTestId('reel-sheet-state').getAttribute('data-signed')).toBe('true')
    expect(await page.getByTestId('reel-sheet-result').innerText()).toBe('FAIL')
    expect(await page.getByTestId('reel-sheet-link').innerText()).toBe('Open the pass/fail sheet →')
    // At 1440 px the Decision column shows "Rejected" whole, inside the table's box.
    const decided = page.locator(`[data-testid="frame-row"][data-frame-id="${hot[0]}"] td[data-col="decision"]`)
    expect((await decided.innerText()).split('\n')[0]).toBe('Rejected')
    const scroller = page.getByTestId('frames-table').locator('xpath=..')
    expect(await scroller.evaluate((el) => el.scrollWidth <= el.clientWidth)).toBe(true)
    const cellBox = await decided.boundingBox()
    const tableBox = await scroller.boundingBox()
    expect(cellBox!.x + cellBox!.width).toBeLessThanOrEqual(tableBox!.x + tableBox!.width + 0.5)
    await screen(page, 'journey-09-reel-signed-1440')
    await page.context().close()
  })

  it('puts every decision, earlier ones included, in the sheet\'s CSV', async () => {
    const producerApi = await new Client().login(team.users.producer.email, team.users.producer.password)
    const res = await fetch(url(`/api/reels/${reelId}/sheet.csv`), { headers: { cookie: producerApi.cookieHeader() } })
    expect(res.status).toBe(200)
    const records = parse(await res.text(), { columns: true, bom: true }) as Record<string, string>[]
    const first = records.find((r) => r.name === 'neon_0002.png')!
    expect(first.decision_history).toMatch(
      /^\d{4}-\d\d-\d\d \d\d:\d\d UTC accepted by Test reviewer; \d{4}-\d\d-\d\d \d\d:\d\d UTC rejected by Test reviewer: On a second look the sign clips, regrade$/,
    )
    expect(records.find((r) => r.name === 'street_0001.png')!.decision_history).toBe('')
  })
})

describe('phones', () => {
  it('shows the signed sheet page, the reel page and the compare page without sideways scrolling, with a working way to the PDF', async () => {
    const page = await open(PHONE, team.users.producer, `/sheets/${reelId}`)
    await page.getByTestId('sheet-open-pdf').waitFor()
    expect(await page.getByTestId('sheet-open-pdf').getAttribute('href')).toMatch(new RegExp(`^/api/reels/${reelId}/sheet\\.pdf\\?signoff=\\d+$`))
    expect(await page.getByTestId('sheet-card').count()).toBe(3)
    expect(await overflowsSideways(page)).toBe(false)
    await screen(page, 'journey-10-sheet-390')

    await page.goto(url(`/reels/${reelId}`))
    await page.getByTestId('reel-sheet-state').waitFor()
    expect(await overflowsSideways(page)).toBe(false)
    await screen(page, 'journey-11-reel-signed-390')

    await page.goto(url(`/compare?a=${hot[0]}&b=${passId}`))
    await page.getByTestId('compare-differences').waitFor()
    await screen(page, 'journey-12-compare-390')
    expect(await overflowsSideways(page)).toBe(false)
    await page.context().close()
  })

  it('names the demo team and production as fictional', () => {
    expect(DEMO_TEAM).toMatch(/\(fictional\)$/)
    expect(DEMO_PRODUCTION.name).toContain('(fictional)')
    expect(DEMO_PRODUCTION.client).toContain('(fictional)')
  })
})
