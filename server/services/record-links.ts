import type { ExpertRef, RecordLink, RecordLinkedSet } from '../../shared/api/records'
import type { LinkedSetView, LinkReconciliationView } from '../../shared/api/link-reconciliation'
import { linkedSetName } from '../../shared/elicitation/linked-sets'
import { RECORD_JOINT_DRAWS } from '../../shared/record/joint-draws'
import type { Db } from '../db/knex'
import { studyLinkedQuantities } from './link-reconciliation'

const pair = (l: LinkReconciliationView) => `${l.first.name} and ${l.second.name}`

/** Why a linked set is not part of the prior, in words; null when it is. */
function whyNotInPrior(set: LinkedSetView, links: LinkReconciliationView[], leftOutNames: string[]): string | null {
  if (leftOutNames.length) return `Not part of the prior: ${leftOutNames.join(', ')} ${leftOutNames.length === 1 ? 'is' : 'are'} left out of this record.`
  if (set.waitingFor.length) return `Not part of the prior: still to reconcile: ${set.waitingFor.join(', ')}.`
  const undecided = links.filter((l) => !l.saved).map(pair)
  if (undecided.length) return `Not part of the prior: the analyst has not confirmed or set the correlation of ${undecided.join('; ')}.`
  const stale = links.filter((l) => l.stale).map(pair)
  if (stale.length) return `Not part of the prior: the experts' pooled correlation of ${stale.join('; ')} changed after it was confirmed; it needs confirming again.`
  return null
}

/**
 * The study's linked sets as the record states them, from the links at reconciliation (studyLinkedQuantities): each set's
 * quantities with their reconciled priors, each link's answers under the study's labels, pool and decision, the matrix, its
 * repair, and the model code. A set is part of the prior when every quantity has a final prior in the record (reconciled,
 * not left out) and every link's correlation is confirmed (and still matches the pool) or set by the analyst with a reason.
 */
export async function recordLinkedSets(db: Db, studyId: number, leftOut: Set<number>, who: (userId: number) => ExpertRef): Promise<RecordLinkedSet[]> {
  const { links, sets } = await studyLinkedQuantities(db, studyId)
  return sets.map((set): RecordLinkedSet => {
    const setLinks = links.filter((l) => set.linkIds.includes(l.linkId))
    const reason = whyNotInPrior(set, setLinks, set.marginals.filter((m) => leftOut.has(m.quantityId)).map((m) => m.name))
    const inPrior = reason === null
    return {
      name: linkedSetName(set.marginals.map((m) => m.symbol)),
      quantities: set.marginals.map((m) => ({ name: m.name, symbol: m.symbol, distribution: m.distribution })),
      links: setLinks.map((l): RecordLink => ({
        round: l.roundNumber,
        first: { name: l.first.name, symbol: l.first.symbol },
        second: { name: l.second.name, symbol: l.second.symbol },
        wording: l.wording,
        answers: l.answers.map((a) => ({ expert: who(a.expertId), probability: a.probability, correlation: a.correlation, weight: a.weight })),
        weightRule: l.weightRule,
        pooledCorrelation: l.pooledCorrelation,
        source: l.source,
        reason: l.saved?.reason ?? '',
        stale: l.stale,
        correlation: l.correlation,
      })),
      matrix: set.matrix,
      unlinkedPairs: set.unlinkedPairs,
      positiveSemiDefinite: set.positiveSemiDefinite,
      minEigenvalue: set.minEigenvalue,
      repair: set.repair,
      jointMatrix: set.jointMatrix,
      inPrior,
      notInPriorReason: reason,
      draws: inPrior ? { ...RECORD_JOINT_DRAWS } : null,
      modelCode: inPrior ? set.modelCode : [],
    }
  })
}
