import { z } from 'zod'

// zod compiles a fast object parser with `new Function` when it may; the page's Content-Security-Policy
// forbids eval, and zod's probe for it is reported as a CSP violation even though zod catches the refusal.
// Interpreted parsing is fast enough for forms. Top level, not inside the plugin: it must be set before
// any module builds a schema, and plugins are loaded (in name order) before pages and components.
if (import.meta.client) z.config({ jitless: true })

export default defineNuxtPlugin(() => {})
