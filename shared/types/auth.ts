import { z } from 'zod'
import { PASSWORD_MIN_LENGTH, type ROLES } from './roles'

export type Role = (typeof ROLES)[number]

export const loginInputSchema = z.object({
  email: z.string().trim().toLowerCase().email('Enter an e-mail address').max(254),
  password: z.string().min(1, 'Enter your password').max(1024),
})
export type LoginInput = z.infer<typeof loginInputSchema>

export const newPasswordSchema = z
  .string()
  .min(PASSWORD_MIN_LENGTH, `Use at least ${PASSWORD_MIN_LENGTH} characters`)
  .max(1024, 'Use at most 1024 characters')

export const passwordChangeSchema = z.object({
  currentPassword: z.string().min(1, 'Enter your current password').max(1024),
  newPassword: newPasswordSchema,
})
export type PasswordChange = z.infer<typeof passwordChangeSchema>

/** What the browser may know about the signed-in person. */
export interface SessionUser {
  id: number
  name: string
  role: Role
}

export interface PublicUser extends SessionUser {
  email: string
}

/** One's own choice about the daily summary of new runs in one's sections (sent to TAs). */
export const dailySummarySchema = z.object({
  dailySummary: z.boolean({ error: 'Choose on or off' }),
})
