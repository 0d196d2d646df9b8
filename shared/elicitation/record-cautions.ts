import { labelWithName } from '../record/expert-labels'
import { formatNumber } from '../format/numbers'
import { flagLabel } from '../record/format'

/**
 * The cautions a prior record states: the two that hold for every record, then those raised by this record's own
 * facts. One function, run by the server when it assembles the record (so the cautions are in its content and hash)
 * and by the browser for a stored record that predates them.
 */

export interface RecordCaution {
  /**
   * Which rule raised it: 'statistician-review', 'prior-influence', 'left-out', 'not-reconciled', 'seen-pilot-data', a flag of
   * the final prior, 'hand-adjusted', 'performance-weights', 'no-impact-analysis'; for a composition 'composition-not-in-prior',
   * a Dirichlet warning ('dirichlet-mean-sum', 'dirichlet-unequal-certainty') or a flag of its impact analysis ('dirichlet-prior-dominates', 'dirichlet-prior-driven');
   * for a linked set 'linked-set-not-in-prior' or 'correlations-repaired'.
   */
  rule: string
  /** The quantity (or composition) it concerns, by name; null for the record as a whole. */
  quantity: string | null
  text: string
}

export const GENERAL_CAUTIONS: readonly RecordCaution[] = [
  {
    rule: 'statistician-review',
    quantity: null,
    text: 'The priors in this record can decide the result of the analyses that use them. Before they inform a decision that affects people, they must be reviewed under the regulatory or professional guidance that applies to that decision, and by a qualified statistician.',
  },
  {
    rule: 'prior-influence',
    quantity: null,
    text: 'Priorsmith’s rules of thumb, conventions of this tool rather than published tests (its methods documentation gives the reasoning): a prior that carries more information than the data (prior effective sample size larger than n) dominates the posterior; a prior–data conflict (Box p < 0.05, the customary 5 % level) needs an explanation; a Bayes factor that changes more than 3× when the prior’s width is halved or doubled, while the posterior mean moves less than 0.1 posterior standard deviations, reflects the prior’s width rather than the data.',
  },
]

/** The parts of a record the cautions read (the record content has this shape). */
export interface CautionFacts {
  panel: { code: string; name?: string | null; declarations: { seenPilotData: boolean }[] }[]
  quantities: {
    name: string
    /** Left out of the record with a reason: the record says so and states nothing else about it. */
    leftOut?: { reason: string } | null
    finalPrior: unknown | null
    /** weightCautions: the performance-weight cautions of the saved combination (shared/elicitation/weights.ts). */
    combination: { adjusted: boolean; adjustReason: string; weightCautions?: string[] } | null
    impact: { candidates: { kind: string; flags: string[] }[]; sweep: { priorDriven: boolean } | null } | null
    impactNotRunReason?: string | null
  }[]
  /** The study's compositions (absent in records stored before schema 1.2). */
  compositions?: {
    name: string
    notInPriorReason: string | null
    dirichlet: { warnings: { code: string; message: string }[] } | null
    impact: { flags: string[] } | null
  }[]
  /** The study's linked sets (absent in records stored before schema 1.2). */
  linkedSets?: { quantities: { name: string }[]; notInPriorReason: string | null; repair: { maxChange: number } | null }[]
}


/** The general cautions, then each one this record's facts raise, in the order of the record. */
export function recordCautions(facts: CautionFacts): RecordCaution[] {
  const out: RecordCaution[] = [...GENERAL_CAUTIONS]
  for (const e of facts.panel) {
    if (e.declarations.some((d) => d.seenPilotData)) {
      out.push({ rule: 'seen-pilot-data', quantity: null, text: `${labelWithName(e)} had seen the pilot data before answering: the same evidence may count twice, in the prior and in the data.` })
    }
  }
  for (const q of facts.quantities) {
    const add = (rule: string, text: string) => out.push({ rule, quantity: q.name, text: `${q.name}: ${text}` })
    if (q.leftOut) {
      add('left-out', `left out of this record (${q.leftOut.reason}).`)
      continue
    }
    if (!q.finalPrior) {
      add('not-reconciled', 'no final prior yet (not reconciled).')
      continue
    }
    const final = q.impact?.candidates.find((c) => c.kind === 'reconciled')
    const flags = [...(final?.flags ?? [])]
    if (q.impact?.sweep?.priorDriven && !flags.includes('prior-driven-bayes-factor')) flags.push('prior-driven-bayes-factor')
    for (const f of flags) add(f, `the final prior is flagged: ${flagLabel(f)}.`)
    if (q.combination?.adjusted) add('hand-adjusted', `the final prior was adjusted by hand (${q.combination.adjustReason || 'no reason given'}).`)
    for (const c of q.combination?.weightCautions ?? []) add('performance-weights', c)
    if (!q.impact) {
      add('no-impact-analysis', q.impactNotRunReason
        ? `no impact analysis of the final prior was run; the analyst’s reason: ${q.impactNotRunReason}`
        : 'no impact analysis of the final prior exists.')
    }
  }
  for (const c of facts.compositions ?? []) {
    const add = (rule: string, text: string) => out.push({ rule, quantity: c.name, text: `${c.name}: ${text}` })
    if (c.notInPriorReason) {
      add('composition-not-in-prior', c.notInPriorReason.charAt(0).toLowerCase() + c.notInPriorReason.slice(1))
      continue
    }
    for (const w of c.dirichlet?.warnings ?? []) add(`dirichlet-${w.code}`, w.message)
    for (const f of c.impact?.flags ?? []) add(`dirichlet-${f}`, DIRICHLET_FLAG_TEXT[f] ?? f)
  }
  for (const set of facts.linkedSets ?? []) {
    const names = set.quantities.map((q) => q.name).join(', ')
    const add = (rule: string, text: string) => out.push({ rule, quantity: names, text: `Linked quantities ${names}: ${text}` })
    if (set.notInPriorReason) add('linked-set-not-in-prior', set.notInPriorReason.charAt(0).toLowerCase() + set.notInPriorReason.slice(1))
    else if (set.repair) add('correlations-repaired', `the correlations as decided cannot all hold together; the joint prior uses the nearest correlation matrix, whose entries moved by up to ${formatNumber(set.repair.maxChange, 3)}.`)
  }
  return out
}

/** A composition's impact flags in words (shared/elicitation/composition-impact.ts). */
const DIRICHLET_FLAG_TEXT: Record<string, string> = {
  'prior-dominates': 'the Dirichlet carries more information than the pilot counts (its total concentration exceeds the observations).',
  'prior-driven': 'a Bayes factor built on the Dirichlet reflects its width more than the pilot counts.',
}

/** A caution's words: records stored before schema 1.1 hold plain text. */
export const cautionText = (c: string | RecordCaution): string => (typeof c === 'string' ? c : c.text)
