import type { NitroFetchOptions } from 'nitropack/types'

type ApiOptions = Omit<NitroFetchOptions<string>, 'method'> & { method?: 'GET' | 'POST' | 'PATCH' | 'PUT' | 'DELETE' }

/**
 * $fetch for a URL built at run time, with the answer's type named by the caller (`apiFetch<PondDetail>(url)`).
 * Nitro's own typing stays on: a URL typed as plain string matches no single route, so the answer is `T`; a literal
 * URL of one of our routes is better fetched with `useFetch`, which reads the handler's type.
 */
export function apiFetch<T = unknown>(url: string, options: ApiOptions = {}): Promise<T> {
  return $fetch<T, string>(url, options)
}
