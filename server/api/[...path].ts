// Unknown API paths answer a plain JSON 404 at once, instead of falling through to the page
// renderer (which would render the whole app only to say "not found").
export default defineEventHandler(() => {
  throw createError({ statusCode: 404, statusMessage: 'No such API route' })
})
