// Start migrations and the job queue with the server, and close both with it. If PostgreSQL is
// down at boot, keep trying in the background; routes that need the queue await useQueue().
export default defineNitroPlugin((nitroApp) => {
  if (import.meta.prerender) return
  let timer: ReturnType<typeof setTimeout> | undefined
  let closing = false
  const start = () => {
    useQueue().catch((error) => {
      console.warn(`[boot] queue not started (${error.message}); retrying in 5 s`)
      if (!closing) timer = setTimeout(start, 5000)
    })
  }
  start()
  nitroApp.hooks.hook('close', async () => {
    closing = true
    clearTimeout(timer)
    await stopQueue()
    await stopAccountNotices()
    await closeDb()
  })
})
