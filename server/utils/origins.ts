import type { H3Event } from 'h3'

export function allowedOrigins(event: H3Event): Set<string> {
  const configured = String(useRuntimeConfig(event).appOrigin || '').split(',').map(s => s.trim()).filter(Boolean)
  return new Set([...configured, getRequestURL(event).origin])
}

export function appOrigin(event: H3Event): string {
  const configured = String(useRuntimeConfig(event).appOrigin || '').split(',')[0]?.trim()
  return configured || getRequestURL(event).origin
}
