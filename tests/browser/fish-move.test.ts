import { describe, expect, it } from 'vitest'
import { browserForFile, screenshots, signIn } from '../support/browser'
import { testDb } from '../support/db'
import { addMember, createFish, createPond, signedInUser } from '../support/factories'

const chromium = browserForFile()

describe('moving a fish between two of the owner’s ponds', () => {
  it('asks first, naming the members of the old pond who are not in the new one, and moves only when confirmed', async () => {
    const owner = await signedInUser({ name: 'Marion Reed' })
    const [keeper, vet, sharedVet] = await Promise.all([signedInUser({ name: 'Ivo Keeper' }), signedInUser({ name: 'Dr Lena Brook' }), signedInUser({ name: 'Dr Sam Both' })])
    const from = await createPond(owner.client, { name: `Garden pond ${Date.now() % 100000}` })
    const to = await createPond(owner.client, { name: `Courtyard pond ${Date.now() % 100000}` })
    await addMember(from.id, keeper.user.id, 'keeper')
    await addMember(from.id, vet.user.id, 'vet')
    await addMember(from.id, sharedVet.user.id, 'vet')
    await addMember(to.id, sharedVet.user.id, 'vet')
    const fish = await createFish(owner.client, from.id, { name: 'Pebble' })

    const page = await chromium.context.newPage()
    await signIn(page, owner.email, owner.password)
    await page.goto(`/fish/${fish.id}`, { waitUntil: 'networkidle' })
    await page.getByText('Move or rehome Pebble').click()
    await page.getByTestId('move-pond').selectOption(to.id)
    await page.getByTestId('move-submit').click()
    const confirm = page.getByTestId('move-confirm')
    await confirm.waitFor()
    const words = (await page.getByTestId('move-losing-sight').textContent())!.replace(/\s+/g, ' ')
    expect(words).toContain('Dr Lena Brook (vet)')
    expect(words).toContain('Ivo Keeper (keeper)')
    // The vet who is in both ponds keeps seeing the fish, and so does the owner of both.
    expect(words).not.toContain('Dr Sam Both')
    expect(words).not.toContain('Marion Reed')
    await screenshots(page, 'fish-move-confirm')
    // Nothing has moved while the question is open.
    const pondOf = async () => (await testDb().query('select pond_id from fish where id = $1', [fish.id])).rows[0].pond_id
    expect(await pondOf()).toBe(from.id)

    await page.getByRole('button', { name: 'Cancel' }).click()
    await expect.poll(() => confirm.count()).toBe(0)
    expect(await pondOf()).toBe(from.id)

    await page.getByTestId('move-submit').click()
    await page.getByTestId('move-confirm-submit').click()
    await expect.poll(pondOf).toBe(to.id)
    await page.close()
  })
})
