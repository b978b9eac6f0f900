import { createServer, type IncomingMessage, type Server, type ServerResponse } from 'node:http'
import type { AddressInfo } from 'node:net'
import { exportJWK, generateKeyPair, SignJWT } from 'jose'

// A deliberately small OpenID provider for the refusal tests only: discovery, keys and a token
// endpoint whose ID token the test bends (another audience, another issuer, a wrong nonce, a
// skewed clock, a missing claim) or that fails or hangs. The happy path goes through the real
// provider (scripts/identity-provider.mjs); this one exists to misbehave.

export interface IssuerBehaviour {
  /** Claims laid over the next ID tokens; a key set to undefined is left out. */
  claims: Record<string, unknown>
  /** Answer the token request with this OAuth error instead of tokens. */
  tokenError?: { status: number, error: string }
  /** Never answer the token request (a provider that is up but stuck). */
  hangToken?: boolean
}

export interface TestIssuer {
  url: string
  clientId: string
  behaviour: IssuerBehaviour
  /** The nonce the next ID token carries unless `claims.nonce` says otherwise. */
  nonce: string
  close: () => Promise<void>
}

const json = (res: ServerResponse, status: number, body: unknown) =>
  res.writeHead(status, { 'content-type': 'application/json', 'cache-control': 'no-store' }).end(JSON.stringify(body))

const drain = (req: IncomingMessage) => new Promise<void>((resolve) => {
  req.resume()
  req.on('end', () => resolve())
})

export async function startTestIssuer(clientId = 'test-client'): Promise<TestIssuer> {
  const { privateKey, publicKey } = await generateKeyPair('RS256')
  const jwk = { ...(await exportJWK(publicKey)), kid: 'test-key', alg: 'RS256', use: 'sig' }
  const hanging = new Set<ServerResponse>()
  let url = ''
  const issuer: TestIssuer = { url, clientId, behaviour: { claims: {} }, nonce: '', close: async () => {} }

  async function idToken() {
    const now = Math.floor(Date.now() / 1000)
    const claims: Record<string, unknown> = {
      iss: url, aud: clientId, sub: 'test-person-1', iat: now, exp: now + 300, nonce: issuer.nonce,
      email: 'student01@larkspur.example', email_verified: true, campus_id: 'LS2640137',
      ...issuer.behaviour.claims,
    }
    for (const [key, value] of Object.entries(claims)) if (value === undefined) delete claims[key]
    return new SignJWT(claims).setProtectedHeader({ alg: 'RS256', kid: 'test-key' }).sign(privateKey)
  }

  const server: Server = createServer((req, res) => {
    const path = new URL(req.url ?? '/', 'http://x').pathname
    if (path === '/.well-known/openid-configuration') {
      return json(res, 200, {
        issuer: url,
        authorization_endpoint: `${url}/authorize`,
        token_endpoint: `${url}/token`,
        jwks_uri: `${url}/jwks`,
        response_types_supported: ['code'],
        subject_types_supported: ['public'],
        id_token_signing_alg_values_supported: ['RS256'],
        code_challenge_methods_supported: ['S256'],
      })
    }
    if (path === '/jwks') return json(res, 200, { keys: [jwk] })
    if (path === '/token' && req.method === 'POST') {
      void drain(req).then(async () => {
        const { tokenError, hangToken } = issuer.behaviour
        if (hangToken) return hanging.add(res)
        if (tokenError) return json(res, tokenError.status, { error: tokenError.error, error_description: 'grant request is invalid' })
        json(res, 200, { access_token: 'test-access-token', token_type: 'Bearer', expires_in: 300, id_token: await idToken() })
      })
      return
    }
    res.writeHead(404).end()
  })
  await new Promise<void>((resolve) => server.listen(0, '127.0.0.1', resolve))
  url = `http://127.0.0.1:${(server.address() as AddressInfo).port}`
  issuer.url = url
  issuer.close = () => new Promise((resolve) => {
    for (const res of hanging) res.destroy()
    server.closeAllConnections()
    server.close(() => resolve())
  })
  return issuer
}
