#!/usr/bin/env node
// The local stand-in for a university's identity provider: a real OpenID Connect provider
// (oidc-provider) on 127.0.0.1 that knows the demo people by e-mail and demo student id
// (scripts/lib/campus-people.mjs). Everyone's password here is the demo password.
// Usage: node scripts/identity-provider.mjs --port 4455 --client-id ID --client-secret S --app-url http://127.0.0.1:3000
import { generateKeyPairSync, randomBytes } from 'node:crypto'
import { createServer } from 'node:http'
import { writeFileSync } from 'node:fs'
import { parseArgs } from 'node:util'
import Provider from 'oidc-provider'
import { campusPeople, findCampusPerson } from './lib/campus-people.mjs'

const { values } = parseArgs({
  options: {
    'port': { type: 'string', default: '4455' },
    'client-id': { type: 'string', default: 'halocline-local' },
    'client-secret': { type: 'string', default: '' },
    'app-url': { type: 'string', default: 'http://127.0.0.1:3000' },
    'password': { type: 'string', default: 'halocline-demo' },
    'pid-file': { type: 'string' },
  },
})
const issuer = `http://127.0.0.1:${values.port}`
const appUrl = values['app-url'].replace(/\/$/, '')
const SCOPES = 'openid email profile'
const CLAIMS = ['sub', 'email', 'email_verified', 'name', 'campus_id']

const { privateKey } = generateKeyPairSync('rsa', { modulusLength: 2048 })
const signingKey = { ...privateKey.export({ format: 'jwk' }), alg: 'RS256', use: 'sig', kid: randomBytes(6).toString('hex') }

const provider = new Provider(issuer, {
  clients: [{
    client_id: values['client-id'],
    ...(values['client-secret'] ? { client_secret: values['client-secret'] } : { token_endpoint_auth_method: 'none' }),
    redirect_uris: [`${appUrl}/auth/campus/callback`],
    post_logout_redirect_uris: [`${appUrl}/login`],
    grant_types: ['authorization_code'],
    response_types: ['code'],
  }],
  jwks: { keys: [signingKey] },
  cookies: { keys: [randomBytes(24).toString('base64url')] },
  claims: { openid: ['sub'], email: ['email', 'email_verified'], profile: ['name', 'campus_id'] },
  // The claims of the granted scopes go into the ID token itself, as many campus providers do.
  conformIdTokenClaims: false,
  features: {
    devInteractions: { enabled: false },
    rpInitiatedLogout: { enabled: true, logoutSource },
  },
  pkce: { required: () => true },
  interactions: { url: (_ctx, interaction) => `/interaction/${interaction.uid}` },
  async findAccount(_ctx, sub) {
    const person = campusPeople().find((p) => p.campusId === sub)
    if (!person) return undefined
    return {
      accountId: sub,
      claims: async () => ({
        sub, email: person.email, email_verified: person.emailVerified, name: person.name, campus_id: person.campusId,
      }),
    }
  },
  // Halocline is this provider's own first-party client: no consent screen.
  async loadExistingGrant(ctx) {
    const grantId = ctx.oidc.result?.consent?.grantId || ctx.oidc.session.grantIdFor(ctx.oidc.client.clientId)
    if (grantId) return ctx.oidc.provider.Grant.find(grantId)
    const grant = new ctx.oidc.provider.Grant({ clientId: ctx.oidc.client.clientId, accountId: ctx.oidc.session.accountId })
    grant.addOIDCScope(SCOPES)
    grant.addOIDCClaims(CLAIMS)
    await grant.save()
    return grant
  },
})

