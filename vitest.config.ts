import { fileURLToPath } from 'node:url'
import { defineConfig } from 'vitest/config'
import { defineVitestProject } from '@nuxt/test-utils/config'

// Plain vitest projects resolve `#shared` as Nuxt does (service and server code import it).
const sharedAlias = { '#shared': fileURLToPath(new URL('./shared', import.meta.url)) }

export default defineConfig({
  test: {
    projects: [
      {
        test: {
          name: 'unit',
          include: ['tests/unit/**/*.test.ts'],
          environment: 'node',
          // openchemlib over every seeded substrate takes about a second alone; on two cores
          // shared with builds it has passed 5 s. A budget, not a timing assertion.
          testTimeout: 30_000,
        },
      },
      await defineVitestProject({
        test: {
          name: 'nuxt',
          include: ['tests/nuxt/**/*.test.ts'],
          environment: 'nuxt',
          // Each file starts the Nuxt app in beforeAll: on two busy cores that can pass 10 s.
          hookTimeout: 60_000,
          testTimeout: 30_000,
        },
      }),
      {
        test: {
          name: 'services',
          alias: sharedAlias,
          include: ['tests/services/**/*.test.ts'],
          environment: 'node',
          // Domain commands against a database of their own, without HTTP (tests/support/db.ts).
          globalSetup: ['tests/support/services-setup.ts'],
          fileParallelism: false,
          testTimeout: 30_000,
          hookTimeout: 120_000,
        },
      },
      {
        test: {
          name: 'e2e',
          // Some tests build what a page draws from the server's answer with the page's own helper.
          alias: sharedAlias,
          include: ['tests/e2e/**/*.test.ts'],
          environment: 'node',
          // One built server, one PostgreSQL and one SMTP fake for every e2e file; files that
          // stop the database or the mail server must not overlap with the others.
          globalSetup: ['tests/support/global-setup.ts'],
          fileParallelism: false,
          testTimeout: 60_000,
          hookTimeout: 180_000,
          // How long a poll waits for the page or the queue to catch up; 1 s is too short on two busy cores.
          expect: { poll: { timeout: 15_000 } },
        },
      },
    ],
  },
})
