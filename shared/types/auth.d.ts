// Session payload of nuxt-auth-utils, seen by the app and the server type-checks (shared/types).
declare module '#auth-utils' {
  interface User {
    id: number
    email: string
    name: string
    role: 'admin' | 'manager' | 'tech' | 'painter' | 'auditor'
    mustChangePassword: boolean
  }

  interface UserSession {
    /** A paired booth screen: limited to this booth, no user until a painter enters a PIN. */
    screen?: { boothId: number; pairedAt: number }
    loggedInAt?: number
  }
}

export {}
