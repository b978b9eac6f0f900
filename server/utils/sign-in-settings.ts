import type { SignInOptions } from '#shared/types/campus'

export interface CampusSettings {
  issuer: URL
  clientId: string
  clientSecret: string
  idClaim: string
  scopes: string
  buttonLabel: string
  /** Where the provider sends the browser back: `<app URL>/auth/campus/callback`. */
  redirectUri: string
  appUrl: string
  timeoutSeconds: number
  clockLeewaySeconds: number
}

const positive = (value: unknown, fallback: number) => {
  const n = Number(value)
  return Number.isFinite(n) && n > 0 ? n : fallback
}

/** Campus sign-in as configured by NUXT_CAMPUS_*; null while the issuer or the client id is empty. */
export function campusSettings(): CampusSettings | null {
  const config = useRuntimeConfig()
  const campus = config.campus
  if (!campus?.issuer || !campus.clientId) return null
  const appUrl = String(config.public.appUrl).replace(/\/$/, '')
  return {
    issuer: new URL(String(campus.issuer)),
    clientId: String(campus.clientId),
    clientSecret: String(campus.clientSecret ?? ''),
    idClaim: String(campus.idClaim || 'campus_id'),
    scopes: String(campus.scopes || 'openid email profile'),
    buttonLabel: String(campus.buttonLabel || 'Sign in with your campus account'),
    redirectUri: `${appUrl}/auth/campus/callback`,
    appUrl,
    timeoutSeconds: positive(campus.timeoutSeconds, 8),
    clockLeewaySeconds: positive(campus.clockLeewaySeconds, 60),
  }
}

function breakGlassEmails(): string[] {
  return String(useRuntimeConfig().passwordSignIn?.breakGlass ?? '')
    .split(',').map((e) => e.trim().toLowerCase()).filter(Boolean)
}

/** Password sign-in is on unless NUXT_PASSWORD_SIGN_IN_MODE=off; then only for the break-glass e-mails. */
export function passwordSignInOpenTo(email: string): boolean {
  if (String(useRuntimeConfig().passwordSignIn?.mode ?? 'on') !== 'off') return true
  return breakGlassEmails().includes(email.toLowerCase())
}

export function signInOptions(): SignInOptions {
  const campus = campusSettings()
  return {
    campus: campus && { label: campus.buttonLabel },
    password: String(useRuntimeConfig().passwordSignIn?.mode ?? 'on') === 'off' ? 'break-glass' : 'everyone',
    helpContact: String(useRuntimeConfig().campus?.helpContact || 'your course instructor'),
  }
}
