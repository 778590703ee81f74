// A reviewer sees what blocks the sign-off on the sheet page, and signs the reel off once
// it is decided; the producer gets the e-mail, follows its link in a browser of their own,
// signs in, and downloads the PDF. Screens go to test-results/screens/ for a person to look at.
import { mkdirSync, readFileSync, writeFileSync } from 'node:fs'
import { join } from 'node:path'
import sharp from 'sharp'
import type { Browser, Page } from 'playwright-core'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { Client } from '../support/api'
import { launchBrowser, screen, SCREEN_DIR } from '../support/browser'
import { APP_URL } from '../support/env'
import { closeDb, createTeamWithRoles } from '../support/fixtures'
import { png8 } from '../support/images'
import { linkIn, waitForMail } from '../support/mail'

const VIEWPORT = { width: 1280, height: 900 }
let browser: Browser
let team: Awaited<ReturnType<typeof createTeamWithRoles>>
let reviewerApi: Client
let reelId: number
let hotId: number
let sheetLink = ''

async function signIn(page: Page, email: string, password: string) {
  await page.getByTestId('login-email').fill(email)
  await page.getByTestId('login-password').fill(password)
  await page.getByTestId('login-submit').click()
}

beforeAll(async () => {
  browser = await launchBrowser()
  team = await createTeamWithRoles()
  reviewerApi = await new Client().login(team.users.reviewer.email, team.users.reviewer.password)
  reelId = (await reviewerApi.post(`/api/productions/${team.productionId}/reels`, { name: 'Night exteriors', sourceLabel: 'Camera A' })).body.id
  const grey = await sharp({ create: { width: 96, height: 54, channels: 3, background: { r: 90, g: 110, b: 130 } } }).png().toBuffer()
  const up = await reviewerApi.uploadFrames(reelId, [{ name: 'street_0001.png', bytes: grey }, { name: 'neon_0002.png', bytes: await png8(96, 54, 8801) }])
  hotId = up.body.files[1]!.frameId!
  for (let i = 0; i < 240; i++) {
    const list = await reviewerApi.get(`/api/reels/${reelId}/frames`)
    if (list.body.frames.every((f: { status: string }) => f.status === 'done')) break
    await new Promise((r) => setTimeout(r, 250))
  }
})

afterAll(async () => {
  await browser?.close()
  await closeDb()
})

describe('pass/fail sheet in the browser', () => {
  it('shows the reviewer what blocks the sign-off, then signs off once the failing frame is decided', async () => {
    const ctx = await browser.newContext({ viewport: VIEWPORT })
    const page = await ctx.newPage()
    await page.goto(`${APP_URL()}/sheets/${reelId}`)
    await page.waitForURL((u) => u.pathname === '/login')
    await signIn(page, team.users.reviewer.email, team.users.reviewer.password)
    await page.waitForURL((u) => u.pathname === `/sheets/${reelId}`)
    await expect.poll(() => page.getByTestId('sheet-blockers').innerText()).toBe('1 failing frame has no decision: #2 neon_0002.png')
    expect(await page.getByTestId('sheet-signoff').isDisabled()).toBe(true)
    expect(await page.getByTestId('sheet-overall').getAttribute('data-overall')).toBe('fail')
    await screen(page, 'sheet-01-blocked')

    expect((await reviewerApi.request('PUT', `/api/frames/${hotId}/decision`, { decision: 'waived', note: 'Neon sign, agreed with the network' })).status).toBe(200)
    await page.reload()
    await page.getByTestId('sheet-ready-to-sign').waitFor()
    expect(await page.getByTestId('sheet-overall').getAttribute('data-overall')).toBe('pass-with-exceptions')
    await page.getByTestId('sheet-signoff').click()
    await expect.poll(() => page.getByTestId('sheet-notice').innerText()).toMatch(/^Signed off\. The sheet is being made; 1 producer will get an e-mail\.$/)
    await expect.poll(() => page.getByTestId('sheet-signed').innerText()).toMatch(/Signed off by Test reviewer/)
    await page.getByTestId('sheet-download-pdf').waitFor({ timeout: 30_000 })
    await screen(page, 'sheet-02-signed-reviewer')
    await ctx.close()
  })

  it('mails the producer a link to the sheet page', async () => {
    const mail = await waitForMail(team.users.producer.email, /^Signed off: .* — Night exteriors$/)
    expect(mail.text).toContain('Overall result: PASS WITH EXCEPTIONS')
    sheetLink = linkIn(mail, `/sheets/${reelId}`)
    expect(sheetLink).toBe(`${APP_URL()}/sheets/${reelId}`)
  })

  it('the producer follows the link, signs in, sees the sheet and downloads the PDF', async () => {
    const ctx = await browser.newContext({ viewport: VIEWPORT, acceptDownloads: true })
    const page = await ctx.newPage()
    await page.goto(sheetLink)
    await page.waitForURL((u) => u.pathname === '/login')
    await signIn(page, team.users.producer.email, team.users.producer.password)
    await page.waitForURL((u) => u.pathname === `/sheets/${reelId}`)
    await page.getByTestId('sheet-download-pdf').waitFor({ timeout: 30_000 })
    expect(await page.getByTestId('sheet-row').count()).toBe(2)
    expect(await page.getByTestId('sheet-signoff').count()).toBe(0) // producers do not sign
    expect(await page.getByTestId('sheet-reopen').count()).toBe(0) // nor reopen
    await screen(page, 'sheet-03-producer')
    const [download] = await Promise.all([page.waitForEvent('download'), page.getByTestId('sheet-download-pdf').click()])
    expect(download.suggestedFilename()).toMatch(/^Production [0-9a-f]+ Night exteriors sign-off \d+\.pdf$/)
    const path = await download.path()
    const bytes = readFileSync(path!)
    expect(bytes.subarray(0, 5).toString('latin1')).toBe('%PDF-')
    // Cover, spec, frames and one scope page with four PNG scopes: far above an empty document.
    expect(bytes.length).toBeGreaterThan(40_000)
    mkdirSync(SCREEN_DIR, { recursive: true })
    writeFileSync(join(SCREEN_DIR, 'sheet-04-downloaded.pdf'), bytes)
    await ctx.close()
  })
})
