import type { Chart } from 'chart.js'

/** Markers closer than a badge's width are stacked: each badge goes one row lower than the one before it. */
export const MARKER_ROW_PX = 21

/** One numbered event on a chart's time axis: a dashed vertical line and a round badge with its number at the top. */
export function drawMarker(c: Chart, at: { px: number, row: number, colour: string, label: string }) {
  const { top, bottom } = c.chartArea
  const badgeY = top + 9 + at.row * MARKER_ROW_PX
  const ctx = c.ctx
  ctx.strokeStyle = at.colour
  ctx.setLineDash([5, 4])
  ctx.lineWidth = 2
  ctx.beginPath()
  ctx.moveTo(at.px, top)
  ctx.lineTo(at.px, bottom)
  ctx.stroke()
  ctx.setLineDash([])
  ctx.fillStyle = at.colour
  ctx.beginPath()
  ctx.arc(at.px, badgeY, 9, 0, Math.PI * 2)
  ctx.fill()
  ctx.fillStyle = '#fff'
  ctx.font = 'bold 11px "Nunito Sans", sans-serif'
  ctx.textAlign = 'center'
  ctx.textBaseline = 'middle'
  ctx.fillText(at.label, at.px, badgeY + 0.5)
}
