import {
  Chart, Filler, Legend, LinearScale, LineController, LineElement, LogarithmicScale, PointElement, Tooltip,
  type ChartOptions, type ChartType, type Plugin,
} from 'chart.js'
import { formatNumber } from '@shared/format'
import { downloadUrl } from '@/impact/table'
import './impact-chart.css'

/** Only the chart.js pieces the impact charts use (this module loads with the lazy chart components). */
Chart.register(LineController, LineElement, PointElement, LinearScale, LogarithmicScale, Filler, Tooltip, Legend)

export const AXIS = { title: '#3d4753', grid: '#ece9e1', ticks: '#5f6873' } as const

/** Paints the canvas white under the chart, so a downloaded PNG is not transparent. */
export const whiteBackground: Plugin<ChartType> = {
  id: 'ps-white-background',
  beforeDraw(chart) {
    const { ctx, width, height } = chart
    ctx.save()
    ctx.globalCompositeOperation = 'destination-over'
    ctx.fillStyle = '#ffffff'
    ctx.fillRect(0, 0, width, height)
    ctx.restore()
  },
}

/** A shaded band on the x axis between `from` and `to` with a small label (the sweep's rule range). */
export function xBand(from: number, to: number, label: string, color = 'rgba(201, 130, 26, 0.08)'): Plugin<ChartType> {
  return {
    id: `ps-x-band-${from}-${to}`,
    beforeDatasetsDraw(chart) {
      const x = chart.scales.x
      const area = chart.chartArea
      if (!x || !area) return
      const a = Math.max(area.left, x.getPixelForValue(from))
      const b = Math.min(area.right, x.getPixelForValue(to))
      if (!(b > a)) return
      const { ctx } = chart
      ctx.save()
      ctx.fillStyle = color
      ctx.fillRect(a, area.top, b - a, area.bottom - area.top)
      ctx.fillStyle = '#8a5a12'
      ctx.font = '11px "Open Sans", system-ui, sans-serif'
      ctx.textAlign = 'center'
      ctx.fillText(label, (a + b) / 2, area.top + 12)
      ctx.restore()
    },
  }
}

/** Saves the chart as a PNG file (chart.toBase64Image). */
export function downloadPng(chart: Chart | undefined | null, filename: string): void {
  if (!chart) return
  downloadUrl(chart.toBase64Image('image/png', 1), filename)
}

/**
 * Options of a line chart of raw {x, y} points against an x axis of the caller's: no animation, a tooltip naming the x
 * value by `xName`, the legend below without the entry labelled `unlisted` (the lower edge of a band).
 */
export function lineOptions(x: object, yTitle: string, xName: string, unlisted: string): ChartOptions<'line'> {
  return {
    responsive: true,
    maintainAspectRatio: false,
    animation: false,
    parsing: false,
    interaction: { mode: 'index', intersect: false },
    scales: {
      x: x as never,
      y: { type: 'linear', title: { display: true, text: yTitle, color: AXIS.title }, grid: { color: AXIS.grid }, ticks: { color: AXIS.ticks, maxTicksLimit: 6 } },
    },
    plugins: {
      legend: { position: 'bottom', labels: { usePointStyle: true, pointStyle: 'line', color: '#1d2733', boxWidth: 24, padding: 10, filter: (item) => item.text !== unlisted } },
      tooltip: {
        callbacks: {
          title: (items) => (items.length ? `${xName} = ${formatNumber(Number(items[0].parsed.x), 3)}` : ''),
          label: (item) => `${item.dataset.label}: ${formatNumber(Number(item.parsed.y))}`,
        },
      },
    },
  }
}
