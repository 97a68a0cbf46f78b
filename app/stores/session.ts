import { defineStore } from 'pinia'
import type { CurrentUser, UnitSystem } from '#shared/types'
import type { DecimalMark } from '#shared/utils/decimal'
import type { ApiResponse } from '~/utils/api-fetch'

async function keptUser(): Promise<CurrentUser | null> {
  try {
    return ((await savedAnswer('/api/me'))?.data as CurrentUser | undefined) ?? null
  }
  catch {
    return null
  }
}

/**
 * The signed-in person, as /api/me answers. On the server the page request has usually read its session already
 * (server/middleware/02.session.ts): asking /api/me was an inner request through the whole h3 stack for what is
 * on the request's context (`requireUser` answers that same object, written out as JSON). Only a request that
 * carries a cookie the context says nothing about still asks.
 */
async function currentUser(): Promise<CurrentUser | null> {
  if (import.meta.server) {
    const event = useRequestEvent()
    const user = (event?.context as { auth?: { user?: CurrentUser } } | undefined)?.auth?.user
    if (user) return JSON.parse(JSON.stringify(user)) as CurrentUser
    if (!useRequestHeaders(['cookie']).cookie) return null
  }
  return await useRequestFetch()<CurrentUser>('/api/me')
}

export const useSessionStore = defineStore('session', {
  state: () => ({ user: null as CurrentUser | null, loaded: false }),
  getters: {
    signedIn: state => state.user !== null,
    units: (state): UnitSystem => state.user?.units ?? 'metric',
    decimalMark: (state): DecimalMark => state.user?.decimalMark ?? 'point',
  },
  actions: {
    async load() {
      try {
        this.user = await currentUser()
        await this.keepOnDevice()
      }
      catch (error) {
        // With no network the app starts for whoever was signed in on this device, from what it kept.
        this.user = import.meta.client && isNetworkFailure(error) ? await keptUser() : null
      }
      this.loaded = true
    },
    /** Makes this account the device's one (another account's kept data is deleted) and keeps the user for offline starts. */
    async keepOnDevice() {
      if (!import.meta.client || !this.user) return
      try {
        await adoptAccount(this.user.id)
        await saveAnswer('/api/me', this.user)
      }
      catch { /* no IndexedDB (private mode): the app works, only not offline */ }
    },
    async signIn(body: { email: string, password: string }) {
      this.user = await apiFetch<ApiResponse<'/api/auth/sign-in', 'post'>>('/api/auth/sign-in', { method: 'POST', body })
      await this.keepOnDevice()
      return this.user
    },
    async signUp(body: { name: string, email: string, password: string, decimalMark?: DecimalMark }) {
      this.user = await apiFetch<ApiResponse<'/api/auth/sign-up', 'post'>>('/api/auth/sign-up', { method: 'POST', body })
      await this.keepOnDevice()
      return this.user
    },
    /** Ends the session and removes everything this device kept for the account (records, outbox, drafts). */
    async signOut() {
      try {
        await apiFetch('/api/auth/sign-out', { method: 'POST' })
      }
      catch (error) {
        // Offline, the device is still cleared; the server's session ends at its own time limits.
        if (!isNetworkFailure(error)) throw error
      }
      this.user = null
      forgetOutbox()
      await clearDevice()
      await clearNuxtData()
    },
    async update(body: { name?: string, units?: UnitSystem, decimalMark?: DecimalMark }) {
      this.user = await apiFetch<ApiResponse<'/api/me', 'patch'>>('/api/me', { method: 'PATCH', body })
      await this.keepOnDevice()
    },
  },
})
