import { defineStore } from 'pinia'
import type { PondRole } from '#shared/types'

// The pond the user is working in, so pages deeper down (a fish, a form) know the role and the way back.
export const useCurrentPondStore = defineStore('current-pond', {
  state: () => ({ id: null as string | null, name: '', role: null as PondRole | null }),
  actions: {
    set(pond: { id: string, name: string, role: PondRole }) {
      this.id = pond.id
      this.name = pond.name
      this.role = pond.role
    },
  },
})
