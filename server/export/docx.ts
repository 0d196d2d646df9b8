import {
  AlignmentType, BorderStyle, Document, Footer, HeadingLevel, ImageRun, Packer, PageBreak, PageNumber, Paragraph, ShadingType,
  Table, TableCell, TableRow, TextRun, WidthType,
} from 'docx'
import { PILOT_MODEL_LABELS, type PilotModel } from '../../shared/elicitation/pilot'
import { cautionText, type RecordCaution } from '../../shared/elicitation/record-cautions'
import { describeDistribution as describe, formatDateTime, formatNumber, formatPercent, formatProbability } from '../../shared/format'
import { labelWithName } from '../../shared/record/expert-labels'
import { linkedSetScatters } from '../../shared/record/joint-draws'
import type { RecordLinkedSet } from '../../shared/api/records'
import { scatterPng } from './scatter-png'
import {
  answerText, CANDIDATE_KIND_LABELS, compositionBayesFactorText, compositionDirichletText, compositionSweepText, correlationRepairText, flagLabel, jointCheckText, JOINT_PRIORS_INTRO, LANGUAGE_LABELS, LINK_SOURCE_LABELS, linkAnswerText,
  linkScatterCaption,
  SUPPORT_LABELS, WEIGHTS_LABELS,
} from '../../shared/record/format'
import { COMMENT_OUTCOME_LABELS, type CommentOutcome } from '../../shared/schemas/records'
import { POOL_METHOD_LABELS } from '../../shared/schemas/reconciliation'
import { METHOD_LABELS, type ElicitationMethod } from '../../shared/schemas/rounds'
import { DIAGNOSIS_WORDS, type SensitivityDiagnosis } from '../../shared/stats/index'

type Json = Record<string, any>

/** How the .docx writes dates: the app's time zone (a round's window in the round's own zone, when it has one). */
export interface DocxOptions {
  timeZone: string
}
/**
 * Text as a .docx can hold it. XML 1.0 refuses C0 controls other than tab and line ends, U+FFFE, U+FFFF and unpaired
 * surrogates: they are dropped (a broken surrogate becomes U+FFFD). Every kind of line end — CR LF, CR, U+000B (what
 * Word's Shift+Enter leaves in pasted text), form feed, U+0085, U+2028/9 — becomes one newline, which `runs` writes as
 * a line break. Every text that enters the document goes through here.
 */
export function docxText(text: unknown): string {
  return String(text ?? '')
    .replace(/\r\n?|[\v\f\u0085\u2028\u2029]/g, '\n')
    .replace(/[\u0000-\u0008\u000e-\u001f\u007f\ufffe\uffff]/g, '')
    .replace(/[\uD800-\uDBFF](?![\uDC00-\uDFFF])|(?<![\uD800-\uDBFF])[\uDC00-\uDFFF]/g, '\ufffd')
}

type RunStyle = { bold?: boolean; italics?: boolean; size?: number; color?: string }
/** Text runs of one paragraph: cleaned, each line after the first starting with a line break. */
const runs = (text: unknown, style: RunStyle = {}) => docxText(text).split('\n').map((line, i) => new TextRun({ text: line, ...(i > 0 ? { break: 1 } : {}), ...style }))

const p = (text: string, opts: RunStyle = {}) =>
  new Paragraph({ spacing: { after: 120 }, children: runs(text, opts) })
const h = (text: string, level: (typeof HeadingLevel)[keyof typeof HeadingLevel]) => new Paragraph({ children: runs(text), heading: level, spacing: { before: 240, after: 120 } })

/** The fractional Bayes factors and power-scaling sensitivities of the candidates; nothing for analyses run before them. */
function diagnosticsTable(candidates: Json[]): Table[] {
  if (!candidates.some((c) => c.fractionalBayesFactor || c.sensitivity)) return []
  return [table(['Candidate prior', 'Fractional Bayes factor against the comparison prior', 'Training fraction b', 'Sensitivity to the prior', 'Sensitivity to the data', 'Reading'], candidates.map((c) => [
    c.label || (CANDIDATE_KIND_LABELS[c.kind] ?? '—'),
    c.fractionalBayesFactor ? formatNumber(Math.exp(c.fractionalBayesFactor.logBF), 3) : '—',
    c.fractionalBayesFactor ? formatNumber(c.fractionalBayesFactor.b, 3) : '—',
    c.sensitivity ? formatNumber(c.sensitivity.prior, 3) : '—',
    c.sensitivity ? formatNumber(c.sensitivity.likelihood, 3) : '—',
    c.sensitivity ? DIAGNOSIS_WORDS[c.sensitivity.diagnosis as SensitivityDiagnosis] : '—',
  ]), 1)]
}

