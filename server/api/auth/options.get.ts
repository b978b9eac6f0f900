import type { SignInOptions } from '#shared/types/campus'

// Which sign-in methods this installation offers, for the sign-in page (no session needed).
export default defineEventHandler((): SignInOptions => signInOptions())
