import type { Knex } from 'knex'
import { rewordStoredWork } from '../server/db/reword-stored-work'

/*
 * The prior every Bayes factor is taken against was called the "reference" prior, a name the trade gives to objective
 * priors; it is now the comparison prior (request key `comparison`, candidate kind and key 'comparison'). The robust
 * mixture's second part is the wide component (request key `mixtureWide`), and its label gives the weight on it.
 * Stored analyses and stored record snapshots are rewritten so old work still shows and exports in today's words.
 * A rewritten snapshot gets its new content hash, and its study's audit chain an event naming the old and new hash.
 */

type Json = Record<string, any>

const OLD_MIXTURE = /^Robust mixture \((\d+) % vague\)/
const OLD_COMPARISON = 'Reference prior'

/** A stored candidate label in today's words ("Reference prior" → "Comparison prior", "… % vague" → the wide component). */
function relabel(text: string): string {
  if (text === OLD_COMPARISON || text.startsWith(`${OLD_COMPARISON}:`)) return `Comparison prior${text.slice(OLD_COMPARISON.length)}`
  return text.replace(OLD_MIXTURE, (_, weight: string) => `Robust mixture (${weight} % on the wide component)`)
}

function candidate(c: Json): Json {
  const out: Json = { ...c, label: typeof c.label === 'string' ? relabel(c.label) : c.label }
  if (c.kind === 'reference') out.kind = 'comparison'
  if (c.key === 'reference') out.key = 'comparison'
  return out
}

/** An impact result (as stored, or as copied into a record): candidates and findings. */
function impactResult(r: Json | null | undefined): Json | null | undefined {
  if (!r || typeof r !== 'object') return r
  return {
    ...r,
    ...(Array.isArray(r.candidates) ? { candidates: r.candidates.map(candidate) } : {}),
    ...(Array.isArray(r.findings) ? { findings: r.findings.map((f: unknown) => (typeof f === 'string' ? relabel(f) : f)) } : {}),
  }
}

/** An impact request: `reference` → `comparison`, `mixtureVague` → `mixtureWide`. */
function impactInput(input: Json | null | undefined): Json | null | undefined {
  if (!input || typeof input !== 'object') return input
  const { reference, mixtureVague, ...rest } = input
  return {
    ...rest,
    ...(reference !== undefined ? { comparison: reference } : {}),
    ...(mixtureVague !== undefined ? { mixtureWide: mixtureVague } : {}),
  }
}

function recordContent(content: Json): Json {
  if (!Array.isArray(content.quantities)) return content
  return { ...content, quantities: content.quantities.map((q: Json) => (q?.impact ? { ...q, impact: impactResult(q.impact) } : q)) }
}

export async function up(knex: Knex): Promise<void> {
  await rewordStoredWork(knex, { impactInput, impactResult, recordContent, reason: 'comparison prior and wide component renamed' })
}

export async function down(): Promise<void> {
  // Stored words stay as rewritten: the old names are not restored.
}