const escape = (text) => String(text).replace(/[&<>"']/g, (c) => `&#${c.charCodeAt(0)};`)

function page(title, body) {
  return `<!doctype html><html lang="en"><head><meta charset="utf-8"><meta name="viewport" content="width=device-width">
<title>${escape(title)}</title><style>
body{font:16px/1.5 system-ui,sans-serif;max-width:26rem;margin:3rem auto;padding:0 1rem;color:#1d2430}
h1{font-size:1.3rem}label{display:block;margin-top:1rem;font-weight:600}
input{width:100%;box-sizing:border-box;padding:.5rem;font:inherit;border:1px solid #6b7280;border-radius:4px}
button{margin-top:1.25rem;padding:.6rem 1.2rem;font:inherit;background:#1f4e79;color:#fff;border:0;border-radius:4px}
.note{color:#4b5563;font-size:.9rem}.problem{color:#8a1c1c;font-weight:600}
</style></head><body><main>${body}</main></body></html>`
}

function loginPage(uid, problem = '') {
  return page('Larkspur State University sign-in (local stand-in)', `
<h1>Larkspur State University sign-in</h1>
<p class="note">A local stand-in for the university's identity provider, for the demo and the tests.
Sign in with a demo e-mail address or demo student id; the password is the demo password.</p>
${problem ? `<p class="problem" role="alert">${escape(problem)}</p>` : ''}
<form method="post" action="/interaction/${escape(uid)}/login">
<label for="login">E-mail or campus id</label><input id="login" name="login" autocomplete="username" required>
<label for="password">Password</label><input id="password" name="password" type="password" autocomplete="current-password" required>
<button type="submit">Continue</button></form>`)
}

async function logoutSource(ctx, form) {
  ctx.body = page('Sign out of the campus account', `<h1>Sign out of your campus account?</h1>
${form}<button type="submit" form="op.logoutForm" name="logout" value="yes">Sign out</button>
<button type="submit" form="op.logoutForm">Stay signed in</button>`)
}

function readForm(req) {
  return new Promise((resolve, reject) => {
    let text = ''
    req.setEncoding('utf8')
    req.on('data', (chunk) => {
      text += chunk
      if (text.length > 10_000) req.destroy()
    })
    req.on('end', () => resolve(new URLSearchParams(text)))
    req.on('error', reject)
  })
}

async function interaction(req, res, uid, action) {
  const details = await provider.interactionDetails(req, res)
  if (details.uid !== uid) throw new Error('interaction mismatch')
  if (req.method === 'GET' && !action) {
    res.writeHead(200, { 'content-type': 'text/html; charset=utf-8' }).end(loginPage(uid))
    return
  }
  if (req.method === 'POST' && action === 'login') {
    const form = await readForm(req)
    const person = findCampusPerson(form.get('login'))
    if (!person || form.get('password') !== values.password) {
      res.writeHead(200, { 'content-type': 'text/html; charset=utf-8' }).end(loginPage(uid, 'That e-mail or id and password do not match.'))
      return
    }
    await provider.interactionFinished(req, res, { login: { accountId: person.campusId } }, { mergeWithLastSubmission: false })
    return
  }
  res.writeHead(404).end()
}

const handle = provider.callback()
const server = createServer((req, res) => {
  const path = new URL(req.url ?? '/', issuer).pathname
  // Browsers ask every site for an icon; "none" rather than a 404 in their console.
  if (path === '/favicon.ico') return res.writeHead(204).end()
  const match = /^\/interaction\/([\w-]+)(?:\/(\w+))?$/.exec(path)
  if (!match) return handle(req, res)
  interaction(req, res, match[1], match[2]).catch((error) => {
    console.error(`[identity-provider] ${error.message}`)
    if (!res.headersSent) res.writeHead(400, { 'content-type': 'text/plain' }).end('This sign-in has expired. Start again from Halocline.')
  })
})
server.listen(Number(values.port), '127.0.0.1', () => {
  if (values['pid-file']) writeFileSync(values['pid-file'], String(process.pid))
  console.log(`[identity-provider] ${issuer}, client ${values['client-id']}, for ${appUrl}`)
})
for (const signal of ['SIGINT', 'SIGTERM']) {
  process.on(signal, () => server.close(() => process.exit(0)))
}
