// Marks the document once the app has hydrated. Before that, buttons and links are plain HTML:
// browser tests wait for this mark so a click is never lost to a page still starting up.
export default defineNuxtPlugin((nuxtApp) => {
  nuxtApp.hook('app:suspense:resolve', () => {
    document.documentElement.dataset.hydrated = 'true'
  })
})
