import type { LocationQuery } from 'vue-router'

/** Where to go once signed in or up: the page that sent the person here (`?next=`), if it is a page of this app. */
export function pathAfterSignIn(query: LocationQuery): string {
  const next = query.next
  return typeof next === 'string' && next.startsWith('/') && !next.startsWith('//') ? next : '/'
}
