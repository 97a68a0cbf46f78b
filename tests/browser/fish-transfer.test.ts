import { describe, expect, it } from 'vitest'
import { browserForFile, screenshots } from '../support/browser'
import { testDb } from '../support/db'
import { createFish, createPond, signedInUser } from '../support/factories'
import { tokenFromMail } from '../support/custody'

const chromium = browserForFile()

describe('taking in a fish offered by mail, in Chromium', () => {
  it('the new keeper opens the link, chooses one of their ponds and the fish moves there', async () => {
    const owner = await signedInUser({ name: 'Tobias Fenn' })
    const adopter = await signedInUser({ name: 'Rhea Calder' })
    const pond = await createPond(owner.client, { name: `Mill pond ${Date.now() % 100000}` })
    const fish = await createFish(owner.client, pond.id, { name: 'Ember' })
    const home = await createPond(adopter.client, { name: `Willow pond ${Date.now() % 100000}` })
    const since = new Date()
    const offered = await owner.client.post(`/api/fish/${fish.id}/transfers`, { email: adopter.email, confirmSeparation: false })
    expect(offered.status, JSON.stringify(offered.body)).toBe(201)
    const token = await tokenFromMail(adopter.email, 'offers you the fish', '/transfers/', since)

    const page = await chromium.context.newPage()
    await page.context().clearCookies()
    await page.goto(`/transfers/${token}`, { waitUntil: 'networkidle' })
    // Signed out: the page says what is offered and leads to sign-in, coming back here afterwards.
    await expect.poll(() => page.getByRole('heading', { name: 'A fish offered to you' }).isVisible()).toBe(true)
    await expect.poll(() => page.getByText('Tobias Fenn offers').textContent()).toContain('Ember')
    await page.getByTestId('transfer-sign-in').click()
    await page.waitForURL(/\/sign-in/)
    await page.getByLabel('E-mail').fill(adopter.email)
    await page.getByLabel('Password').fill(adopter.password)
    await page.getByTestId('sign-in-submit').click()
    await page.waitForURL(new RegExp(`/transfers/${token}$`))
    await expect.poll(() => page.getByTestId('transfer-pond').inputValue()).toBe(home.id)
    await screenshots(page, 'transfer-accept')
    await page.getByTestId('accept-transfer').click()
    await page.waitForURL(new RegExp(`/fish/${fish.id}$`))
    const { rows } = await testDb().query('select pond_id from fish where id = $1', [fish.id])
    expect(rows[0].pond_id).toBe(home.id)

    // The link cannot be used twice: the page now says the offer was taken.
    await page.goto(`/transfers/${token}`, { waitUntil: 'networkidle' })
    await expect.poll(() => page.getByText('This offer has been accepted.').isVisible()).toBe(true)
    expect(await page.getByTestId('accept-transfer').count()).toBe(0)
    await page.close()
  })

  it('says so when the link is not valid', async () => {
    const page = await chromium.context.newPage()
    await page.goto('/transfers/not-a-real-token', { waitUntil: 'networkidle' })
    await expect.poll(() => page.getByText('This link is not valid. Ask the owner to send a new one.').isVisible()).toBe(true)
    await page.close()
  })
})
