import { defineStore } from 'pinia'
import { computed, ref } from 'vue'
import type { Role } from '@shared/roles'
import * as auth from '@/api/auth'
import type { PublicUser } from '@/api/types'

/** The signed-in person; loaded from /api/me once per page load, then kept in step by sign-in and sign-out. */
export const useSessionStore = defineStore('session', () => {
  const user = ref<PublicUser | null>(null)
  const loaded = ref(false)
  let loading: Promise<PublicUser | null> | null = null

  const role = computed<Role | null>(() => user.value?.role ?? null)
  const signedIn = computed(() => user.value !== null)

  /** Asks the server who is signed in, once; later calls reuse the answer. */
  function ensureLoaded(): Promise<PublicUser | null> {
    if (loaded.value) return Promise.resolve(user.value)
    loading ??= auth
      .fetchMe()
      .then((me) => {
        user.value = me
        loaded.value = true
        return me
      })
      .finally(() => {
        loading = null
      })
    return loading
  }

  async function signIn(email: string, password: string): Promise<PublicUser> {
    const me = await auth.signIn(email, password)
    user.value = me
    loaded.value = true
    return me
  }

  async function signOut(): Promise<void> {
    try {
      await auth.signOut()
    } finally {
      clear()
    }
  }

  /** Forgets the user without asking the server, e.g. after a 401. */
  function clear(): void {
    user.value = null
    loaded.value = true
  }

  return { user, loaded, role, signedIn, ensureLoaded, signIn, signOut, clear }
})
