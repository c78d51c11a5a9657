import { computed, ref } from 'vue'
import { defineStore } from 'pinia'
import type { Role, SessionUser, SignInInput, UpdateProfileInput } from '@shared/schemas'
import * as authApi from '@/api/auth'
import { forgetCachedSession } from '@/lib/cachedSession'

/** The signed-in user and what their role allows. One store, used by the router guard. */
export const useSessionStore = defineStore('session', () => {
  const user = ref<SessionUser | null>(null)
  /** True once we asked the server who is signed in (so the guard can decide). */
  const checked = ref(false)
  let pending: Promise<void> | null = null

  const signedIn = computed(() => user.value !== null)
  const role = computed<Role | null>(() => user.value?.role ?? null)
  const isAdmin = computed(() => role.value === 'admin')
  const isOffice = computed(() => role.value === 'office')
  const isClient = computed(() => role.value === 'client')

  /** True when the signed-in user has one of the roles. */
  function hasRole(...roles: Role[]): boolean {
    return role.value !== null && roles.includes(role.value)
  }

  /** Asks the server once who is signed in; later calls reuse the answer. */
  function ensureChecked(): Promise<void> {
    if (checked.value) return Promise.resolve()
    pending ??= authApi
      .fetchMe()
      .then((me) => {
        user.value = me
      })
      .catch(() => {
        // The server could not be asked (the client already showed why): treat as signed out.
        user.value = null
      })
      .finally(() => {
        checked.value = true
        pending = null
      })
    return pending
  }

  async function signIn(input: SignInInput): Promise<SessionUser> {
    const me = await authApi.signIn(input)
    user.value = me
    checked.value = true
    return me
  }

  async function signOut(): Promise<void> {
    try {
      await authApi.signOut()
    } finally {
      user.value = null
      await forgetCachedSession()
    }
  }

  async function signOutEverywhere(): Promise<void> {
    await authApi.signOutEverywhere()
    user.value = null
    await forgetCachedSession()
  }

  async function updateProfile(input: UpdateProfileInput): Promise<void> {
    user.value = await authApi.updateProfile(input)
  }

  /** The server says the session is gone (401): forget the user locally. */
  function forget(): void {
    user.value = null
    checked.value = true
  }

  return {
    user,
    checked,
    signedIn,
    role,
    isAdmin,
    isOffice,
    isClient,
    hasRole,
    ensureChecked,
    signIn,
    signOut,
    signOutEverywhere,
    updateProfile,
    forget,
  }
})