function table(header: string[], rows: string[][], numericFrom = 1): Table {
  const cell = (text: string, i: number, head: boolean) => new TableCell({
    shading: head ? { type: ShadingType.CLEAR, color: 'auto', fill: 'E8EFEC' } : undefined,
    children: [new Paragraph({ alignment: !head && i >= numericFrom && /^[-\d.,e+%—]+$/.test(text) ? AlignmentType.RIGHT : AlignmentType.LEFT, children: runs(text, { bold: head, size: 18 }) })],
  })
  return new Table({
    width: { size: 100, type: WidthType.PERCENTAGE },
    borders: {
      top: { style: BorderStyle.SINGLE, size: 4, color: '9AA5AE' }, bottom: { style: BorderStyle.SINGLE, size: 4, color: '9AA5AE' },
      left: { style: BorderStyle.NONE, size: 0, color: 'FFFFFF' }, right: { style: BorderStyle.NONE, size: 0, color: 'FFFFFF' },
      insideHorizontal: { style: BorderStyle.SINGLE, size: 2, color: 'D5DBDF' }, insideVertical: { style: BorderStyle.NONE, size: 0, color: 'FFFFFF' },
    },
    rows: [new TableRow({ tableHeader: true, children: header.map((t, i) => cell(t, i, true)) }), ...rows.map((r) => new TableRow({ children: r.map((t, i) => cell(t, i, false)) }))],
  })
}

const STATUS: Record<string, string> = { draft: 'Draft', in_review: 'In review', signed_off: 'Signed off' }

const label = <K extends string>(labels: Record<K, string>, key: unknown): string => labels[key as K] ?? '—'

/** Headings numbered as they are written, so the contents list is written out as paragraphs (no field to update). */
class Outline {
  readonly entries: { text: string; level: 1 | 2 }[] = []
  heading(text: string, level: 1 | 2): Paragraph {
    this.entries.push({ text, level })
    return h(text, level === 1 ? HeadingLevel.HEADING_1 : HeadingLevel.HEADING_2)
  }
  contents(): Paragraph[] {
    return this.entries.map((e) => new Paragraph({
      indent: { left: e.level === 1 ? 0 : 360 }, spacing: { after: 60 },
      children: runs(e.text, { size: e.level === 1 ? 22 : 20, bold: e.level === 1 }),
    }))
  }
}

/** What produced the record (application, engine, commit); records stored before schema 1.1 do not say. */
function producedBySection(outline: Outline, produced: Json | undefined, n: number): Paragraph[] {
  if (!produced) return []
  return [
    outline.heading(`${n}. Software that produced this record`, 1),
    p(`${produced.application} ${produced.version}`),
    p(`Statistical engine ${produced.engineVersion}`),
    p(produced.commit ? `Repository commit ${produced.commit}` : 'Repository commit not known (the application was not run from a git checkout).'),
  ]
}

const percentOrDash = (x: number | null | undefined) => (x === null || x === undefined ? '—' : formatPercent(x))

