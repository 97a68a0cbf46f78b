import { MAIN_URL } from './env'

export interface ApiResponse<T = any> { // eslint-disable-line @typescript-eslint/no-explicit-any
  status: number
  headers: Headers
  body: T
}

/** A tiny HTTP client with its own cookie jar, like one browser. */
export class ApiClient {
  cookies = new Map<string, string>()
  constructor(public baseUrl = MAIN_URL, public defaultHeaders: Record<string, string> = {}) {}

  cookieHeader() {
    return [...this.cookies].map(([k, v]) => `${k}=${v}`).join('; ')
  }

  async request<T = any>(method: string, path: string, options: { body?: unknown, headers?: Record<string, string>, raw?: string } = {}): Promise<ApiResponse<T>> { // eslint-disable-line @typescript-eslint/no-explicit-any
    const headers: Record<string, string> = { accept: 'application/json', ...this.defaultHeaders, ...options.headers }
    if (this.cookies.size) headers.cookie = this.cookieHeader()
    let body: string | undefined = options.raw
    if (options.body !== undefined) {
      body = JSON.stringify(options.body)
      headers['content-type'] = 'application/json'
    }
    const response = await fetch(this.baseUrl + path, { method, headers, body, redirect: 'manual' })
    for (const line of response.headers.getSetCookie()) {
      const [pair] = line.split(';')
      const eq = pair!.indexOf('=')
      const name = pair!.slice(0, eq).trim()
      const value = pair!.slice(eq + 1).trim()
      if (!value || /max-age=0/i.test(line) || /expires=thu, 01 jan 1970/i.test(line)) this.cookies.delete(name)
      else this.cookies.set(name, value)
    }
    const text = await response.text()
    let parsed: unknown = text
    try {
      parsed = text ? JSON.parse(text) : null
    }
    catch { /* not JSON */ }
    return { status: response.status, headers: response.headers, body: parsed as T }
  }

  get<T = any>(path: string, headers?: Record<string, string>) { // eslint-disable-line @typescript-eslint/no-explicit-any
    return this.request<T>('GET', path, { headers })
  }

  post<T = any>(path: string, body?: unknown, headers?: Record<string, string>) { // eslint-disable-line @typescript-eslint/no-explicit-any
    return this.request<T>('POST', path, { body: body ?? {}, headers })
  }

  patch<T = any>(path: string, body?: unknown, headers?: Record<string, string>) { // eslint-disable-line @typescript-eslint/no-explicit-any
    return this.request<T>('PATCH', path, { body: body ?? {}, headers })
  }

  put<T = any>(path: string, body?: unknown, headers?: Record<string, string>) { // eslint-disable-line @typescript-eslint/no-explicit-any
    return this.request<T>('PUT', path, { body: body ?? {}, headers })
  }

  delete<T = any>(path: string, headers?: Record<string, string>) { // eslint-disable-line @typescript-eslint/no-explicit-any
    return this.request<T>('DELETE', path, { headers })
  }

  /** A second client holding a copy of this one's cookies: a stolen or copied cookie. */
  copy() {
    const other = new ApiClient(this.baseUrl, { ...this.defaultHeaders })
    other.cookies = new Map(this.cookies)
    return other
  }
}
