// nuxt-security puts this response's CSP nonce on every <script>, <link> and <style> of a page by masking every
// quoted text of the HTML first (so a tag inside an attribute is left alone), the app's rendered body included:
// on a long profile that body is 36 KB with over 700 attribute values, about 0.7 ms and a sixth of all the memory
// a page render allocates (the allocation profile of `scripts/bench/ssr-ab.ts`). The rendered body of our pages
// has no such tags (their scripts and links are in the head and after the body); a body part without any is
// handed on as an object that writes out the same text. nuxt-security passes what is not a string through
// untouched, and the document is joined with Array.join, which calls toString: the page is byte for byte the
// same, and a body that does hold one of these tags is left to nuxt-security as before.
const TAG_TAKING_NONCE = /<(?:script|link|style)\b/i

class RenderedBody {
  constructor(private readonly html: string) {}
  toString() {
    return this.html
  }
}

export default defineNitroPlugin((nitroApp) => {
  nitroApp.hooks.hook('render:html', (html) => {
    html.body = html.body.map(part => (typeof part === 'string' && !TAG_TAKING_NONCE.test(part) ? new RenderedBody(part) as unknown as string : part))
  })
})
