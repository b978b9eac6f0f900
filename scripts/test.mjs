#!/usr/bin/env node
// npm test: the same preparation as npm start (machine packages, npm packages), then ESLint
// (zero warnings), then every vitest project. The e2e project's global set-up makes its own
// throwaway PostgreSQL, SMTP fake and server. The last line is the one CI reads:
// "tests: N passed, N failed[, N skipped]"; a lint failure counts as one failed test.
// Arguments (`npm test -- --project unit`) select a subset and skip the lint: `npm run lint`.
import { spawnSync } from 'node:child_process'
import { existsSync, mkdirSync, readFileSync, rmSync } from 'node:fs'
import { dirname, join, resolve } from 'node:path'
import { fileURLToPath } from 'node:url'
import { step } from './lib/steps.mjs'
import { checkNodeVersion, ensureChromium, ensurePostgres } from './lib/system.mjs'
import { ensureNodeModules } from './lib/deps.mjs'
import { runLint } from './lib/lint.mjs'

const root = resolve(dirname(fileURLToPath(import.meta.url)), '..')
const report = join(root, 'test-results', 'vitest.json')

function summarize() {
  if (!existsSync(report)) return null
  const data = JSON.parse(readFileSync(report, 'utf8'))
  let passed = 0, failed = 0, skipped = 0
  for (const file of data.testResults ?? []) {
    const tests = file.assertionResults ?? []
    // A file that failed to import has no tests at all: count it as one failure.
    if (file.status === 'failed' && !tests.some((t) => t.status === 'failed')) failed++
    for (const t of tests) {
      if (t.status === 'passed') passed++
      else if (t.status === 'failed') failed++
      else skipped++
    }
  }
  return { passed, failed, skipped }
}

async function main() {
  await step('Checking Node.js', checkNodeVersion)
  await step('Checking PostgreSQL server binaries', ensurePostgres)
  await step('Checking Chromium for browser tests', ensureChromium)
  await step('Checking npm packages', () => ensureNodeModules(root))
  mkdirSync(dirname(report), { recursive: true })
  rmSync(report, { force: true })

  const args = process.argv.slice(2)
  // The whole run lints first; a subset run (any argument) leaves it to `npm run lint`.
  const lint = args.length ? null : await step('Linting (eslint, zero warnings)', () => runLint(root))
  if (lint && !lint.ok) {
    process.stdout.write(lint.output)
    console.error(`\n✗ Lint failed: ${lint.note}. \`npm run lint\` shows them again; \`npx eslint . --fix\` mends the layout ones.\n`)
  }
  const lintFailures = lint && !lint.ok ? 1 : 0

  const result = spawnSync(process.execPath, [
    join(root, 'node_modules', 'vitest', 'vitest.mjs'), 'run',
    '--reporter=default', '--reporter=json', `--outputFile.json=${report}`, ...args,
  ], { cwd: root, stdio: 'inherit', env: { ...process.env, FORCE_COLOR: process.env.FORCE_COLOR ?? '1' } })

  const counts = summarize()
  const code = result.status ?? 1
  if (!counts) {
    console.log(`tests: 0 passed, ${1 + lintFailures} failed`)
    process.exit(code || 1)
  }
  const failed = (counts.failed || (code !== 0 ? 1 : 0)) + lintFailures
  if (lintFailures) console.error('✗ Lint failed (see above): counted as one failed test.')
  console.log(`tests: ${counts.passed} passed, ${failed} failed${counts.skipped ? `, ${counts.skipped} skipped` : ''}`)
  process.exit(code || lintFailures)
}

main().catch((error) => {
  if (!error.reported) console.error(error)
  console.log('tests: 0 passed, 1 failed')
  process.exit(1)
})
