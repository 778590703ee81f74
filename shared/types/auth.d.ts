declare module '#auth-utils' {
  interface User {
    id: number
    email: string
    name: string
  }
  interface SecureSessionData {
    /** Random id of the server-side session row (stored there as its SHA-256). */
    sid?: string
  }
}
export {}
