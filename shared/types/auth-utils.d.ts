// Shapes of nuxt-auth-utils' sealed session. The cookie carries only these fields.
declare module '#auth-utils' {
  interface User {
    id: number
    name: string
    role: 'instructor' | 'ta' | 'coordinator' | 'student'
  }
  interface UserSession {
    loggedInAt?: number
    /** How the session was opened: with a password or through the campus identity provider. */
    via?: 'password' | 'campus'
  }
  interface SecureSessionData {
    /** users.session_version when the session was issued; a bump ends it everywhere. */
    sv: number
  }
}
export {}
