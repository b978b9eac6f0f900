// The engine worker threads start with the server (so the first upload does not wait for them)
// and stop with it.
export default defineNitroPlugin((nitroApp) => {
  if (import.meta.prerender) return
  startEngines()
  nitroApp.hooks.hook('close', () => stopEngines())
})
