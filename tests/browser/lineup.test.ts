// Source matching as a reviewer sees it: three sources' bars (BT.801 75 % split field built from
// the published equations, with line-up errors applied in the composite U/V plane — see
// tests/support/bars.ts), a reference picked on the production page, the matching table, and
// the frame page with both sources on one vectorscope and one line-plot graticule, and the
// blanking edges on the picture. Screens at 1440 and 390 px go to test-results/screens/.
import type { Browser, Page } from 'playwright-core'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { DEMO_TEAM, DEMO_USERS } from '../../server/seed/demo'
import { signedIn } from '../support/api'
import type { Client } from '../support/api'
import { launchBrowser, screen } from '../support/browser'
import { APP_URL } from '../support/env'
import { applyErrors, exactColour, splitFieldPatches, v210Frame } from '../support/bars'
import type { LineupErrors } from '../support/bars'

const editor = DEMO_USERS.find((u) => u.role === 'editor')!
const reviewer = DEMO_USERS.find((u) => u.role === 'reviewer')!
const url = (path: string) => `${APP_URL()}${path}`
const bars = (e: LineupErrors) => v210Frame(splitFieldPatches(exactColour(0.75, '601', e), y => applyErrors(y, e, '601')), 720, 486).data

let browser: Browser
let page: Page
let api: Client
let productionId = 0
const frames: Record<string, number> = {}

async function analysed(id: number) {
  for (let i = 0; i < 300; i++) {
    const r = await api.get(`/api/frames/${id}`)
    if (r.body?.frame?.status === 'done') return
    if (r.body?.frame?.status === 'failed') throw new Error(r.body.frame.failReason)
    await new Promise((res) => setTimeout(res, 300))
  }
  throw new Error(`frame ${id} not analysed`)
}

beforeAll(async () => {
  api = await signedIn(editor.email, editor.password)
  const me = await api.get('/api/me')
  const team = me.body.teams.find((t: { name: string }) => t.name === DEMO_TEAM)
  const prod = await api.post(`/api/teams/${team.id}/productions`, { name: `Line-up ${Date.now().toString(36)}`, client: 'Estuary Channel (fictional)' })
  expect(prod.status).toBe(201)
  productionId = prod.body.id
  const sources: Array<[string, string, LineupErrors]> = [
    ['Camera A', 'A001_bars.v210', {}],
    ['Camera B', 'B001_bars.v210', { blackOffsetIre: 2.1, chromaGain: 0.96, hueDeg: 3 }],
    ['Camera C', 'C001_bars.v210', { lumaGain: 0.97 }],
  ]
  for (const [reelName, file, e] of sources) {
    const reel = await api.post(`/api/productions/${productionId}/reels`, { name: reelName, sourceLabel: reelName })
    const up = await api.uploadFrames(reel.body.id, [{ name: file, bytes: bars(e) }], '?raw=v210&width=720&height=486')
    frames[reelName] = up.body.files[0]!.frameId!
  }
  for (const id of Object.values(frames)) await analysed(id)
  browser = await launchBrowser()
  page = await (await browser.newContext({ viewport: { width: 1440, height: 900 } })).newPage()
  await page.goto(url('/login'))
  await page.getByTestId('login-email').fill(reviewer.email)
  await page.getByTestId('login-password').fill(reviewer.password)
  await page.getByTestId('login-submit').click()
  await page.waitForURL((u) => u.pathname === '/')
})

afterAll(async () => {
  await browser?.close()
})

describe('picking a reference source', () => {
  it('the production page lists every source\'s bars; picking Camera A shows each match against it', async () => {
    await page.goto(url(`/productions/${productionId}`))
    const table = page.getByTestId('matching-table')
    await table.waitFor()
    await expect.poll(() => table.locator('tbody tr').count()).toBe(3)
    expect(await page.getByTestId('matching-reference').textContent()).toMatch(/No reference source yet/)
    await page.getByTestId('reference-select').selectOption(String(frames['Camera A']))
    await page.getByTestId('reference-set').click()
    await expect.poll(() => page.getByTestId('matching-reference').textContent()).toMatch(/Reference: Camera A \/ A001_bars\.v210/)
    const rowB = table.locator('tbody tr', { hasText: 'Camera B' })
    // The errors built into Camera B's bars, read back against the reference.
    await expect.poll(() => rowB.getByTestId('matching-cell').textContent()).toMatch(/\+2\.1 IRE, gain ×1\.000, chroma −4 %, hue \+3\.[01]°/)
    expect(await rowB.getAttribute('data-match')).toBe('fail')
    const rowC = table.locator('tbody tr', { hasText: 'Camera C' })
    // 0.97 built in, read within 0.2 %.
    expect(await rowC.getByTestId('matching-cell').textContent()).toMatch(/gain ×0\.9(69|70|71)/)
    expect(await table.locator('tbody tr', { hasText: 'Camera A' }).getByTestId('matching-cell').textContent()).toContain('Reference source')
    await screen(page, 'lineup-production-1440')
    await page.setViewportSize({ width: 390, height: 844 })
    await screen(page, 'lineup-production-390')
    await page.setViewportSize({ width: 1440, height: 900 })
  })

  it('the frame page of Camera B shows its match, both sources on one vectorscope and one line-plot graticule, and the blanking', async () => {
    await page.goto(url(`/frames/${frames['Camera B']}`))
    await page.getByTestId('bars-panel').waitFor()
    expect(await page.getByTestId('bars-pattern').textContent()).toContain('75 % bars, split field')
    expect(await page.getByTestId('bars-match-summary').textContent()).toMatch(/\+2\.1 IRE, gain ×1\.000, chroma −4 %, hue \+3\.[01]°/)
    const scope = page.getByTestId('match-vectorscope')
    await scope.waitFor()
    // Six coloured bars of each source on the one vectorscope.
    await expect.poll(() => scope.locator('[data-testid="match-vectorscope-ref"]').count()).toBe(6)
    expect(await scope.locator('[data-testid="match-vectorscope-src"]').count()).toBe(6)
    const plot = page.getByTestId('match-line-plot')
    await expect.poll(() => plot.getAttribute('data-ready')).toBe('yes')
    await expect.poll(() => plot.locator('[data-testid="match-line-ref"]').count()).toBe(1)
    expect(await plot.locator('[data-testid="match-line-src"]').count()).toBe(1)
    // The reference's and this source's bar points differ by the hue built in (+3°): not the same dots.
    const src = await scope.locator('[data-testid="match-vectorscope-src"]').first().getAttribute('cx')
    const ref = await scope.locator('[data-testid="match-vectorscope-ref"]').first().getAttribute('cx')
    expect(src).not.toBe(ref)
    expect(await page.getByTestId('blanking-panel').isVisible()).toBe(true)
    expect(await page.getByTestId('blanking-edges').count()).toBe(1)
    await page.getByTestId('match-panel').scrollIntoViewIfNeeded()
    await screen(page, 'lineup-frame-1440')
    await page.setViewportSize({ width: 390, height: 844 })
    await page.getByTestId('match-panel').scrollIntoViewIfNeeded()
    await screen(page, 'lineup-frame-390')
  })
})
