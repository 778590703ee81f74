// An owner copies the digital studio spec, puts a production on the copy, tightens its white
// limit, sees the preview of what changes, applies it; the reel's verdict counts change and the
// sheet names the new spec and version. Then the frame page's what-if judges a frame against
// another spec in the browser. Levels: a uniform full-range 8-bit grey v has luma code
// 16 + 219·v/255 (ITU-R BT.601-7 §2.5 studio coding — clause from memory; computed): 240 → 222.1, 250 → 230.7, 120 → 119.1.
// Screens at 1440 and 390 px go to test-results/screens/.
import sharp from 'sharp'
import type { Browser, Page } from 'playwright-core'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { Client } from '../support/api'
import { launchBrowser, screen } from '../support/browser'
import { APP_URL } from '../support/env'
import { closeDb, createTeamWithRoles } from '../support/fixtures'

let browser: Browser
let team: Awaited<ReturnType<typeof createTeamWithRoles>>
let api: Client
let reelId = 0
let brighterId = 0

const grey = (v: number) => sharp({ create: { width: 64, height: 36, channels: 3, background: { r: v, g: v, b: v } } }).png().toBuffer()

async function signIn(page: Page) {
  await page.goto(`${APP_URL()}/login`)
  await page.getByTestId('login-email').fill(team.users.owner.email)
  await page.getByTestId('login-password').fill(team.users.owner.password)
  await page.getByTestId('login-submit').click()
  await page.waitForURL((u) => u.pathname === '/')
}

beforeAll(async () => {
  browser = await launchBrowser()
  team = await createTeamWithRoles()
  api = await new Client().login(team.users.owner.email, team.users.owner.password)
  reelId = (await api.post(`/api/productions/${team.productionId}/reels`, { name: 'Harbour day 1 (fictional)' })).body.id
  const up = await api.uploadFrames(reelId, [
    { name: 'quay_0001.png', bytes: await grey(240) }, { name: 'sky_0002.png', bytes: await grey(250) }, { name: 'hull_0003.png', bytes: await grey(120) },
  ])
  brighterId = up.body.files[1]!.frameId!
  for (let i = 0; i < 240; i++) {
    const list = await api.get(`/api/reels/${reelId}/frames`)
    if (list.body.frames.every((f: { status: string }) => f.status === 'done')) break
    await new Promise((r) => setTimeout(r, 250))
  }
})

afterAll(async () => {
  await browser?.close()
  await closeDb()
})

describe('delivery specs in the browser', () => {
  it('copy, choose, tighten, preview, apply: the reel\'s counts change and the sheet names spec and version', async () => {
    const ctx = await browser.newContext({ viewport: { width: 1440, height: 900 } })
    const page = await ctx.newPage()
    await signIn(page)
    await page.getByTestId('nav-specs').click()
    await page.getByTestId('spec-copy-digital-studio').click()
    await page.getByTestId('spec-form').waitFor()
    await page.getByTestId('spec-title').fill('Harbour studio range')
    await page.getByTestId('spec-name').fill('harbour-studio')
    await screen(page, 'specs-01-copy-1440')
    await page.getByTestId('spec-submit').click()
    await page.waitForURL((u) => /^\/specs\/\d+$/.test(u.pathname))
    const specPath = new URL(page.url()).pathname
    await expect.poll(() => page.getByTestId('spec-version-1').innerText()).toMatch(/first version/)

    // The production moves from the default spec to the copy: nothing changes verdict yet.
    await page.goto(`${APP_URL()}/productions/${team.productionId}`)
    await page.getByTestId('production-spec-change').click()
    await page.getByTestId('production-spec-select').selectOption({ label: 'Harbour studio range (v1)' })
    await page.getByTestId('production-spec-preview').click()
    await expect.poll(() => page.getByTestId('rejudge-text').innerText()).toBe('No frame changes verdict')
    await page.getByTestId('production-spec-apply').click()
    await expect.poll(() => page.getByTestId('production-spec').innerText()).toBe('Harbour studio range')
    const row = page.locator(`[data-testid="reel-row"][data-reel-id="${reelId}"]`)
    await expect.poll(() => row.getByTestId('mix-pass').innerText()).toBe('3')
    await expect.poll(() => row.getByTestId('mix-fail').innerText()).toBe('0')

    // Tighten white from code 235 to 225: the 230.7 frame fails.
    await page.goto(`${APP_URL()}${specPath}`)
    await page.getByTestId('spec-edit').click()
    await page.getByTestId('limit-value-luma-max').fill('225')
    await page.getByTestId('limit-label-1').fill('Luma above code 225')
    await page.getByTestId('spec-submit').click()
    await expect.poll(() => page.getByTestId('rejudge-text').innerText()).toBe('1 frame changes verdict: 1 pass → fail')
    await expect.poll(() => page.getByTestId('rejudge-spec-changes').innerText()).toMatch(/235 8-bit code.*→ 225 8-bit code/)
    await screen(page, 'specs-02-preview-1440')
    await page.getByTestId('spec-apply').click()
    await expect.poll(() => page.getByTestId('spec-notice').innerText()).toMatch(/^Saved as version 2\. 1 frame changes verdict: 1 pass → fail\.$/)
    await expect.poll(() => page.getByTestId('spec-version-2').innerText()).toMatch(/Judged again: 1 frame changes verdict/)
    await screen(page, 'specs-03-history-1440')

    await page.goto(`${APP_URL()}/productions/${team.productionId}`)
    await expect.poll(() => row.getByTestId('mix-pass').innerText()).toBe('2')
    await expect.poll(() => row.getByTestId('mix-fail').innerText()).toBe('1')
    await expect.poll(() => page.getByTestId('production-spec-version').innerText()).toBe('harbour-studio · version 2')
    await screen(page, 'specs-04-production-1440')

    await page.goto(`${APP_URL()}/sheets/${reelId}`)
    await expect.poll(() => page.locator('#spec-title').innerText()).toBe('Delivery spec: Harbour studio range v2')
    await ctx.close()
  })

  it('the frame page judges the frame against another spec at once (what-if), at 1440 and 390 px', async () => {
    for (const width of [1440, 390]) {
      const ctx = await browser.newContext({ viewport: { width, height: 900 } })
      const page = await ctx.newPage()
      await signIn(page)
      await page.goto(`${APP_URL()}/frames/${brighterId}`)
      await expect.poll(() => page.getByTestId('verdict-spec').innerText()).toMatch(/Against Harbour studio range \(version 2\)/)
      await page.getByTestId('whatif-select').selectOption({ label: 'Digital studio range (v1)' })
      await expect.poll(() => page.getByTestId('whatif-result').locator('[data-testid="verdict-badge"]').getAttribute('data-verdict')).toBe('pass')
      await page.getByTestId('whatif-select').selectOption({ label: 'Harbour studio range (v2)' })
      await expect.poll(() => page.getByTestId('whatif-reason').first().innerText()).toMatch(/^Fail: Luma above code 225: peaks at code 231; 100.00 % of the picture is above code 225/)
      await screen(page, `specs-05-whatif-${width}`)
      if (width === 390) {
        await page.goto(`${APP_URL()}/specs`)
        await page.getByTestId('spec-card-harbour-studio').waitFor()
        await screen(page, 'specs-06-list-390')
      }
      await ctx.close()
    }
  })
})
