// An editor makes an API token on the team page, sees it once, a script uses it, and the
// editor revokes it; then signs out everywhere. Every page is watched for Content-Security-
// Policy violations (the headers must leave the Nuxt app working). Screens at 1440 and 390
// px wide go to test-results/screens/.
import type { Browser, Page } from 'playwright-core'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { launchBrowser, screen } from '../support/browser'
import { APP_URL } from '../support/env'
import { closeDb, createTeamWithRoles } from '../support/fixtures'

let browser: Browser
let team: Awaited<ReturnType<typeof createTeamWithRoles>>
const violations: string[] = []
const url = (path: string) => `${APP_URL()}${path}`

async function signedInPage(width: number): Promise<Page> {
  const ctx = await browser.newContext({ viewport: { width, height: 900 } })
  const page = await ctx.newPage()
  page.on('console', (m) => { if (/Content Security Policy|Refused to/i.test(m.text())) violations.push(m.text()) })
  page.on('pageerror', (e) => violations.push(`page error: ${e.message}`))
  await page.goto(url('/login?redirect=/team'))
  await page.getByTestId('login-email').fill(team.users.editor.email)
  await page.getByTestId('login-password').fill(team.users.editor.password)
  await page.getByTestId('login-submit').click()
  await page.waitForURL((u) => u.pathname === '/team')
  await page.getByTestId('api-tokens').waitFor()
  return page
}

const me = (token: string) => fetch(url('/api/me'), { headers: { authorization: `Bearer ${token}` } }).then((r) => r.status)

beforeAll(async () => {
  team = await createTeamWithRoles()
  browser = await launchBrowser()
})
afterAll(async () => {
  await browser?.close()
  await closeDb()
})

describe('API tokens on the team page', () => {
  it('makes a token, shows it once, and revokes it; a script using it is refused at once', async () => {
    const page = await signedInPage(1440)
    // An editor may give a token only a role whose permissions are all theirs: not owner or
    // reviewer (more), and not producer either (producers download sheets, editors cannot).
    const roles = await page.getByTestId('token-role').locator('option').allInnerTexts()
    expect(roles).toEqual(['Editor'])
    await page.getByTestId('token-name').fill('Conform export script')
    await page.getByTestId('token-submit').click()
    const value = page.getByTestId('token-value')
    await value.waitFor()
    const token = (await value.innerText()).trim()
    expect(token).toMatch(/^lwt_/)
    await page.getByTestId('token-row').first().waitFor()
    await screen(page, 'tokens-01-created-1440')
    expect(await me(token)).toBe(200)

    // Gone after "Done" and after a reload: the token is shown only once.
    await page.getByRole('button', { name: 'Done' }).click()
    await page.reload()
    await page.getByTestId('token-row').first().waitFor()
    expect(await page.content()).not.toContain(token)

    await page.getByTestId('token-revoke').first().click()
    await expect.poll(() => page.getByTestId('token-state').first().innerText()).toBe('revoked')
    expect(await me(token)).toBe(401)
    await screen(page, 'tokens-02-revoked-1440')
  })

  it('works at 390 px wide, and "sign out everywhere" ends the session', async () => {
    const page = await signedInPage(390)
    await page.getByTestId('token-name').fill('Phone check')
    await page.getByTestId('token-submit').click()
    await page.getByTestId('token-value').waitFor()
    await screen(page, 'tokens-03-created-390')
    const wide = await page.evaluate(() => {
      const w = document.documentElement.clientWidth
      // Tables scroll inside their own cards; what may not happen is the page itself scrolling sideways.
      const clipped = (e: Element) => {
        for (let a = e.parentElement; a && a !== document.body; a = a.parentElement) if (getComputedStyle(a).overflowX !== 'visible') return true
        return false
      }
      return [...document.querySelectorAll('body *')].filter((e) => e.getBoundingClientRect().right > w + 1 && !clipped(e))
        .map((e) => `${e.tagName.toLowerCase()}.${[...e.classList].join('.')} ${Math.round(e.getBoundingClientRect().right)}px`).slice(0, 8)
    })
    expect(wide, 'elements wider than the 390 px page').toEqual([])
    await page.getByTestId('signout-everywhere').click()
    await page.waitForURL((u) => u.pathname === '/login')
    const status = await page.evaluate(async () => (await fetch('/api/me')).status)
    expect(status).toBe(401)
  })

  it('no page broke a Content-Security-Policy rule', () => {
    expect(violations).toEqual([])
  })
})
