import type { Page } from 'playwright-core'
import { DEMO_STUDY_TITLE } from '../../seeds/demo'
import { inPage, type Call } from './browser'

/**
 * A fresh copy of the demo study (its quantities and calibration questions), made by the signed-in analyst. A suite
 * that puts its round there sees the calibration questions asked whatever other suites did on the demo study first:
 * calibration answered in an earlier round of a study is not asked again, and suites share one database.
 */
export async function copyDemoStudy(page: Page, title: string): Promise<number> {
  return inPage(
    page,
    async (call: Call, args: { demoTitle: string; title: string }): Promise<number> => {
      type Q = { name: string; symbol: string; unit: string; question: string; support: unknown; assumptions: string; evidenceNotes: string }
      const studies = await call<{ id: number; title: string }[]>('GET', '/api/studies')
      const demo = studies.find((s) => s.title === args.demoTitle)!
      const study = await call<{ id: number }>('POST', '/api/studies', { title: `${args.title} ${Date.now()}`, context: 'A copy of the demo study for a browser test.' })
      for (const q of await call<Q[]>('GET', `/api/studies/${demo.id}/quantities`)) {
        const { name, symbol, unit, question, support, assumptions, evidenceNotes } = q
        await call('POST', `/api/studies/${study.id}/quantities`, { name, symbol, unit, question, support, assumptions, evidenceNotes })
      }
      for (const c of await call<{ question: string; unit: string; trueValue: number | null }[]>('GET', `/api/studies/${demo.id}/calibration-questions`)) {
        await call('POST', `/api/studies/${study.id}/calibration-questions`, { question: c.question, unit: c.unit, trueValue: c.trueValue })
      }
      return study.id
    },
    { demoTitle: DEMO_STUDY_TITLE, title },
  )
}
