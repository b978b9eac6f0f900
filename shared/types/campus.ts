// Campus sign-in (OpenID Connect): why a sign-in was refused, in words a person understands.
// The server sends the reason code to /sign-in-problem; the page and the audit row use it.

export const CAMPUS_REFUSALS = {
  'unknown-person': {
    title: 'Halocline does not know you yet',
    text: 'Your campus account works, but it does not belong to any course in Halocline, so no account was made.',
  },
  'disabled': {
    title: 'This account is disabled',
    text: 'Your campus account matches a Halocline account that has been disabled.',
  },
  'missing-id-claim': {
    title: 'Your campus account did not say who you are',
    text: 'The campus sign-in did not include your student or staff id, so Halocline cannot tell whose account this is.',
  },
  'wrong-state': {
    title: 'This sign-in link is not one we started',
    text: 'The answer from the campus sign-in does not match a sign-in started in this browser. Start again from the sign-in page.',
  },
  'replayed-state': {
    title: 'This sign-in has already been used',
    text: 'Each campus sign-in can be finished once. Start again from the sign-in page.',
  },
  'expired-request': {
    title: 'This sign-in took too long',
    text: 'A campus sign-in must be finished within 10 minutes. Start again from the sign-in page.',
  },
  'code-rejected': {
    title: 'The campus sign-in expired',
    text: 'The campus provider no longer accepts this sign-in (it expired or was already used). Start again from the sign-in page.',
  },
  'wrong-nonce': {
    title: 'The campus sign-in could not be checked',
    text: 'The answer from the campus provider does not belong to this sign-in. Start again from the sign-in page.',
  },
  'wrong-audience': {
    title: 'The campus sign-in was meant for another service',
    text: 'The campus provider answered for a different application. Nothing was signed in. Tell your IT help desk if this happens again.',
  },
  'wrong-issuer': {
    title: 'The answer came from an unexpected provider',
    text: 'The sign-in answer did not come from the campus provider Halocline is set up for. Nothing was signed in.',
  },
  'clock-skew': {
    title: 'The clocks do not agree',
    text: 'The campus sign-in carries a time too far from ours to be trusted. Try again in a minute; tell your IT help desk if it keeps happening.',
  },
  'bad-token': {
    title: 'The campus sign-in could not be checked',
    text: 'The answer from the campus provider failed our checks. Nothing was signed in. Start again from the sign-in page.',
  },
  'provider-said-no': {
    title: 'The campus sign-in was cancelled',
    text: 'The campus provider did not complete the sign-in. Start again from the sign-in page.',
  },
  'provider-unavailable': {
    title: 'The campus sign-in is not answering',
    text: 'The campus provider is down or too slow right now. Try again in a few minutes, or use password sign-in if your installation allows it.',
  },
  'throttled': {
    title: 'Too many sign-in attempts',
    text: 'Too many sign-ins have been tried from your network. Please wait a few minutes and try again.',
  },
} as const satisfies Record<string, { title: string, text: string }>

export type CampusRefusal = keyof typeof CAMPUS_REFUSALS

export const isCampusRefusal = (value: unknown): value is CampusRefusal =>
  typeof value === 'string' && Object.hasOwn(CAMPUS_REFUSALS, value)

/** What the sign-in page needs to know about the installation's sign-in methods. */
export interface SignInOptions {
  /** The institution's button, when campus sign-in is configured. */
  campus: { label: string } | null
  /** 'everyone', or only the break-glass administrators. */
  password: 'everyone' | 'break-glass'
  /** Whom a person the product does not know should ask. */
  helpContact: string
}
