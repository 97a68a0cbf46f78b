import { describe, expect, it } from 'vitest'
import { browserForFile, screenshots, signIn } from '../support/browser'
import { linkIn, waitForMail } from '../support/mail'
import { addMember, createFish, createPond, signedInUser, TEST_PASSWORD, uniqueEmail } from '../support/factories'
import { membershipOf } from '../support/custody'

const chromium = browserForFile()

describe('handing a pond over in Chromium', () => {
  it('the owner offers the pond; the new owner signs up through the mailed link and accepts it', async () => {
    const owner = await signedInUser({ name: 'Marion Reed' })
    const keeper = await signedInUser({ name: 'Ivo Keeper' })
    const pond = await createPond(owner.client, { name: `Orchard pond ${Date.now() % 100000}` })
    await addMember(pond.id, keeper.user.id, 'keeper')
    const fish = await createFish(owner.client, pond.id, { name: 'Lantern' })
    const heirEmail = uniqueEmail('heir')

    const page = await chromium.context.newPage()
    await signIn(page, owner.email, owner.password)
    await page.goto(`/ponds/${pond.id}/settings`, { waitUntil: 'networkidle' })
    await page.getByTestId('handover-card').waitFor()
    await page.getByTestId('handover-email').fill(heirEmail)
    await page.getByTestId('handover-option-read_only').check()
    await page.getByTestId('handover-submit').click()
    await expect.poll(() => page.getByTestId('handover-offers').textContent()).toContain(heirEmail)
    await expect.poll(() => page.getByRole('alert').filter({ hasText: 'Nothing changes until they accept' }).count()).toBe(1)
    await page.getByText('Audit log').click()
    await expect.poll(() => page.getByTestId('audit-log').textContent()).toContain('Pond offered to a new owner')
    await screenshots(page, 'handover-offer')
    // Until the new owner accepts, the pond is still the old owner's.
    expect((await membershipOf(pond.id, owner.user.id))?.role).toBe('owner')

    const mail = await waitForMail(heirEmail, m => m.subject.includes('offers you the pond'))
    const link = new URL(linkIn(mail, '/handovers/'))
    await page.context().clearCookies()
    await page.goto(link.pathname, { waitUntil: 'networkidle' })
    await expect.poll(() => page.getByTestId('handover-summary').textContent()).toContain(pond.name)
    await page.getByTestId('handover-sign-up').click()
    await page.waitForURL(/\/sign-up/)
    expect(await page.getByLabel('E-mail').inputValue()).toBe(heirEmail)
    await page.getByLabel('Your name').fill('Noor Heir')
    await page.getByLabel('Password').fill(TEST_PASSWORD)
    await page.getByTestId('sign-up-submit').click()
    await page.waitForURL(url => url.pathname === link.pathname)
    await page.waitForLoadState('networkidle')
    await screenshots(page, 'handover-accept')
    await page.getByTestId('accept-handover').click()
    await page.waitForURL(url => url.pathname === `/ponds/${pond.id}`)
    await page.getByTestId(`fish-card-${fish.name}`).waitFor()

    await page.goto(`/fish/${fish.id}`, { waitUntil: 'networkidle' })
    await page.getByTestId('entry-owner_change').waitFor()
    await page.goto(`/ponds/${pond.id}/settings`, { waitUntil: 'networkidle' })
    await page.getByTestId('handover-card').waitFor()
    await expect.poll(() => page.getByTestId('read-only-member').count()).toBe(2)
    await screenshots(page, 'handover-done')
    expect(await membershipOf(pond.id, owner.user.id)).toEqual({ role: 'keeper', read_only: true })
    expect(await membershipOf(pond.id, keeper.user.id)).toEqual({ role: 'keeper', read_only: true })
    await page.close()
  })
})
