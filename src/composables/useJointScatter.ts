import { computed, type Ref } from 'vue'
import { Chart, LinearScale, LineElement, PointElement, ScatterController, Tooltip, type ChartData, type ChartOptions } from 'chart.js'

// LineElement draws the median guides (datasets with showLine).
Chart.register(ScatterController, PointElement, LineElement, LinearScale, Tooltip)

export interface JointScatterInput {
  points: { x: number; y: number }[]
  /** Where the dashed guides stand: each quantity's median (the expert's middle value, or the reconciled prior's). */
  medians: [number, number]
  /** The guides' names, for the tooltip. */
  guideLabels: [string, string]
  axisTitles: [string, string]
  /** A draw's tooltip. */
  pointLabel: (p: { x: number; y: number }) => string
}

/**
 * A scatter of joint draws of two quantities with dashed guides at their medians (chart.js, loaded with the component
 * that uses it), and how often the second is above its median where the first is above its own.
 */
export function useJointScatter(input: Ref<JointScatterInput>) {
  const bothAbove = computed(() => {
    const [mx, my] = input.value.medians
    const right = input.value.points.filter((p) => p.x > mx)
    return right.length ? right.filter((p) => p.y > my).length / right.length : null
  })

  const data = computed<ChartData<'scatter', { x: number; y: number }[]>>(() => {
    const { points, medians: [mx, my], guideLabels } = input.value
    const xs = points.map((p) => p.x)
    const ys = points.map((p) => p.y)
    const guide = (pts: { x: number; y: number }[], label: string) => ({ label, data: pts, showLine: true, borderColor: '#8a5a12', borderDash: [6, 4], borderWidth: 1.5, pointRadius: 0 })
    return {
      datasets: [
        { label: 'Joint draw', data: points, backgroundColor: 'rgba(31, 96, 125, 0.4)', borderWidth: 0, pointRadius: 2 },
        guide([{ x: mx, y: Math.min(...ys) }, { x: mx, y: Math.max(...ys) }], guideLabels[0]),
        guide([{ x: Math.min(...xs), y: my }, { x: Math.max(...xs), y: my }], guideLabels[1]),
      ],
    }
  })

  const axis = (text: string) => ({ type: 'linear' as const, title: { display: true, text, color: '#3d4753' }, grid: { color: '#ece9e1' }, ticks: { color: '#5f6873', maxTicksLimit: 6 } })
  const options = computed<ChartOptions<'scatter'>>(() => ({
    responsive: true,
    maintainAspectRatio: false,
    animation: false,
    parsing: false,
    scales: { x: axis(input.value.axisTitles[0]), y: axis(input.value.axisTitles[1]) },
    plugins: {
      legend: { display: false },
      tooltip: { callbacks: { label: (item) => (item.datasetIndex === 0 ? input.value.pointLabel(item.parsed as { x: number; y: number }) : String(item.dataset.label ?? '')) } },
    },
  }))

  return { bothAbove, data, options }
}
