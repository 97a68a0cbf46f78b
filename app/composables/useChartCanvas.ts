import type { Chart } from 'chart.js'
import type { WatchSource } from 'vue'

/**
 * The life of a chart on a canvas: drawn once the canvas exists, redrawn when its sources change, destroyed with
 * the component. A chart that cannot be drawn sets `failed`, so the page says so instead of leaving an empty box.
 */
export function useChartCanvas(what: string, create: (canvas: HTMLCanvasElement) => Chart, sources: WatchSource | WatchSource[]) {
  const canvas = ref<HTMLCanvasElement>()
  const failed = ref(false)
  let chart: Chart | undefined
  function draw() {
    if (!canvas.value) return
    chart?.destroy()
    try {
      chart = create(canvas.value)
      failed.value = false
    }
    catch (error) {
      failed.value = true
      console.error(`[${what}]`, error)
    }
  }
  // A .client component's template refs are filled only after the next tick.
  onMounted(() => nextTick(draw))
  watch(sources, draw, { deep: true })
  onBeforeUnmount(() => chart?.destroy())
  return { canvas, failed }
}
