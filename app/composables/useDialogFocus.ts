import { createFocusTrap, type FocusTrap } from 'focus-trap'
import type { Ref } from 'vue'

/**
 * For a dialog or sheet drawn by the page itself (a native <dialog> does this on its own): while it is
 * mounted, Tab and Shift+Tab stay inside it, Escape asks to close it, and when it goes away focus returns
 * to the control that opened it.
 */
export function useDialogFocus(container: Ref<HTMLElement | undefined>, options: { onEscape: () => void, initialFocus?: () => HTMLElement | undefined }) {
  let trap: FocusTrap | undefined
  onMounted(() => {
    if (!container.value) return
    trap = createFocusTrap(container.value, {
      initialFocus: () => options.initialFocus?.() ?? container.value!,
      fallbackFocus: () => container.value!,
      // The owner closes it (unmounting this component), so the trap itself never closes on Escape.
      escapeDeactivates: () => {
        options.onEscape()
        return false
      },
      // A click outside (on the backdrop) is not a way out by accident; the dialog has its own Close.
      allowOutsideClick: false,
      returnFocusOnDeactivate: true,
    })
    trap.activate()
  })
  onBeforeUnmount(() => trap?.deactivate())
}
