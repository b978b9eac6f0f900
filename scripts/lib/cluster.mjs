// Several server processes on one port, as a machine with more cores would run them: Node's
// cluster module forks `workers` copies of the built server (node cluster.mjs <entry> <workers>)
// and hands incoming connections to them in turn. Each is a whole server (its own pool, engine
// threads and queue worker) on the same database; SIGTERM or SIGINT stops them all.
import cluster from 'node:cluster'
import { pathToFileURL } from 'node:url'

const [entry, count = '2'] = process.argv.slice(2)

if (cluster.isPrimary) {
  const workers = Array.from({ length: Math.max(1, Number(count)) }, () => cluster.fork())
  let stopping = false
  const stop = (signal) => {
    stopping = true
    for (const worker of workers) if (!worker.isDead()) worker.process.kill(signal)
  }
  process.on('SIGTERM', () => stop('SIGTERM'))
  process.on('SIGINT', () => stop('SIGINT'))
  cluster.on('exit', (worker, code) => {
    // One dead server takes the rest down: whoever started the cluster sees it exit.
    if (!stopping) {
      console.error(`[cluster] a server process (${worker.process.pid}) exited with ${code}; stopping the others`)
      stop('SIGTERM')
    }
    if (workers.every((w) => w.isDead())) process.exit(stopping ? 0 : 1)
  })
} else {
  await import(pathToFileURL(entry).href)
}
