import { defineStore } from 'pinia'
import { computed, ref } from 'vue'
import { normaliseUnits, formatQuantity, unitSymbol, toDisplay, type FormatOptions, type Quantity, type UnitPrefs } from '~/composables/units'
import { apiFailure } from '~/composables/apiError'

export type Role = 'admin' | 'manager' | 'tech' | 'painter' | 'auditor'
export const ROLES: readonly Role[] = ['admin', 'manager', 'tech', 'painter', 'auditor']
export const ROLE_LABELS: Record<Role, string> = {
  admin: 'Admin',
  manager: 'Manager',
  tech: 'Technician',
  painter: 'Painter',
  auditor: 'Auditor',
}
/** Role groups the pages use (the server has the same ones). */
export const STAFF_ROLES: readonly Role[] = ROLES
export const MANAGER_ROLES: readonly Role[] = ['admin', 'manager']
export const RECORDER_ROLES: readonly Role[] = ['admin', 'manager', 'tech']

/** An account as GET /api/me and /api/users return it. */
export interface AccountUser {
  id: number
  email: string
  name: string
  role: Role
  mustChangePassword: boolean
  disabled: boolean
  hasPin: boolean
  prefs: Partial<UnitPrefs>
  createdAt?: string
}

const UNITS_COOKIE = 'bb-units'

/**
 * The signed-in user and their display units.
 *
 *   const session = useSessionStore()
 *   await session.fetchMe()                  // once per app start (the auth middleware does it)
 *   session.user, session.signedIn, session.role
 *   session.hasRole('admin', 'manager')
 *   session.format('temperature', 21.4)      // "21.4 °C" or "70.5 °F" for this user
 *   session.symbol('pressure')               // "Pa" | "inH₂O"
 *   session.setUnits({ temperature: 'F' })
 */
export const useSessionStore = defineStore('session', () => {
  const user = ref<AccountUser | null>(null)
  /** True once /api/me has answered (signed in or not). */
  const loaded = ref(false)

  // Units chosen on this device win over the account's stored preferences (there is no
  // endpoint that writes account preferences yet); both fall back to °C, m/s, Pa.
  const unitCookie = useCookie<Partial<UnitPrefs> | null>(UNITS_COOKIE, {
    default: () => null,
    maxAge: 60 * 60 * 24 * 400,
    sameSite: 'lax',
    path: '/',
  })
  const request = useRequestFetch()

  const signedIn = computed(() => user.value !== null)
  const role = computed<Role | null>(() => user.value?.role ?? null)
  const mustChangePassword = computed(() => user.value?.mustChangePassword === true)
  const isAdmin = computed(() => role.value === 'admin')
  const isManager = computed(() => role.value === 'admin' || role.value === 'manager')
  const canRecord = computed(() => !!role.value && RECORDER_ROLES.includes(role.value))
  const units = computed<UnitPrefs>(() => normaliseUnits({ ...(user.value?.prefs ?? {}), ...(unitCookie.value ?? {}) }))

  function hasRole(...roles: readonly Role[] | Role[]): boolean {
    const r = role.value
    return !!r && (roles.length === 0 || roles.includes(r))
  }

  function setUser(u: AccountUser | null) {
    user.value = u ? { ...u, prefs: u.prefs ?? {} } : null
    loaded.value = true
  }

  /**
   * Reads /api/me. Signed out (401) → user null. Any other failure (network, 5xx) changes nothing,
   * so a blip never signs the screen out; before the first answer `loaded` stays false.
   */
  async function fetchMe(): Promise<AccountUser | null> {
    try {
      const res = await request<{ user: AccountUser }>('/api/me', { headers: { accept: 'application/json' } })
      setUser(res.user)
    } catch (e) {
      const f = apiFailure(e)
      if (f.status === 401 || f.status === 403) setUser(null)
    }
    return user.value
  }

  /** Throws the $fetch error (read it with apiFailure) on 400 / 401 / 429. */
  async function login(email: string, password: string): Promise<AccountUser> {
    const res = await $fetch<{ user: AccountUser }>('/api/auth/login', { method: 'POST', body: { email, password } })
    setUser(res.user)
    return res.user
  }

  async function logout(): Promise<void> {
    try {
      await $fetch('/api/auth/logout', { method: 'POST' })
    } finally {
      setUser(null)
    }
  }

  async function changePassword(current: string, next: string): Promise<AccountUser> {
    const res = await $fetch<{ user: AccountUser }>('/api/me/password', { method: 'POST', body: { current, next } })
    setUser(res.user)
    return res.user
  }

  function setUnits(change: Partial<UnitPrefs>) {
    unitCookie.value = normaliseUnits({ ...units.value, ...change })
  }

  /** Forgets the choice made on this device: the account's preferences (or the defaults) apply again. */
  function clearDeviceUnits() {
    unitCookie.value = null
  }

  /** SI value → text in this user's units, e.g. "21.4 °C"; "—" when missing. */
  function format(q: Quantity, si: number | null | undefined, o?: FormatOptions): string {
    return formatQuantity(q, si, units.value, o)
  }

  function symbol(q: Quantity): string {
    return unitSymbol(q, units.value)
  }

  /** SI value → number in this user's unit (NaN when missing), e.g. for chart series. */
  function convert(q: Quantity, si: number | null | undefined): number {
    return toDisplay(q, si, units.value)
  }

  return {
    user,
    loaded,
    signedIn,
    role,
    mustChangePassword,
    isAdmin,
    isManager,
    canRecord,
    units,
    hasRole,
    setUser,
    fetchMe,
    login,
    logout,
    changePassword,
    setUnits,
    clearDeviceUnits,
    format,
    symbol,
    convert,
  }
})
