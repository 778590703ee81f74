// The owner invites a new QC reviewer from the team page; the invited person opens the link
// from the e-mail in a browser of their own, creates an account and lands in the team's
// productions. Screens are saved to test-results/screens/ for a person to look at.
import { randomBytes } from 'node:crypto'
import type { Browser, BrowserContext, Page } from 'playwright-core'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { DEMO_PRODUCTION, DEMO_TEAM, DEMO_USERS } from '../../server/seed/demo'
import { launchBrowser, screen } from '../support/browser'
import { APP_URL, MAIL_UI_URL } from '../support/env'
import { linkIn, waitForMail } from '../support/mail'

const owner = DEMO_USERS.find((u) => u.role === 'owner')!
const invitee = { email: `new-reviewer-${randomBytes(4).toString('hex')}@test.example`, name: 'Ada Okafor', password: 'marsh-levels-2041' }

let browser: Browser
let ownerCtx: BrowserContext
let inviteeCtx: BrowserContext
let ownerPage: Page
let inviteePage: Page
let invitationUrl = ''

const url = (path: string) => `${APP_URL()}${path}`
const VIEWPORT = { width: 1280, height: 800 }

beforeAll(async () => {
  browser = await launchBrowser()
  ownerCtx = await browser.newContext({ viewport: VIEWPORT })
  inviteeCtx = await browser.newContext({ viewport: VIEWPORT })
  ownerPage = await ownerCtx.newPage()
  inviteePage = await inviteeCtx.newPage()
})

afterAll(async () => {
  await browser?.close()
})

