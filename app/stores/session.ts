import { defineStore } from 'pinia'
import type { CurrentUser, UnitSystem } from '#shared/types'
import type { DecimalMark } from '#shared/utils/decimal'
import type { ApiResponse } from '~/utils/api-fetch'

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
        this.user = await useRequestFetch()<CurrentUser>('/api/me')
      }
      catch {
        this.user = null
      }
      this.loaded = true
    },
    async signIn(body: { email: string, password: string }) {
      this.user = await apiFetch<ApiResponse<'/api/auth/sign-in', 'post'>>('/api/auth/sign-in', { method: 'POST', body })
      return this.user
    },
    async signUp(body: { name: string, email: string, password: string, decimalMark?: DecimalMark }) {
      this.user = await apiFetch<ApiResponse<'/api/auth/sign-up', 'post'>>('/api/auth/sign-up', { method: 'POST', body })
      return this.user
    },
    async signOut() {
      await apiFetch('/api/auth/sign-out', { method: 'POST' })
      this.user = null
      await clearNuxtData()
    },
    async update(body: { name?: string, units?: UnitSystem, decimalMark?: DecimalMark }) {
      this.user = await apiFetch<ApiResponse<'/api/me', 'patch'>>('/api/me', { method: 'PATCH', body })
    },
  },
})
