// The engine worker for tests that drive server/engines/pool.ts without a build: a worker thread
// cannot load TypeScript by itself, so this plain module registers tsx there first.
import { register } from 'tsx/esm/api'

register()
const worker = await import('../../server/engines/worker.ts')
export default worker.default
