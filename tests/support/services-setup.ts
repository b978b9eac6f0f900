import { resolve } from 'node:path'
import type { TestProject } from 'vitest/node'
import { startDatabaseWorld } from '../../scripts/lib/world.mjs'
import * as tasks from '../../server/database/tasks'

// The service tests run domain commands straight against a migrated, seeded database of their
// own: no server build, no HTTP, no SMTP. tests/support/db.ts reads `databaseUrl` from here.
export default async function setup(project: TestProject) {
  const root = resolve(import.meta.dirname, '../..')
  const world = await startDatabaseWorld(root, { name: 'services', tasks, database: 'halocline_services' })
  project.provide('databaseUrl', world.databaseUrl)
  project.provide('root', root)
  return world.stop
}
