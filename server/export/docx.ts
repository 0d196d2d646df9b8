import {
  AlignmentType, BorderStyle, Document, Footer, HeadingLevel, ImageRun, Packer, PageBreak, PageNumber, Paragraph, ShadingType,
  Table, TableCell, TableOfContents, TableRow, TextRun, WidthType,
} from 'docx'

type Json = Record<string, any>

const fmt = (x: unknown, digits = 4): string => {
  if (typeof x !== 'number' || !Number.isFinite(x)) return x === null || x === undefined ? '—' : String(x)
  return Math.abs(x) >= 1e5 || (Math.abs(x) < 1e-3 && x !== 0) ? x.toExponential(3) : Number(x.toPrecision(digits)).toString()
}

function describe(d: Json | null | undefined): string {
  if (!d) return '—'
  switch (d.family) {
    case 'normal': return `Normal(mean ${fmt(d.mu, 6)}, sd ${fmt(d.sigma, 6)})`
    case 'student-t': return `Student-t(df ${fmt(d.df)}, location ${fmt(d.mu, 6)}, scale ${fmt(d.sigma, 6)})`
    case 'lognormal': return `Lognormal(meanlog ${fmt(d.meanlog, 6)}, sdlog ${fmt(d.sdlog, 6)})`
    case 'gamma': return `Gamma(shape ${fmt(d.shape, 6)}, rate ${fmt(d.rate, 6)})`
    case 'beta': return `Beta(${fmt(d.alpha, 6)}, ${fmt(d.beta, 6)})`
    case 'scaled-beta': return `Beta(${fmt(d.alpha, 6)}, ${fmt(d.beta, 6)}) on [${fmt(d.lower)}, ${fmt(d.upper)}]`
    case 'uniform': return `Uniform(${fmt(d.lower, 6)}, ${fmt(d.upper, 6)})`
    default: return JSON.stringify(d)
  }
}

const p = (text: string, opts: { bold?: boolean; italics?: boolean; size?: number; color?: string } = {}) =>
  new Paragraph({ spacing: { after: 120 }, children: [new TextRun({ text, ...opts })] })
const h = (text: string, level: (typeof HeadingLevel)[keyof typeof HeadingLevel]) => new Paragraph({ text, heading: level, spacing: { before: 240, after: 120 } })

