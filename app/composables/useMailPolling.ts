import type { Ref } from 'vue'
import type { OfferMailState } from '#shared/types'

/** While an offer's e-mail is still queued, asks again every few seconds so its state shows up. */
export function useMailPolling(items: Ref<{ mail: OfferMailState | null }[] | null | undefined>, refresh: () => Promise<unknown>) {
  if (import.meta.server) return
  let timer: ReturnType<typeof setTimeout> | undefined
  const stop = () => timer && clearTimeout(timer)
  watch(items, (list) => {
    stop()
    if (list?.some(item => item.mail?.status === 'queued')) timer = setTimeout(() => refresh(), 3000)
  }, { immediate: true })
  onBeforeUnmount(stop)
}
