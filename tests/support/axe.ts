import { AxeBuilder } from '@axe-core/playwright'
import type { Page } from 'playwright-core'
import type { NodeResult, Result } from 'axe-core'

/** The WCAG 2.0 and 2.1 success criteria of levels A and AA, as axe-core tags its rules. */
export const WCAG21_AA_TAGS = ['wcag2a', 'wcag2aa', 'wcag21a', 'wcag21aa']

export const PHONE = { width: 390, height: 844 }
export const DESK = { width: 1280, height: 900 }

/** The contrast axe measured for a node, when the rule is a contrast rule. */
function contrastOf(node: NodeResult) {
  const check = [...node.any, ...node.all, ...node.none].find(c => c.id === 'color-contrast' || c.id === 'color-contrast-enhanced')
  const data = check?.data as { fgColor?: string, bgColor?: string, contrastRatio?: number, expectedContrastRatio?: string, fontSize?: string, fontWeight?: string } | undefined
  if (!data?.contrastRatio) return ''
  return `contrast ${data.contrastRatio}:1, needs ${data.expectedContrastRatio} (${data.fgColor} on ${data.bgColor}, ${data.fontSize} ${data.fontWeight})`
}

/** One line per failing element: where, which rule, which element, and the contrast found. */
export function describeViolations(where: string, violations: Result[]) {
  return violations.flatMap(violation => violation.nodes.map((node) => {
    const contrast = contrastOf(node)
    return [
      `${where}: ${violation.id} (${violation.impact}) — ${violation.help}`,
      `    element ${node.target.join(' ')}: ${node.html.replace(/\s+/g, ' ').slice(0, 200)}`,
      contrast ? `    ${contrast}` : `    ${(node.failureSummary ?? '').replace(/\s+/g, ' ').slice(0, 300)}`,
    ].join('\n')
  }))
}

/**
 * Runs axe's WCAG 2.1 A and AA rules on the page as it is now, at a phone and a desk width, and
 * returns the failures as text; at phone width it also looks for text cut off at twice the font size.
 * `within` limits the check to an open dialog or sheet.
 * Legacy mode runs axe inside the page itself: the app has no frames, and it saves a page per check.
 */
export async function axeAtBothWidths(page: Page, where: string, within?: string) {
  const found: string[] = []
  for (const size of [PHONE, DESK]) {
    if (page.viewportSize()?.width !== size.width) {
      await page.setViewportSize(size)
      await page.waitForTimeout(100)
    }
    // Only the failures are collected: listing every passing node costs more time than the checks.
    const builder = new AxeBuilder({ page }).options({ resultTypes: ['violations'] }).withTags(WCAG21_AA_TAGS).setLegacyMode(true)
    if (within) builder.include(within)
    const result = await builder.analyze()
    found.push(...describeViolations(`${where} @${size.width}px`, result.violations))
    if (size === PHONE && !within) found.push(...await clippedTextAtDoubleSize(page, `${where} @${size.width}px`))
  }
  await page.setViewportSize(PHONE)
  return found
}

/**
 * Text cut off when the reader's font size is doubled (WCAG 1.4.4, resize text to 200 %): every element
 * that hides its vertical overflow and now has more content than room. Screen-reader-only text and
 * line-clamped text (which ends in an ellipsis, its whole text shown elsewhere) are left out.
 */
export async function clippedTextAtDoubleSize(page: Page, where: string) {
  await page.evaluate(() => document.documentElement.style.setProperty('font-size', '200%'))
  await page.waitForTimeout(150)
  const clipped = await page.evaluate(() => [...document.querySelectorAll<HTMLElement>('body *')].flatMap((el) => {
    const style = getComputedStyle(el)
    if (!['hidden', 'clip'].includes(style.overflowY) || el.clientWidth <= 2 || !el.textContent?.trim()) return []
    // A deliberate two-line clamp (a caption shown whole in the photo viewer) ends in an ellipsis: not clipping.
    if (style.getPropertyValue('-webkit-line-clamp') !== 'none' && style.getPropertyValue('-webkit-line-clamp') !== '') return []
    if (el.scrollHeight <= el.clientHeight + 2) return []
    return [`${el.tagName.toLowerCase()}.${[...el.classList].join('.')}: "${el.textContent.trim().replace(/\s+/g, ' ').slice(0, 80)}" (${el.scrollHeight} px of text in ${el.clientHeight} px)`]
  }))
  await page.evaluate(() => document.documentElement.style.removeProperty('font-size'))
  return clipped.map(line => `${where} at 200 % text: ${line}`)
}
