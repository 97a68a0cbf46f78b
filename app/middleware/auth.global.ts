const PUBLIC_PATHS = ['/sign-in', '/sign-up', '/forgot-password', '/reset-password']

export default defineNuxtRouteMiddleware((to) => {
  const session = useSessionStore()
  const isPublic = PUBLIC_PATHS.includes(to.path) || ['/invitations/', '/handovers/', '/transfers/'].some(prefix => to.path.startsWith(prefix))
  if (!isPublic && !session.signedIn) return navigateTo({ path: '/sign-in', query: to.fullPath !== '/' ? { next: to.fullPath } : {} })
  if (session.signedIn && (to.path === '/sign-in' || to.path === '/sign-up')) return navigateTo(typeof to.query.next === 'string' ? to.query.next : '/')
})
