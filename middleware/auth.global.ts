import type { Role } from '#shared/types/auth'

declare module '#app' {
  interface PageMeta {
    /** Reachable without signing in (the sign-in and invitation pages). */
    public?: boolean
    /** Roles that may open the page; the API checks again, this only steers navigation. */
    roles?: Role[]
  }
}

export default defineNuxtRouteMiddleware((to) => {
  const { loggedIn, user } = useUserSession()
  if (to.meta.public) {
    if (loggedIn.value && to.path === '/login') return navigateTo('/')
    return
  }
  if (!loggedIn.value) {
    return navigateTo({ path: '/login', query: to.fullPath === '/' ? {} : { next: to.fullPath } })
  }
  const roles = to.meta.roles
  if (roles && user.value && !roles.includes(user.value.role)) {
    throw createError({ statusCode: 403, statusMessage: 'This page is not part of your role', fatal: true })
  }
})
