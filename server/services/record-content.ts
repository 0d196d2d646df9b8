import type { RecordContent, RecordQuantity } from '../../shared/api/records'
import { modelCodeWithCheck } from '../../shared/elicitation/model-code'
import { chosenFit } from '../../shared/elicitation/fits'
import { DIAGNOSTICS_CAUTION } from '../../shared/elicitation/impact'
import { recordCautions } from '../../shared/elicitation/record-cautions'
import { mean, quantile, sd, type Distribution, type FitResult } from '../../shared/stats/index'
import type { Db } from '../db/knex'
import { BUILD_INFO } from '../build-info'
import { studyExpertLabels } from './expert-labels'
import { priorHash } from './impact'
import { supportFromRow } from './quantities'
import { recordCompositions } from './record-compositions'
import { recordLinkedSets } from './record-links'
import { savedWeightCautions, weightedExpertIds } from './reconciliation'

export const RECORD_SCHEMA_ID = 'https://priorsmith.example/schemas/prior-record-1.json'
export const RECORD_SCHEMA_VERSION = '1.2'

const iso = (d: Date | null | undefined) => (d ? new Date(d).toISOString() : null)

function summary(d: Distribution) {
  return { q05: quantile(d, 0.05), q50: quantile(d, 0.5), q95: quantile(d, 0.95), mean: mean(d), sd: sd(d) }
}

/**
 * Everything the prior record states, assembled from the study's data as plain JSON. Only facts that identify the
 * content go in (no database ids, no generation time), so the same study yields the same canonical JSON and hash.
 */
