import type { ChildProcess } from 'node:child_process'
import { describe, expect, inject, it } from 'vitest'
import { identityProviderArgs, startIdentityProvider } from '../../scripts/lib/processes.mjs'
import { onFreePort } from '../../scripts/lib/ports.mjs'

// npm start and the test world make a random base64url secret for the local provider; one in 64 begins
// with "-", which parseArgs took for a missing value, so the provider never started.
describe('the local identity provider on the command line', () => {
  it('joins each value to its option, so a secret beginning with "-" is read as a value', () => {
    expect(identityProviderArgs({ port: 4455, clientId: 'c', clientSecret: '-0Jx_secret', appUrl: 'http://127.0.0.1:3000' }))
      .toContain('--client-secret=-0Jx_secret')
  })

  it('starts with such a secret', async () => {
    const child: ChildProcess = await onFreePort((port: number) => startIdentityProvider({
      root: inject('root'), port, clientId: 'dash-test', clientSecret: '-dash-first-secret-0123', appUrl: 'http://127.0.0.1:3999', pidFile: undefined,
    }))
    try {
      expect(child.exitCode).toBeNull()
    } finally {
      child.kill()
    }
  }, 60_000)
})
