import type { FetchOptions } from 'ofetch'

type ApiOptions = Omit<FetchOptions<'json'>, 'method'> & { method?: 'GET' | 'POST' | 'PATCH' | 'PUT' | 'DELETE' }

/**
 * $fetch without Nitro's route typing: with many dynamic routes that typing exceeds the
 * compiler's depth, and the answer types come from shared/types anyway.
 */
export function apiFetch<T = unknown>(url: string, options: ApiOptions = {}): Promise<T> {
  return $fetch<T>(url as '/api/health', options as never) as Promise<T>
}