export async function assembleRecord(db: Db, studyId: number, options: { showNames: boolean; version: number }): Promise<RecordContent> {
  const study = await db('studies as s').join('users as u', 'u.id', 's.owner_id').where('s.id', studyId).first('s.title', 's.context', 'u.display_name as owner')
  const quantities = await db('quantities').where({ study_id: studyId }).orderBy(['position', 'id'])
  const rounds = await db('rounds').where({ study_id: studyId }).orderBy('number')
  const items = await db('round_items').whereIn('round_id', rounds.map((r) => r.id)).orderBy(['round_id', 'position'])

  // Panel: every expert with an account on a panel of the study, under the study's labels, in the order they joined.
  const panelRows = await db('round_panel as p').join('rounds as r', 'r.id', 'p.round_id').where('r.study_id', studyId).whereNotNull('p.user_id')
    .select('p.user_id', 'p.name').orderBy('p.id')
  const labels = await studyExpertLabels(db, studyId)
  const codes = new Map<number, string>()
  for (const p of panelRows) if (!codes.has(p.user_id)) codes.set(p.user_id, labels.ofUser(p.user_id))
  const names = new Map(panelRows.map((p) => [p.user_id as number, p.name as string]))
  const declarations = await db('declarations as d').join('rounds as r', 'r.id', 'd.round_id').where('r.study_id', studyId)
    .select('d.user_id', 'r.number', 'd.expertise', 'd.interests', 'd.interests_text', 'd.seen_pilot_data', 'd.practice_points', 'd.practice_fit').orderBy(['r.number', 'd.user_id'])
  const who = (userId: number) => (options.showNames ? { code: labels.ofUser(userId), name: names.get(userId) ?? null } : { code: labels.ofUser(userId) })
  const panel = [...codes.keys()].map((userId) => ({
    ...who(userId),
    declarations: declarations.filter((d) => d.user_id === userId).map((d) => ({
      round: d.number, expertise: d.expertise, interests: d.interests, interestsText: d.interests_text, seenPilotData: d.seen_pilot_data,
      practice: d.practice_fit ? { truthProbability: d.practice_fit.truthProb, insideQuartiles: d.practice_fit.insideQuartiles } : null,
    })),
  }))

  const judgements = await db('judgements').whereIn('round_id', rounds.map((r) => r.id)).where('status', 'submitted').orderBy(['round_id', 'quantity_id', 'expert_id'])
  const recs = await db('reconciliations').whereIn('quantity_id', quantities.map((q) => q.id))
  const files = await db('evidence_files').whereIn('quantity_id', quantities.map((q) => q.id)).select('quantity_id', 'filename', 'sha256', 'size_bytes').orderBy('id')
  const leftOut = new Map<number, string>((await db('record_exclusions').whereIn('quantity_id', quantities.map((q) => q.id)).select('quantity_id', 'reason'))
    .map((x) => [x.quantity_id, x.reason]))
  const datasets = await db('pilot_datasets').where({ study_id: studyId }).orderBy(['quantity_id', 'version'])
  // Only an analysis whose candidates include the final prior itself belongs in the record (newest first), never one
  // run on a draft or an earlier choice; without one, the analyst's recorded reason for that same prior, if any.
  const impacts = await db('impact_analyses').whereIn('quantity_id', quantities.map((q) => q.id)).whereNotNull('prior_hash').orderBy('id', 'desc')
  const notRun = await db('impact_not_run').whereIn('quantity_id', quantities.map((q) => q.id))

  const calibrationQuestions = await db('calibration_questions').where({ study_id: studyId }).orderBy(['position', 'id'])

  const weightCautions = new Map<number, string[]>()
  // Each weight under its expert's label: the label comes from the expert, never from a position in a list.
  const expertWeights = new Map<number, { expert: ReturnType<typeof who>; weight: number }[]>()
  for (const rec of recs) {
    weightCautions.set(rec.quantity_id, await savedWeightCautions(db, rec, studyId))
    const weights = (rec.weights ?? []) as number[]
    const ids = rec.method === 'consensus' ? [] : await weightedExpertIds(db, rec)
    expertWeights.set(rec.quantity_id, ids.length === weights.length ? ids.map((id, i) => ({ expert: who(id), weight: weights[i] })) : [])
  }

  const quantityRecords = quantities.map((q): RecordQuantity => {
    const rec = recs.find((r) => r.quantity_id === q.id)
    const final: Distribution | null = rec?.status === 'reconciled' ? rec.distribution : null
    const finalHash = final ? priorHash(final) : null
    const impact = finalHash ? impacts.find((i) => i.quantity_id === q.id && i.prior_hash === finalHash) : undefined
    const notRunReason = finalHash && !impact ? notRun.find((r) => r.quantity_id === q.id && r.prior_hash === finalHash)?.reason ?? null : null
    const roundRefs = items.filter((i) => i.quantity_id === q.id).map((i) => {
      const r = rounds.find((x) => x.id === i.round_id)!
      return {
        number: r.number, title: r.title, method: i.method, edges: i.edges ?? null, chips: i.chips ?? null, opensAt: iso(r.opens_at), closesAt: iso(r.closes_at), feedback: r.feedback_enabled,
        // The round's own time zone, where rounds carry one: the .docx writes the window in it.
        timeZone: r.time_zone ?? undefined,
      }
    })
    return {
      name: q.name,
      symbol: q.symbol,
      unit: q.unit,
      question: q.question,
      support: supportFromRow(q),
      leftOut: leftOut.has(q.id) ? { reason: leftOut.get(q.id)! } : null,
      assumptions: q.assumptions,
      evidenceNotes: q.evidence_notes,
      evidenceFiles: files.filter((f) => f.quantity_id === q.id).map((f) => ({ filename: f.filename, sha256: f.sha256, bytes: f.size_bytes })),
      rounds: roundRefs,
      judgements: judgements.filter((j) => j.quantity_id === q.id).map((j) => {
        const fit = chosenFit(j.fits as (FitResult & { warnings?: string[] })[], j.chosen_family)
        return {
          round: rounds.find((r) => r.id === j.round_id)!.number, expert: who(j.expert_id), method: j.method, answer: j.answer, rationale: j.rationale,
          fit: fit ? { distribution: fit.distribution, sse: fit.sse, ...summary(fit.distribution), warnings: fit.warnings ?? [] } : null,
          chosenByExpert: !!j.chosen_family,
        }
      }),
      combination: rec ? {
        round: rounds.find((r) => r.id === rec.round_id)?.number ?? null, method: rec.method, weightsMode: rec.weights_mode, weights: rec.weights,
        weightsReason: rec.weights_reason, cutoff: rec.cutoff, excludedExperts: (rec.excluded_experts as number[]).map((id) => who(id).code),
        consensus: rec.consensus, fitsOfCombination: rec.fits, adjusted: rec.adjusted, adjustReason: rec.adjust_reason, rationale: rec.rationale, status: rec.status,
        weightCautions: weightCautions.get(q.id) ?? [],
        expertWeights: expertWeights.get(q.id) ?? [],
      } : null,
      finalPrior: final ? {
        distribution: final, ...summary(final),
        modelCode: modelCodeWithCheck(final, q.symbol, quantile),
      } : null,
      pilotData: datasets.filter((d) => d.quantity_id === q.id).map((d) => ({ name: d.name, version: d.version, model: d.model, rows: d.row_count, summary: d.summary, sha256: d.sha256 })),
      impact: impact ? {
        inputHash: impact.input_hash,
        dataset: impact.result.dataset,
        n: impact.result.n,
        candidates: impact.result.candidates.map((c: Record<string, any>) => ({
          label: c.label, kind: c.kind, prior: c.prior, logEvidence: c.logEvidence, posterior: c.posterior, bayesFactor: c.bayesFactor,
          priorPredictiveP: c.priorPredictiveP, priorEss: c.priorEss, flags: c.flags, decision: c.decision,
          // Analyses run before the diagnostics existed have neither.
          fractionalBayesFactor: c.fractionalBayesFactor ?? null, sensitivity: c.sensitivity ?? null,
        })),
        sweep: impact.result.sweep ? {
          evidenceRatio: impact.result.sweep.evidenceRatio, priorDriven: impact.result.sweep.priorDriven, rule: impact.result.sweep.rule,
          fractionalRatio: impact.result.sweep.fractionalRatio ?? null, trainingFraction: impact.result.sweep.trainingFraction ?? null,
        } : null,
        diagnosticsCaution: impact.result.candidates.some((c: Record<string, any>) => c.fractionalBayesFactor || c.sensitivity) ? DIAGNOSTICS_CAUTION : null,
        tipping: impact.result.tipping,
        decision: impact.result.decision,
        findings: impact.result.findings,
      } : null,
      impactNotRunReason: notRunReason,
    }
  })
  const finals = new Map<number, Distribution>(recs.filter((r) => r.status === 'reconciled').map((r) => [r.quantity_id, r.distribution]))
  const compositions = await recordCompositions(db, studyId, finals, new Set(leftOut.keys()))
  const linkedSets = await recordLinkedSets(db, studyId, new Set(leftOut.keys()), who)
  const calibration = {
    questions: calibrationQuestions.map((c) => ({ question: c.question, unit: c.unit, trueValue: c.true_value })),
    method: 'Cooke’s classical model (Cooke 1991, ch. 12): calibration as the χ² p-value of the bin frequencies, information against a uniform background on the intrinsic range with 10 % overshoot',
  }

  return {
    $schema: RECORD_SCHEMA_ID,
    schemaVersion: RECORD_SCHEMA_VERSION,
    study: { title: study.title, context: study.context, owner: study.owner },
    version: options.version,
    namesShown: options.showNames,
    panel,
    calibration,
    quantities: quantityRecords,
    compositions,
    linkedSets,
    cautions: recordCautions({ panel, quantities: quantityRecords, compositions, linkedSets }),
    producedBy: BUILD_INFO,
  }
}
