import { randomBytes, randomUUID } from 'node:crypto'
import type { Kysely } from 'kysely'
import * as client from 'openid-client'
import type { CampusRefusal } from '#shared/types/campus'
import type { Database } from '../../database/schema'
import type { CampusSettings } from '../../utils/sign-in-settings'
import { audit, type AuditActor } from '../../utils/audit'
import { reserveLoginAttempt, settleLoginAttempt } from '../../utils/throttle'
import { forgetProviderConfig, providerConfig, refusalFor } from './provider'
import { consumeSignInRequest, saveSignInRequest } from './requests'
import { joinThroughCampus } from '../roster'
import { findLinkedAccount, type LinkedAccount } from './linking'

/** Sends the browser to the provider: a fresh state, nonce and PKCE verifier, kept on our side. */
export async function startCampusSignIn(db: Kysely<Database>, settings: CampusSettings, nextPath: string) {
  const config = await providerConfig(settings)
  const state = client.randomState()
  const nonce = client.randomNonce()
  const codeVerifier = client.randomPKCECodeVerifier()
  const browserToken = randomBytes(24).toString('base64url')
  await saveSignInRequest(db, { state, nonce, codeVerifier, browserToken, nextPath })
  const url = client.buildAuthorizationUrl(config, {
    redirect_uri: settings.redirectUri,
    scope: settings.scopes,
    state,
    nonce,
    code_challenge: await client.calculatePKCECodeChallenge(codeVerifier),
    code_challenge_method: 'S256',
  })
  return { url: url.href, browserToken }
}

export type CampusOutcome =
  | { signedIn: LinkedAccount, nextPath: string }
  | { refused: CampusRefusal, retryAfterSeconds?: number }

interface Callback {
  /** The callback URL as the browser asked for it (path and query on our app URL). */
  url: URL
  browserToken: string | undefined
  who: AuditActor
}

/**
 * Finishes a campus sign-in: throttle, the one-time request, the code exchange with every check
 * openid-client makes (PKCE, state, nonce, issuer, audience, signature, expiry within the
 * leeway), our own check of a token issued in the future, the id claim, the linked account.
 * Every outcome is counted by the throttle and leaves one audit row; a refusal writes nothing else.
 */
export async function finishCampusSignIn(db: Kysely<Database>, settings: CampusSettings, callback: Callback): Promise<CampusOutcome> {
  // The callback carries no password to guess, so only the per-address limit can bind: each
  // attempt gets a key of its own for the per-account count.
  const reservation = await reserveLoginAttempt(`campus:${randomUUID()}`, callback.who.ip)
  if ('retryAfterSeconds' in reservation) {
    await audit(db, callback.who, { action: 'sign-in.campus-refused', entity: 'user', after: { reason: 'throttled' } })
    return { refused: 'throttled', retryAfterSeconds: reservation.retryAfterSeconds }
  }
  const outcome = await exchangeAndLink(db, settings, callback)
  await db.transaction().execute(async (trx) => {
    await settleLoginAttempt(trx, reservation.attemptId, 'signedIn' in outcome)
    if ('signedIn' in outcome) {
      const account = outcome.signedIn
      const who = { id: account.id, ip: callback.who.ip }
      await audit(trx, who, {
        action: 'sign-in.campus', entity: 'user', entityId: account.id, after: { linkedBy: account.linkedBy },
      })
      await joinThroughCampus(trx, who, account.id)
    } else {
      await audit(trx, { id: outcome.accountId ?? null, ip: callback.who.ip }, {
        action: 'sign-in.campus-refused', entity: 'user', entityId: outcome.accountId ?? null,
        after: { reason: outcome.refused, ...(outcome.detail ? { detail: outcome.detail } : {}) },
      })
    }
  })
  return 'signedIn' in outcome ? outcome : { refused: outcome.refused }
}

type Inner =
  | { signedIn: LinkedAccount, nextPath: string }
  | { refused: CampusRefusal, detail?: string, accountId?: number }

async function exchangeAndLink(db: Kysely<Database>, settings: CampusSettings, callback: Callback): Promise<Inner> {
  const params = callback.url.searchParams
  const request = await consumeSignInRequest(db, params.get('state'), callback.browserToken)
  if (!request.ok) return { refused: request.reason }

  let claims: Record<string, unknown>
  try {
    const config = await providerConfig(settings)
    const tokens = await client.authorizationCodeGrant(config, callback.url, {
      pkceCodeVerifier: request.codeVerifier,
      expectedState: request.state,
      expectedNonce: request.nonce,
      idTokenExpected: true,
    })
    claims = { ...tokens.claims() }
  } catch (error) {
    const refused = refusalFor(error)
    if (refused === 'bad-token' || refused === 'provider-unavailable') forgetProviderConfig()
    return { refused, detail: describe(error) }
  }

  // openid-client checks expiry and not-before within the leeway; a token issued in the
  // future means the provider's clock runs ahead of ours by more than that.
  const now = Math.floor(Date.now() / 1000)
  if (typeof claims.iat === 'number' && claims.iat > now + settings.clockLeewaySeconds) {
    return { refused: 'clock-skew', detail: `iat ${claims.iat - now} s ahead` }
  }
  const raw = claims[settings.idClaim]
  const campusId = typeof raw === 'string' ? raw.trim() : typeof raw === 'number' ? String(raw) : ''
  if (!campusId) return { refused: 'missing-id-claim', detail: `no "${settings.idClaim}" claim` }

  const account = await findLinkedAccount(db, campusId, claims)
  if (!account) return { refused: 'unknown-person', detail: `subject ${String(claims.sub)}` }
  if (account.disabledAt) return { refused: 'disabled', accountId: account.id }
  return { signedIn: account, nextPath: request.nextPath }
}

// For the audit row: what went wrong, without tokens or secrets (library messages name claims, not values).
function describe(error: unknown): string {
  const text = error instanceof Error ? `${error.name}: ${error.message}` : String(error)
  const cause = error instanceof Error && error.cause instanceof Error ? ` (${error.cause.message})` : ''
  return (text + cause).slice(0, 300)
}