function table(header: string[], rows: string[][], numericFrom = 1): Table {
  const cell = (text: string, i: number, head: boolean) => new TableCell({
    shading: head ? { type: ShadingType.CLEAR, color: 'auto', fill: 'E8EFEC' } : undefined,
    children: [new Paragraph({ alignment: !head && i >= numericFrom && /^[-\d.,e+%—]+$/.test(text) ? AlignmentType.RIGHT : AlignmentType.LEFT, children: [new TextRun({ text, bold: head, size: 18 })] })],
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

/** The prior record as a Word document: title page, contents, one section per quantity, sign-off, cautions, history. */
export async function recordDocx(content: Json, meta: Json, charts: Map<string, Buffer>, comments: Json[], history: Json[]): Promise<Buffer> {
  const body: (Paragraph | Table | TableOfContents)[] = []
  body.push(
    new Paragraph({ spacing: { before: 2400, after: 240 }, children: [new TextRun({ text: 'Prior record', size: 56, bold: true, color: '1F6F5C' })] }),
    p(content.study.title, { size: 32, bold: true }),
    p(`Version ${meta.version} · ${STATUS[meta.status] ?? meta.status}`, { size: 24 }),
    p(meta.signedOffAt ? `Signed off by ${meta.signedOffBy} on ${meta.signedOffAt}` : 'Not signed off', { size: 22 }),
    p(`Content SHA-256: ${meta.contentHash}`, { size: 18, color: '5B6B7A' }),
    p(content.cautions[0], { italics: true, size: 20, color: '8A5A12' }),
    new Paragraph({ children: [new PageBreak()] }),
    h('Contents', HeadingLevel.HEADING_1),
    new TableOfContents('Contents', { hyperlink: true, headingStyleRange: '1-2' }),
    new Paragraph({ children: [new PageBreak()] }),
    h('1. Study and decision', HeadingLevel.HEADING_1),
    p(content.study.context),
    p(`Study owner: ${content.study.owner}`),
    h('2. Expert panel', HeadingLevel.HEADING_1),
    p(content.namesShown ? 'Experts are named at the analyst’s choice.' : 'Experts are identified by code; names are kept by the study team.'),
    table(['Expert', 'Expertise', 'Interests declared', 'Had seen pilot data'], (content.panel as Json[]).flatMap((e) =>
      (e.declarations.length ? e.declarations : [{ expertise: '—', interests: '—', interestsText: '', seenPilotData: null }]).map((d: Json) => [
        e.name ? `${e.code} (${e.name})` : e.code, d.expertise, d.interests === 'described' ? d.interestsText : d.interests === 'none' ? 'None' : '—',
        d.seenPilotData === null ? '—' : d.seenPilotData ? 'Yes' : 'No',
      ])), 9),
    h('3. Calibration questions', HeadingLevel.HEADING_1),
    p(content.calibration.method),
    table(['Question', 'Unit', 'True value'], (content.calibration.questions as Json[]).map((q) => [q.question, q.unit, fmt(q.trueValue)]), 2),
  )
  ;(content.quantities as Json[]).forEach((q, i) => {
    const n = i + 4
    body.push(
      h(`${n}. ${q.name} (${q.symbol})`, HeadingLevel.HEADING_1),
      p(`Question as put to the experts: ${q.question}`),
      p(`Unit: ${q.unit || '—'} · Support: ${q.support.kind}${q.support.kind === 'bounded' ? ` [${q.support.lower}, ${q.support.upper}]` : ''}`),
      ...(q.assumptions ? [p(`Conditioning assumptions: ${q.assumptions}`)] : []),
      ...(q.evidenceNotes ? [p(`Evidence given to the experts: ${q.evidenceNotes}`)] : []),
      ...(q.evidenceFiles.length ? [p(`Evidence files: ${q.evidenceFiles.map((f: Json) => `${f.filename} (SHA-256 ${f.sha256.slice(0, 12)}…)`).join('; ')}`)] : []),
      h(`${n}.1 Elicitation`, HeadingLevel.HEADING_2),
      ...(q.rounds.length
        ? [table(['Round', 'Method', 'Window'], q.rounds.map((r: Json) => [`${r.number}: ${r.title}`, r.method, `${r.opensAt} – ${r.closesAt}`]), 9)]
        : [p('Not yet asked in any round.')]),
      h(`${n}.2 Judgements`, HeadingLevel.HEADING_2),
      ...(q.judgements.length
        ? [table(['Round', 'Expert', 'Fitted distribution', 'SSE', '5 %', '50 %', '95 %'], q.judgements.map((j: Json) => [
          String(j.round), j.expert.name ? `${j.expert.code} (${j.expert.name})` : j.expert.code, describe(j.fit?.distribution), fmt(j.fit?.sse, 3), fmt(j.fit?.q05), fmt(j.fit?.q50), fmt(j.fit?.q95),
        ]), 3),
        ...q.judgements.map((j: Json) => p(`${j.expert.code}, round ${j.round}: ${j.rationale || '—'}`, { size: 20 }))]
        : [p('No submitted judgements.')]),
      h(`${n}.3 Combination`, HeadingLevel.HEADING_2),
      ...(q.combination
        ? [
          p(`Method: ${q.combination.method}; weights: ${q.combination.weightsMode}${q.combination.weightsReason ? ` (${q.combination.weightsReason})` : ''}; Cooke cutoff ${fmt(q.combination.cutoff)}.`),
          ...(q.combination.adjusted ? [p(`Parameters adjusted by hand: ${q.combination.adjustReason}`)] : []),
          p(`Rationale: ${q.combination.rationale || '—'}`),
        ]
        : [p('Not reconciled yet.')]),
      h(`${n}.4 Final prior`, HeadingLevel.HEADING_2),
    )
    if (q.finalPrior) {
      const f = q.finalPrior
      body.push(
        p(describe(f.distribution), { bold: true }),
        table(['5 %', '50 %', '95 %', 'Mean', 'SD'], [[fmt(f.q05, 6), fmt(f.q50, 6), fmt(f.q95, 6), fmt(f.mean, 6), fmt(f.sd, 6)]], 0),
      )
      const png = charts.get(q.symbol)
      if (png) body.push(new Paragraph({ spacing: { before: 120, after: 120 }, children: [new ImageRun({ type: 'png', data: png, transformation: { width: 520, height: 260 } })] }))
      body.push(
        p('Model code (each line, read by Priorsmith with its language’s documented parameterisation, reproduces the 5/50/95 % quantiles; the languages themselves were not run):', { size: 20 }),
        table(['Language', 'Code', 'Read-back check'], f.modelCode.map((m: Json) => [m.language, m.code, m.check ? (m.check.ok ? `ok (${fmt(m.check.maxRelativeDifference, 2)})` : 'FAILED') : 'n/a']), 9),
      )
    } else {
      body.push(p('No final prior yet.'))
    }
    body.push(h(`${n}.5 Impact on the pilot data`, HeadingLevel.HEADING_2))
    if (q.impact) {
      body.push(
        p(`Dataset: ${q.impact.dataset.name}, version ${q.impact.dataset.version} (${q.impact.dataset.model}; ${q.impact.dataset.summary.description}).`),
        table(['Candidate', 'Posterior mean', '95 % interval', 'log evidence', 'BF vs reference', 'Box p', 'Prior ESS', 'Flags'], q.impact.candidates.map((c: Json) => [
          c.label, fmt(c.posterior.mean), `${fmt(c.posterior.q025)} – ${fmt(c.posterior.q975)}`, fmt(c.logEvidence, 6),
          c.bayesFactor ? `${fmt(Math.exp(c.bayesFactor.logBF), 3)} (${c.bayesFactor.label})` : '—', fmt(c.priorPredictiveP, 3), fmt(c.priorEss, 3), c.flags.join(', ') || '—',
        ]), 1),
        ...q.impact.findings.map((f: string) => p(f)),
        ...(q.impact.sweep ? [p(`Width sweep: evidence ratio over k in [0.5, 2] = ${fmt(q.impact.sweep.evidenceRatio, 4)}; ${q.impact.sweep.priorDriven ? 'Bayes factors built on this prior are prior-driven.' : 'not prior-driven.'} ${q.impact.sweep.rule}`, { size: 20 })] : []),
      )
    } else {
      body.push(p('No impact analysis has been run.'))
    }
  })
  const last = (content.quantities as Json[]).length + 4
  body.push(
    h(`${last}. Cautions`, HeadingLevel.HEADING_1),
    ...(content.cautions as string[]).map((c) => p(c)),
    h(`${last + 1}. Review and sign-off`, HeadingLevel.HEADING_1),
    p(`Status: ${STATUS[meta.status] ?? meta.status}.`),
    p(meta.signedOffAt ? `Signed off by ${meta.signedOffBy} at ${meta.signedOffAt}. Audit chain head at sign-off: ${meta.auditHead}.` : 'Awaiting sign-off by a reviewer of the study.'),
    ...(comments.length ? [table(['When', 'Who', 'Section', 'Comment'], comments.map((c) => [c.createdAt, c.author, c.section, c.body]), 9)] : []),
    h(`${last + 2}. Change history`, HeadingLevel.HEADING_1),
    table(['When', 'Who', 'What', 'Event hash'], history.map((e) => [e.at, e.actor, e.action + (e.subject ? ` (${e.subject})` : ''), e.hash.slice(0, 16)]), 9),
  )

  const doc = new Document({
    creator: 'Priorsmith',
    title: `Prior record: ${content.study.title}`,
    features: { updateFields: true },
    styles: { default: { document: { run: { font: 'Open Sans', size: 21 } } } },
    sections: [{
      footers: {
        default: new Footer({
          children: [new Paragraph({ alignment: AlignmentType.CENTER, children: [new TextRun({ size: 16, color: '5B6B7A', children: [`${content.study.title} · prior record v${meta.version} · page `, PageNumber.CURRENT, ' of ', PageNumber.TOTAL_PAGES] })] })],
        }),
      },
      children: body,
    }],
  })
  return Packer.toBuffer(doc)
}