/** One composition of the joint-priors section: its shares, the Dirichlet and its model code, or why it is not part of the prior. */
function compositionParagraphs(outline: Outline, c: Json, number: string): (Paragraph | Table)[] {
  const out: (Paragraph | Table)[] = [
    outline.heading(`${number} ${c.name} (shares of a whole, ${c.symbol})`, 2),
    p(`What the shares are shares of: ${c.wording}`),
  ]
  if (!c.inPrior) out.push(p(c.notInPriorReason, { bold: true, color: '8A5A12' }))
  else out.push(p(compositionDirichletText(c.dirichlet, c.residual ? c.shares.at(-1).name : null), { bold: true }))
  out.push(table(['Share', 'Symbol', 'Reconciled prior', 'Its mean', 'Dirichlet α', 'Dirichlet mean', 'Largest gap'], (c.shares as Json[]).map((s) => [
    s.name, s.symbol ?? '—', s.prior ? describe(s.prior) : s.symbol === null ? 'the rest (not asked)' : 'not reconciled', percentOrDash(s.elicitedMean),
    s.alpha === null ? '—' : formatNumber(s.alpha), percentOrDash(s.dirichletMean), s.mismatch === null ? '—' : formatProbability(s.mismatch),
  ]), 3))
  if (!c.inPrior) return out
  out.push(
    p('“Largest gap” is the largest difference in probability between a share’s reconciled prior and the Dirichlet’s share at the reconciled 5, 25, 50, 75 and 95 % values; one Dirichlet has a single total concentration for all shares.', { size: 20 }),
    ...(c.dirichlet.warnings as Json[]).map((w) => p(`Warning: ${w.message}`, { color: '8A5A12' })),
    p('Model code (the shares’ order is in the comment; Priorsmith’s reader takes the concentrations back out of each line; the languages themselves were not run):', { size: 20 }),
    table(['Language', 'Code', 'Read-back check'], (c.modelCode as Json[]).map((m) => [LANGUAGE_LABELS[m.language] ?? m.language, m.code, jointCheckText(m.check)]), 9),
  )
  const im = c.impact
  if (!im) {
    out.push(p('No impact analysis of this Dirichlet on pilot counts exists.'))
    return out
  }
  out.push(
    p(`Impact on the pilot counts ${im.dataset.name}, version ${im.dataset.version} (${im.dataset.summary.description}; ${formatNumber(im.observations)} observations in ${formatNumber(im.dataset.rows)} rows).`),
    table(['Prior', 'Total concentration', 'log evidence'], [im.prior, im.comparison].map((x: Json) => [
      x.label, formatNumber((x.alpha as number[]).reduce((a, b) => a + b, 0)), formatNumber(x.logEvidence, 6),
    ]), 1),
    p(compositionBayesFactorText(im)),
    table(['Share', 'Prior mean', 'Posterior mean', '95 % interval'], (c.shares as Json[]).map((s, j) => [
      s.name, percentOrDash(s.dirichletMean), formatPercent(im.prior.posterior[j].mean), `${formatPercent(im.prior.posterior[j].q025)} to ${formatPercent(im.prior.posterior[j].q975)}`,
    ]), 1),
    p(compositionSweepText(im.sweep), { size: 20 }),
    ...(im.findings as string[]).map((f) => p(f)),
  )
  return out
}

const matrixTable = (symbols: string[], m: number[][], digits = 3) =>
  table(['', ...symbols], m.map((row, i) => [symbols[i], ...row.map((x) => formatNumber(x, digits))]), 1)

