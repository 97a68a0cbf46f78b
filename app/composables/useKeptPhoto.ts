import { keepPhoto, keptPhoto } from '~/utils/offline-db'

/**
 * A photo shown on a page opened online is kept on the device for the signed-in account (IndexedDB, deleted at
 * sign-out with the rest); with no network the kept picture is shown instead, from a blob: address.
 * Use: `<img ref="image" :src="kept ?? src" :srcset="kept ? undefined : srcset" @load="onLoad" @error="onError">`.
 */
export function useKeptPhoto(photoId: MaybeRefOrGetter<string | null | undefined>, element: Readonly<Ref<HTMLImageElement | null | undefined>>) {
  const kept = ref<string | null>(null)

  async function showKept() {
    const id = toValue(photoId)
    if (!id || kept.value) return
    const image = await keptPhoto(id).catch(() => undefined)
    if (image) kept.value = URL.createObjectURL(image)
  }

  function keep(image: HTMLImageElement | null | undefined) {
    const id = toValue(photoId)
    if (kept.value || !id || !image?.currentSrc || !navigator.onLine) return
    void keepPhoto(id, image.currentSrc).catch(() => {})
  }

  function forget() {
    if (kept.value) URL.revokeObjectURL(kept.value)
    kept.value = null
  }

  onMounted(() => {
    if (!navigator.onLine) return void showKept()
    // A server-rendered picture may have loaded before the page could listen for it.
    const image = element.value
    if (image?.complete && image.naturalWidth > 0) keep(image)
  })
  watch(() => toValue(photoId), forget)
  onBeforeUnmount(forget)

  return { kept: readonly(kept), onLoad: (event: Event) => keep(event.target as HTMLImageElement), onError: () => void showKept() }
}