describe('inviting a reviewer', () => {
  it('sends a signed-out visitor to sign in, and says when the password is wrong', async () => {
    await ownerPage.goto(url('/team'))
    await ownerPage.waitForURL((u) => u.pathname === '/login')
    expect(new URL(ownerPage.url()).searchParams.get('redirect')).toBe('/team')
    await screen(ownerPage, '01-sign-in')

    await ownerPage.getByTestId('login-email').fill(owner.email)
    await ownerPage.getByTestId('login-password').fill('not-the-password')
    await ownerPage.getByTestId('login-submit').click()
    await expect.poll(() => ownerPage.getByTestId('login-error').textContent()).toBe('E-mail or password is wrong')
    await screen(ownerPage, '02-sign-in-wrong-password')
  })

  it('lets the owner sign in and lands on the page asked for', async () => {
    await ownerPage.getByTestId('login-password').fill(owner.password)
    await ownerPage.getByTestId('login-submit').click()
    await ownerPage.waitForURL((u) => u.pathname === '/team')
    await expect.poll(() => ownerPage.getByTestId('signed-in-user').innerText()).toMatch(new RegExp(`${owner.name}\\s+Owner`))
    await ownerPage.getByTestId('member-row').first().waitFor()
    const emails = await ownerPage.getByTestId('member-row').evaluateAll((rows) => rows.map((r) => r.getAttribute('data-email')))
    expect(emails).toEqual(expect.arrayContaining(DEMO_USERS.map((u) => u.email)))
    await screen(ownerPage, '03-team-as-owner')
  })

  it('refuses a malformed address before sending anything', async () => {
    await ownerPage.getByTestId('invite-email').fill('not-an-address')
    await ownerPage.getByTestId('invite-submit').click()
    await expect.poll(() => ownerPage.getByTestId('invite-form').innerText()).toContain('Enter a valid e-mail address')
  })

  it('sends the invitation and lists it as open', async () => {
    await ownerPage.getByTestId('invite-email').fill(invitee.email)
    await ownerPage.getByTestId('invite-role').selectOption('reviewer')
    await ownerPage.getByTestId('invite-submit').click()
    await expect.poll(() => ownerPage.getByTestId('invite-sent').textContent()).toBe(`Invitation sent to ${invitee.email} as QC reviewer.`)
    const row = ownerPage.locator(`[data-testid="invitation-row"][data-email="${invitee.email}"]`)
    await row.waitFor()
    expect(await row.innerText()).toContain('QC reviewer')
    await screen(ownerPage, '04-team-invitation-sent')

    // The server refuses an address that is already a member (409); the form shows its reason.
    await ownerPage.getByTestId('invite-email').fill(DEMO_USERS[1]!.email)
    await ownerPage.getByTestId('invite-submit').click()
    await expect.poll(() => ownerPage.getByTestId('invite-error').textContent()).toBe(`${DEMO_USERS[1]!.email} is already a member of this team`)
  })

  it('mails a link that opens the invitation', async () => {
    const mail = await waitForMail(invitee.email, new RegExp(`invited you to ${DEMO_TEAM.replace(/[()]/g, '\\$&')}`))
    invitationUrl = linkIn(mail, '/invitations/')
    expect(invitationUrl.startsWith(`${APP_URL()}/invitations/`)).toBe(true)

    await inviteePage.goto(invitationUrl)
    await inviteePage.getByTestId('invitation-form').waitFor()
    expect(await inviteePage.getByTestId('invitation-team').textContent()).toBe(DEMO_TEAM)
    expect(await inviteePage.getByTestId('invitation-email').textContent()).toBe(invitee.email)
    expect(await inviteePage.getByTestId('invitation-role').textContent()).toBe('QC reviewer')
    await screen(inviteePage, '05-invitation')
  })

  it('shows the invitation on the captured-mail page that `npm start` prints, in UTF-8', async () => {
    const mail = await waitForMail(invitee.email, new RegExp(`invited you to ${DEMO_TEAM.replace(/[()]/g, '\\$&')}`))
    // A new user reads the invitation at the printed address, in the same browser as the app.
    const page = await inviteeCtx.newPage()
    for (const width of [1440, 390]) {
      await page.setViewportSize({ width, height: width > 500 ? 900 : 844 })
      await page.goto(MAIL_UI_URL())
      await page.getByText(mail.subject).first().waitFor()
      expect(await page.getByText('Failed to load emails').count()).toBe(0)
      await screen(page, `05b-captured-mail-${width}`)
    }
    // The message opened on that page reads as written ("—", not "â€”").
    await page.setViewportSize({ width: 1440, height: 900 })
    await page.getByText(mail.subject).first().click()
    const body = page.frameLocator('iframe[title="Email HTML content"]').locator('body')
    await expect.poll(() => body.innerText()).toContain('— Linewise')
    expect(await body.innerText()).not.toContain('â€')
    await screen(page, '05c-captured-mail-message')
    // Sent as UTF-8 with the charset declared on the HTML and text parts and in the document.
    const source = await (await fetch(`${MAIL_UI_URL()}/api/email/${mail.id}/source`)).text()
    expect(source).toMatch(/Content-Type: text\/html; charset=utf-8/i)
    expect(source).toMatch(/Content-Type: text\/plain; charset=utf-8/i)
    await page.close()
  })

  it('asks for matching passwords, then creates the account and shows the team’s productions', async () => {
    await inviteePage.getByTestId('invitation-name').fill(invitee.name)
    await inviteePage.getByTestId('invitation-password').fill(invitee.password)
    await inviteePage.getByTestId('invitation-password-confirm').fill(`${invitee.password}x`)
    await inviteePage.getByTestId('invitation-submit').click()
    await expect.poll(() => inviteePage.getByTestId('invitation-form').innerText()).toContain('The two passwords differ')
    await screen(inviteePage, '06-invitation-passwords-differ')

    await inviteePage.getByTestId('invitation-password-confirm').fill(invitee.password)
    await inviteePage.getByTestId('invitation-submit').click()
    await inviteePage.waitForURL((u) => u.pathname === '/')
    const row = inviteePage.getByTestId('production-row').filter({ hasText: DEMO_PRODUCTION.name })
    await row.waitFor()
    expect(await row.innerText()).toContain(DEMO_PRODUCTION.client)
    await expect.poll(() => inviteePage.getByTestId('signed-in-user').innerText()).toMatch(new RegExp(`${invitee.name}\\s+QC reviewer`))
    // A reviewer may create productions (CAN.createProduction).
    expect(await inviteePage.getByTestId('new-production-open').count()).toBe(1)
    await screen(inviteePage, '07-productions-as-new-reviewer')
  })

  it('lets the reviewer create a production, naming the field that is missing first', async () => {
    const name = `Tidewrack Mill (fictional) — Ep. ${Date.now() % 1000}`
    await inviteePage.getByTestId('new-production-open').click()
    await inviteePage.getByTestId('new-production-submit').click()
    // ProductionBody's own message (shared/utils/validation.ts), shown beside the field.
    await expect.poll(() => inviteePage.getByTestId('new-production-form').innerText()).toContain('Enter a production name')
    await inviteePage.getByTestId('new-production-name').fill(name)
    await inviteePage.getByTestId('new-production-client').fill('Brindlecombe Films (fictional)')
    await inviteePage.getByTestId('new-production-submit').click()
    await expect.poll(() => inviteePage.getByTestId('production-created').innerText()).toContain(`“${name}” was created.`)
    const row = inviteePage.getByTestId('production-row').filter({ hasText: name })
    await row.waitFor()
    expect(await row.innerText()).toContain('Brindlecombe Films (fictional)')
  })

  it('opens the production and shows its (still empty) reels', async () => {
    await inviteePage.getByTestId('production-row').filter({ hasText: DEMO_PRODUCTION.name }).getByTestId('production-link').click()
    await inviteePage.waitForURL((u) => /^\/productions\/\d+$/.test(u.pathname))
    await inviteePage.getByRole('heading', { level: 1, name: DEMO_PRODUCTION.name }).waitFor()
    await screen(inviteePage, '08-production')
  })

  it('shows the new member read-only to themselves, and the link cannot be used twice', async () => {
    await inviteePage.getByTestId('nav-team').click()
    await inviteePage.waitForURL((u) => u.pathname === '/team')
    await inviteePage.locator(`[data-testid="member-row"][data-email="${invitee.email}"]`).waitFor()
    expect(await inviteePage.getByTestId('member-role').count()).toBe(0)
    expect(await inviteePage.getByTestId('invite-form').count()).toBe(0)
    expect(await inviteePage.getByTestId('role-description').count()).toBe(4)
    await screen(inviteePage, '09-team-as-reviewer')

    await inviteePage.goto(invitationUrl)
    await inviteePage.getByTestId('invitation-problem').waitFor()
    expect(await inviteePage.getByTestId('invitation-problem').innerText()).toContain('This invitation was already accepted')
    await screen(inviteePage, '10-invitation-used')
  })

  it('moves the person from open invitations to members on the owner’s team page', async () => {
    await ownerPage.reload()
    const member = ownerPage.locator(`[data-testid="member-row"][data-email="${invitee.email}"]`)
    await member.waitFor()
    expect(await member.getByTestId('member-role').inputValue()).toBe('reviewer')
    expect(await ownerPage.locator(`[data-testid="invitation-row"][data-email="${invitee.email}"]`).count()).toBe(0)
    await screen(ownerPage, '11-team-after-accept')
  })

  it('asks before removing a member, then removes them', async () => {
    const member = ownerPage.locator(`[data-testid="member-row"][data-email="${invitee.email}"]`)
    await member.getByTestId('member-remove').click()
    const prompt = ownerPage.getByTestId('member-remove-prompt')
    expect(await prompt.innerText()).toContain(`Remove ${invitee.name} from the team?`)
    // Nothing is removed until the question is answered.
    expect(await member.count()).toBe(1)
    await screen(ownerPage, '12-team-remove-confirm')
    await prompt.getByTestId('member-remove-confirm').click()
    await expect.poll(() => ownerPage.getByTestId('team-notice').textContent()).toBe(`${invitee.name} was removed from the team.`)
    await expect.poll(() => member.count()).toBe(0)
  })
})