/** One linked set of the joint-priors section: its links and answers, the matrix and its repair, a scatter per link, the model code. */
function linkedSetParagraphs(outline: Outline, set: RecordLinkedSet, number: string): (Paragraph | Table)[] {
  const symbols = set.quantities.map((q) => q.symbol)
  const out: (Paragraph | Table)[] = [
    outline.heading(`${number} Linked: ${set.quantities.map((q) => q.name).join(', ')} (${set.name})`, 2),
    ...(set.notInPriorReason ? [p(set.notInPriorReason, { bold: true, color: '8A5A12' })] : []),
    table(['Quantity', 'Symbol', 'Reconciled prior'], set.quantities.map((q) => [q.name, q.symbol, q.distribution ? describe(q.distribution) : 'not reconciled']), 9),
    p('Each link asked the experts a conditional question; an answer p means the Gaussian-copula correlation sin(π(p − 1/2)) (50 % means unrelated). The experts’ correlations are pooled on Fisher’s z scale.', { size: 20 }),
    table(['Question', 'Experts’ answers', 'Pooled correlation', 'Correlation used', 'How it was set'], set.links.map((l) => [
      `Round ${l.round}: ${l.wording}`, l.answers.map((a) => linkAnswerText(a, labelWithName(a.expert))).join('; ') || 'none',
      formatNumber(l.pooledCorrelation, 3), formatNumber(l.correlation, 3),
      `${LINK_SOURCE_LABELS[l.source] ?? l.source}${l.reason ? `: ${l.reason}` : ''}${l.stale ? ' (the pooled value changed since it was confirmed)' : ''}. Weights: ${l.weightRule}.`,
    ]), 9),
    p('Correlation matrix as decided:', { size: 20 }),
    matrixTable(symbols, set.matrix),
    ...set.unlinkedPairs.map((u) => p(`No link joins ${u.first} and ${u.second}: their correlation is taken as 0.`, { size: 20 })),
  ]
  if (set.repair) {
    out.push(
      p(correlationRepairText(set.minEigenvalue, set.repair.maxChange), { color: '8A5A12' }),
      p('The matrix the joint prior uses:', { size: 20 }), matrixTable(symbols, set.repair.matrix),
      p('How far each entry moved (used minus decided):', { size: 20 }), matrixTable(symbols, set.repair.changes),
    )
  }
  if (!set.inPrior || !set.draws) return out
  for (const scatter of linkedSetScatters(set)) {
    out.push(
      new Paragraph({ spacing: { before: 120, after: 60 }, children: [new ImageRun({ type: 'png', data: scatterPng(scatter.points), transformation: { width: 480, height: 320 } })] }),
      p(`Figure: ${linkScatterCaption(scatter.first, scatter.second, set.draws)}`, { size: 18, italics: true }),
    )
  }
  out.push(
    p(`Model code (${set.modelCode[0]?.form === 'multivariate-normal' ? 'a multivariate normal, on the log scale for lognormal quantities' : 'the Gaussian copula with its Jacobian'}; Priorsmith’s reader takes the parameters back out of each block; the languages themselves were not run):`, { size: 20 }),
    table(['Language', 'Code', 'Read-back check'], set.modelCode.map((m) => [LANGUAGE_LABELS[m.language] ?? m.language, m.code, jointCheckText(m.check)]), 9),
  )
  return out
}

/** The joint priors after the quantities: each composition, then each linked set; nothing for records without them (before schema 1.2 or none). */
function jointSection(outline: Outline, content: Json, n: number): (Paragraph | Table)[] {
  const compositions = (content.compositions ?? []) as Json[]
  const linkedSets = (content.linkedSets ?? []) as RecordLinkedSet[]
  if (!compositions.length && !linkedSets.length) return []
  return [
    outline.heading(`${n}. Joint priors`, 1),
    p(JOINT_PRIORS_INTRO),
    ...compositions.flatMap((c, i) => compositionParagraphs(outline, c, `${n}.${i + 1}`)),
    ...linkedSets.flatMap((set, i) => linkedSetParagraphs(outline, set, `${n}.${compositions.length + i + 1}`)),
  ]
}

