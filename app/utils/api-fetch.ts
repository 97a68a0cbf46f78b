import type { InternalApi, NitroFetchOptions } from 'nitropack/types'

type ApiOptions = Omit<NitroFetchOptions<string>, 'method'> & { method?: 'GET' | 'POST' | 'PATCH' | 'PUT' | 'DELETE' }

/**
 * What a route answers, read from its handler's return value as Nitro types it (JSON-serialised: a Date is a
 * string): `ApiResponse<'/api/fish/:fishId/growth'>`. A lookup in Nitro's route table, so a page's data type
 * follows the handler it calls, with none of the cost of matching a run-time URL against every route.
 */
export type ApiResponse<Route extends keyof InternalApi, Method extends keyof InternalApi[Route] = 'get' & keyof InternalApi[Route]> = InternalApi[Route][Method]

/**
 * $fetch for a URL built at run time, with the answer's type named by the caller, best as the route's own
 * (`apiFetch<ApiResponse<'/api/fish/:fishId/facts'>>(url)`). Nitro's typing stays on: a URL typed as plain
 * string matches no single route, so the answer is `T`.
 */
export function apiFetch<T = unknown>(url: string, options: ApiOptions = {}): Promise<T> {
  return $fetch<T, string>(url, options)
}
