// The growth chart's sample of a long series: Largest-Triangle-Three-Buckets as described by Steinarsson
// (2013, "Downsampling Time Series for Visual Representation", MSc thesis, University of Iceland, ch. 4):
// the first and last points are always kept, the rest is split into equal buckets and one point is taken
// from each, the one spanning the largest triangle with its neighbours, so a lone peak survives.
import { describe, expect, it } from 'vitest'
import { sampleGrowthPoints, type GrowthSample } from '../../shared/utils/growth-sampling'

function weekly(count: number, weight: (i: number) => number | null, length: (i: number) => number | null = () => null): (GrowthSample & { entryId: string, lengthType: string })[] {
  return Array.from({ length: count }, (_, i) => ({
    entryId: `e${i}`, at: new Date(Date.UTC(2004, 0, 1) + i * 7 * 86_400_000).toISOString(),
    weightG: weight(i), lengthCm: length(i), lengthType: 'total', conditionK: null,
  }))
}

describe('growth series sample for the chart', () => {
  it('leaves a series no longer than the sample alone', () => {
    const points = weekly(150, i => 500 + i)
    expect(sampleGrowthPoints(points, 150)).toBe(points)
  })

  it('keeps the first and last weighing and one per bucket (Steinarsson 2013, ch. 4)', () => {
    const points = weekly(1250, i => 500 + i * 2)
    const sample = sampleGrowthPoints(points, 150)
    // 150 chosen, plus the last when the package's bucket rounding had left it out.
    expect(sample.length).toBeGreaterThanOrEqual(150)
    expect(sample.length).toBeLessThanOrEqual(151)
    expect(sample[0]).toBe(points[0])
    expect(sample.at(-1)).toBe(points.at(-1))
    // In time order, each a measurement that exists.
    expect(sample.map(p => p.at)).toEqual([...sample.map(p => p.at)].sort())
  })

  it('keeps a lone drop in weight that plain every-nth thinning would miss', () => {
    const points = weekly(1250, i => (i === 613 ? 300 : 1500))
    const sample = sampleGrowthPoints(points, 150)
    expect(sample.some(p => p.entryId === 'e613')).toBe(true)
    expect(points.filter((_, i) => i % Math.ceil(1250 / 150) === 0).some(p => p.entryId === 'e613')).toBe(false)
  })

  it('samples each series on its own: a length measured on other days than the weights is kept too', () => {
    const points = weekly(1250, i => (i % 2 ? null : 1000 + i), i => (i % 2 ? 30 + i / 100 : null))
    const sample = sampleGrowthPoints(points, 100)
    expect(sample.filter(p => p.weightG != null).length).toBeGreaterThanOrEqual(100)
    expect(sample.filter(p => p.lengthCm != null).length).toBeGreaterThanOrEqual(100)
    expect(sample.length).toBeLessThanOrEqual(202)
  })
})