/** The prior record as a Word document: title page, contents, one section per quantity, cautions, sign-off, history. */
export async function recordDocx(content: Json, meta: Json, charts: Map<string, Buffer>, comments: Json[], history: Json[], options: DocxOptions): Promise<Buffer> {
  const tz = options.timeZone
  const when = (v: unknown, seconds = false, timeZone = tz) => formatDateTime(v as string | null, { timeZone, words: 'long', zone: true, seconds })
  const outline = new Outline()
  const sections: (Paragraph | Table)[] = []
  sections.push(
    outline.heading('1. Study and decision', 1),
    p(content.study.context),
    p(`Study owner: ${content.study.owner}`),
    p(`Dates and times are given in the ${tz} time zone, except a round’s window, which is given in the round’s own time zone when it has one.`, { size: 20 }),
    outline.heading('2. Expert panel', 1),
    p(content.namesShown ? 'Experts are named at the analyst’s choice.' : 'Experts are identified by a label (Expert 1, Expert 2, …) that is the same throughout the study; names are kept by the study team.'),
    table(['Expert', 'Round', 'Expertise', 'Interests declared', 'Had seen pilot data'], (content.panel as Json[]).flatMap((e) =>
      (e.declarations.length ? e.declarations : [{ round: null, expertise: 'No declaration recorded', interests: null, interestsText: '', seenPilotData: null }]).map((d: Json) => [
        labelWithName(e as { code: string; name?: string | null }), d.round === null ? '—' : String(d.round), d.expertise, d.interests === 'described' ? d.interestsText : d.interests === 'none' ? 'None' : '—',
        d.seenPilotData === null ? '—' : d.seenPilotData ? 'Yes' : 'No',
      ])), 1),
    outline.heading('3. Calibration questions', 1),
    p(content.calibration.method),
    table(['Question', 'Unit', 'True value'], (content.calibration.questions as Json[]).map((q) => [q.question, q.unit, q.trueValue === null ? 'not known yet' : formatNumber(q.trueValue, 6)]), 2),
  )
  ;(content.quantities as Json[]).forEach((q, i) => {
    const n = i + 4
    sections.push(
      outline.heading(`${n}. ${q.name} (${q.symbol})`, 1),
      ...(q.leftOut ? [p(`Left out of this record. Reason: ${q.leftOut.reason}`, { bold: true, color: '8A5A12' })] : []),
      p(`Question as put to the experts: ${q.question}`),
      p(`Unit: ${q.unit || '—'} · Values: ${label(SUPPORT_LABELS, q.support.kind)}${q.support.kind === 'bounded' ? ` from ${formatNumber(q.support.lower, 6)} to ${formatNumber(q.support.upper, 6)}` : ''}`),
      ...(q.assumptions ? [p(`Conditioning assumptions: ${q.assumptions}`)] : []),
      ...(q.evidenceNotes ? [p(`Evidence given to the experts: ${q.evidenceNotes}`)] : []),
      ...(q.evidenceFiles.length ? [p(`Evidence files: ${q.evidenceFiles.map((f: Json) => `${f.filename} (SHA-256 ${f.sha256.slice(0, 12)}…)`).join('; ')}`)] : []),
      outline.heading(`${n}.1 Elicitation`, 2),
      ...(q.rounds.length
        ? [table(['Round', 'Method', 'Window'], q.rounds.map((r: Json) => [
          `${r.number}: ${r.title}`, label(METHOD_LABELS, r.method as ElicitationMethod),
          `${when(r.opensAt, false, r.timeZone ?? tz)} to ${when(r.closesAt, false, r.timeZone ?? tz)}`,
        ]), 9)]
        : [p('Not yet asked in any round.')]),
      outline.heading(`${n}.2 Judgements`, 2),
      ...(q.judgements.length
        ? [
          p('Each expert’s answer as given (plausible range, then the values with their cumulative probabilities, or each interval with its probability or chips), and the distribution fitted to it.', { size: 20 }),
          table(['Round', 'Expert', 'Answer as given', 'Fitted distribution', '5 %', '50 %', '95 %'], q.judgements.map((j: Json) => [
            String(j.round), labelWithName(j.expert), answerText(j.method, j.answer), describe(j.fit?.distribution), formatNumber(j.fit?.q05), formatNumber(j.fit?.q50), formatNumber(j.fit?.q95),
          ]), 4),
          ...q.judgements.map((j: Json) => p(`${j.expert.code}, round ${j.round}: ${j.rationale || '—'}`, { size: 20 })),
          ...q.judgements.flatMap((j: Json) => (j.fit?.warnings ?? []).map((w: string) => p(`${j.expert.code}, round ${j.round}, fitted shape: ${w}`, { size: 20, color: '8A5A12' }))),
        ]
        : [p('No submitted judgements.')]),
      outline.heading(`${n}.3 Combination`, 2),
      ...(q.combination
        ? [
          p(`Method: ${label(POOL_METHOD_LABELS, q.combination.method)}; ${label(WEIGHTS_LABELS, q.combination.weightsMode).toLowerCase()}${q.combination.weightsReason ? ` (${q.combination.weightsReason})` : ''}${q.combination.weightsMode === 'performance' ? `; calibration cutoff ${formatProbability(q.combination.cutoff)}` : ''}.`),
          ...(q.combination.expertWeights?.length ? [p(`Weights: ${q.combination.expertWeights.map((w: Json) => `${labelWithName(w.expert)} ${formatProbability(w.weight)}`).join('; ')}.`)] : []),
          ...(q.combination.excludedExperts?.length ? [p(`Left out of the combination: ${q.combination.excludedExperts.join(', ')}.`)] : []),
          ...(q.combination.weightCautions ?? []).map((c: string) => p(`Caution: ${c}`, { color: '8A5A12' })),
          ...(q.combination.adjusted ? [p(`Parameters adjusted by hand: ${q.combination.adjustReason}`)] : []),
          p(`Rationale: ${q.combination.rationale || '—'}`),
        ]
        : [p('Not reconciled.')]),
      outline.heading(`${n}.4 Final prior`, 2),
    )
    if (q.finalPrior) {
      const f = q.finalPrior
      sections.push(
        p(describe(f.distribution), { bold: true }),
        table(['5 %', '50 %', '95 %', 'Mean', 'SD'], [[formatNumber(f.q05, 6), formatNumber(f.q50, 6), formatNumber(f.q95, 6), formatNumber(f.mean, 6), formatNumber(f.sd, 6)]], 0),
      )
      const png = charts.get(q.symbol)
      if (png) sections.push(new Paragraph({ spacing: { before: 120, after: 120 }, children: [new ImageRun({ type: 'png', data: png, transformation: { width: 520, height: 260 } })] }))
      sections.push(
        p('Model code (each line, read by Priorsmith with its language’s documented parameterisation, reproduces the 5/50/95 % quantiles; the languages themselves were not run):', { size: 20 }),
        table(['Language', 'Code', 'Read-back check'], f.modelCode.map((m: Json) => [
          LANGUAGE_LABELS[m.language] ?? m.language, m.code, m.check ? (m.check.ok ? `passed (largest relative difference ${formatNumber(m.check.maxRelativeDifference, 2)})` : 'FAILED') : 'not available',
        ]), 9),
      )
    } else {
      sections.push(p(q.leftOut ? 'None: the quantity is left out of this record.' : 'No final prior yet.'))
    }
    sections.push(outline.heading(`${n}.5 Impact on the pilot data`, 2))
    if (q.impact) {
      sections.push(
        p(`Dataset: ${q.impact.dataset.name}, version ${q.impact.dataset.version} (${label(PILOT_MODEL_LABELS, q.impact.dataset.model as PilotModel)}; ${q.impact.dataset.summary.description}).`),
        table(['Candidate prior', 'Posterior mean', '95 % interval', 'log evidence', 'Bayes factor against the comparison prior', 'Box p', 'Prior ESS', 'Cautions'], q.impact.candidates.map((c: Json) => [
          c.label || (CANDIDATE_KIND_LABELS[c.kind] ?? '—'), formatNumber(c.posterior.mean), `${formatNumber(c.posterior.q025)} to ${formatNumber(c.posterior.q975)}`, formatNumber(c.logEvidence, 6),
          c.bayesFactor ? `${formatNumber(Math.exp(c.bayesFactor.logBF), 3)} (${c.bayesFactor.label})` : '—', formatProbability(c.priorPredictiveP), formatNumber(c.priorEss, 3),
          c.flags.map(flagLabel).join('; ') || 'none',
        ]), 1),
        ...diagnosticsTable(q.impact.candidates),
        ...q.impact.findings.map((f: string) => p(f)),
        ...(q.impact.sweep ? [p(`Width sweep: the evidence changes by a factor ${formatNumber(q.impact.sweep.evidenceRatio, 4)} as the prior is made from half to twice as wide; ${q.impact.sweep.priorDriven ? `so ${flagLabel('prior-driven-bayes-factor').toLowerCase()}.` : 'Bayes factors built on this prior are not driven by its width.'}${q.impact.sweep.fractionalRatio != null ? ` The fractional Bayes factor (b = ${formatNumber(q.impact.sweep.trainingFraction, 3)}) changes by a factor ${formatNumber(q.impact.sweep.fractionalRatio, 4)} over the same range.` : ''} ${q.impact.sweep.rule}`, { size: 20 })] : []),
        ...(q.impact.diagnosticsCaution ? [p(q.impact.diagnosticsCaution, { size: 20 })] : []),
      )
    } else if (q.finalPrior) {
      sections.push(p(q.impactNotRunReason
        ? `No impact analysis of the final prior was run. The analyst’s reason: ${q.impactNotRunReason}`
        : 'No impact analysis of the final prior exists.'))
    } else {
      sections.push(p('No impact analysis: there is no final prior.'))
    }
  })
  const joint = jointSection(outline, content, (content.quantities as Json[]).length + 4)
  sections.push(...joint)
  const last = (content.quantities as Json[]).length + 4 + (joint.length ? 1 : 0)
  const responses = new Map(comments.filter((c) => c.kind === 'response').map((c) => [c.replyTo, c]))
  sections.push(
    outline.heading(`${last}. Cautions`, 1),
    ...(content.cautions as (string | RecordCaution)[]).map((c) => p(cautionText(c))),
    outline.heading(`${last + 1}. Review and sign-off`, 1),
    p(`Status: ${STATUS[meta.status] ?? meta.status}.`),
    p(meta.signedOffAt
      ? `Signed off by ${meta.signedOffBy} on ${when(meta.signedOffAt)}. The time shows when this version was fixed; the audit chain head at sign-off is ${meta.auditHead}.`
      : 'Not signed off: awaiting sign-off by a reviewer of the study.'),
    ...(comments.some((c) => c.kind !== 'response')
      ? [table(['When', 'Who', 'Section', 'Comment', 'Analyst’s answer'], comments.filter((c) => c.kind !== 'response').map((c) => {
        const r = responses.get(c.id)
        return [
          when(c.createdAt), c.author, c.section, `${c.kind === 'return' ? 'Returned the record: ' : ''}${c.body}`,
          r ? `${COMMENT_OUTCOME_LABELS[r.outcome as CommentOutcome] ?? '—'}: ${r.body}` : c.kind === 'return' ? 'Not answered yet' : '—',
        ]
      }), 9)]
      : []),
    outline.heading(`${last + 2}. Change history`, 1),
    table(['When', 'Who', 'What', 'Event hash'], history.map((e) => [when(e.at, true), e.actor, e.subjectText ? `${e.what} (${e.subjectText})` : e.what, e.hash.slice(0, 16)]), 9),
    ...producedBySection(outline, content.producedBy, last + 3),
  )

  const title = [
    new Paragraph({ spacing: { before: 2400, after: 240 }, children: [new TextRun({ text: 'Prior record', size: 56, bold: true, color: '1F6F5C' })] }),
    p(content.study.title, { size: 32, bold: true }),
    p(`Version ${meta.version} · ${STATUS[meta.status] ?? meta.status}`, { size: 24 }),
    p(meta.signedOffAt ? `Signed off by ${meta.signedOffBy} on ${when(meta.signedOffAt)}` : 'Not signed off', { size: 22 }),
    p(`Content SHA-256: ${meta.contentHash}`, { size: 18, color: '5B6B7A' }),
    p(cautionText(content.cautions[0]), { italics: true, size: 20, color: '8A5A12' }),
    new Paragraph({ children: [new PageBreak()] }),
    h('Contents', HeadingLevel.HEADING_1),
    ...outline.contents(),
    new Paragraph({ children: [new PageBreak()] }),
  ]

  const doc = new Document({
    creator: docxText(content.study.owner),
    lastModifiedBy: docxText(meta.signedOffBy ?? content.study.owner),
    title: docxText(`Prior record: ${content.study.title}`),
    subject: `Prior record, version ${meta.version}`,
    description: docxText(`Prior record of the study “${content.study.title}”, version ${meta.version} (${STATUS[meta.status] ?? meta.status}), content SHA-256 ${meta.contentHash}.`),
    styles: { default: { document: { run: { font: 'Open Sans', size: 21 } } } },
    sections: [{
      footers: {
        default: new Footer({
          children: [new Paragraph({ alignment: AlignmentType.CENTER, children: [new TextRun({ size: 16, color: '5B6B7A', children: [docxText(`${content.study.title} · prior record v${meta.version} · page `).replace(/\n/g, ' '), PageNumber.CURRENT, ' of ', PageNumber.TOTAL_PAGES] })] })],
        }),
      },
      children: [...title, ...sections],
    }],
  })
  return Packer.toBuffer(doc)
}
