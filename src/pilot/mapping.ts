import { PILOT_MODEL_LABELS, PILOT_MODELS, type PilotModel } from '@shared/elicitation/pilot'
import type { Support } from '@shared/stats'
import type { Dataset, PilotUploadFields } from '@/api/pilot'
import { numericColumns, type LocalPreview } from './csv'

export type BinomialLayout = 'counts' | 'binary'

/** Mapping fields of the upload form (names as the server reads them). */
export type MappingField =
  | 'valueColumn' | 'sigma' | 'sigmaPriorScale' | 'binomialLayout' | 'successesColumn' | 'trialsColumn' | 'binaryColumn' | 'countColumn' | 'exposureColumn'

export const COLUMN_FIELDS = ['valueColumn', 'successesColumn', 'trialsColumn', 'binaryColumn', 'countColumn', 'exposureColumn'] as const
export type ColumnField = (typeof COLUMN_FIELDS)[number]

/** Test id of each mapping field (on the select, or on the form item around a text input). */
export const FIELD_TEST_IDS: Record<MappingField, string> = {
  valueColumn: 'pilot-value-column',
  sigma: 'pilot-sigma',
  sigmaPriorScale: 'pilot-sigma-scale',
  binomialLayout: 'pilot-binomial-layout',
  successesColumn: 'pilot-successes-column',
  trialsColumn: 'pilot-trials-column',
  binaryColumn: 'pilot-binary-column',
  countColumn: 'pilot-count-column',
  exposureColumn: 'pilot-exposure-column',
}

export const COLUMN_LABELS: Record<ColumnField, string> = {
  valueColumn: 'Values column',
  successesColumn: 'Successes column',
  trialsColumn: 'Trials column',
  binaryColumn: '0/1 column',
  countColumn: 'Counts column',
  exposureColumn: 'Exposure column',
}

/** What each model reads from the file, in one line. */
export const MODEL_HINTS: Record<PilotModel, string> = {
  'normal-known-sigma': 'One measurement per row; the measurement sd σ is known and entered here.',
  normal: 'One measurement per row; σ is unknown and gets a half-normal prior.',
  binomial: 'Successes out of trials: counts per group, or one 0/1 row per unit.',
  poisson: 'Event counts per row with the exposure (time × size) each count was observed over.',
}

export const MODEL_OPTIONS = PILOT_MODELS.map((m) => ({ value: m, label: PILOT_MODEL_LABELS[m] }))

/** The mapping fields the form shows for a model (and the binomial layout). */
export function mappingFields(model: PilotModel | undefined | null, layout: BinomialLayout | undefined | null = 'counts'): MappingField[] {
  switch (model) {
    case 'normal-known-sigma':
      return ['valueColumn', 'sigma']
    case 'normal':
      return ['valueColumn', 'sigmaPriorScale']
    case 'binomial':
      return layout === 'binary' ? ['binomialLayout', 'binaryColumn'] : ['binomialLayout', 'successesColumn', 'trialsColumn']
    case 'poisson':
      return ['countColumn', 'exposureColumn']
    default:
      return []
  }
}

/** A likely model for the quantity's support: shares are binomial, rates Poisson, others normal. */
export function defaultModelFor(support: Support | undefined): PilotModel {
  if (support?.kind === 'proportion') return 'binomial'
  if (support?.kind === 'positive') return 'poisson'
  return 'normal-known-sigma'
}

const find = (columns: string[], pattern: RegExp) => columns.find((c) => pattern.test(c))

/**
 * Columns to preselect for a model: the previous version's choices when the new file has those
 * columns, else names that look right among the numeric columns. The analyst checks and changes them.
 */
export function guessColumns(preview: Pick<LocalPreview, 'columns' | 'rows'>, model: PilotModel, previous?: Dataset): Partial<Record<ColumnField, string>> {
  const out: Partial<Record<ColumnField, string>> = {}
  const numeric = numericColumns(preview)
  if (previous && previous.model === model) {
    for (const f of COLUMN_FIELDS) {
      const c = (previous.mapping as Partial<Record<ColumnField, string>>)[f]
      if (c && preview.columns.includes(c)) out[f] = c
    }
    if (Object.keys(out).length) return out
  }
  switch (model) {
    case 'normal-known-sigma':
    case 'normal':
      out.valueColumn = numeric.at(-1)
      break
    case 'binomial':
      out.binaryColumn = numericColumns(preview, true)[0]
      out.successesColumn = find(numeric, /succ|yes|event|join|pos/i) ?? numeric[0]
      out.trialsColumn = find(numeric, /trial|total|^n$|size|count/i) ?? numeric[1]
      break
    case 'poisson':
      out.exposureColumn = find(numeric, /expos|time|year|km|length|person/i) ?? numeric[1]
      out.countColumn = find(numeric.filter((c) => c !== out.exposureColumn), /count|event|burst|fail|case|n_/i) ?? numeric.find((c) => c !== out.exposureColumn)
      break
  }
  return out
}

/** Only the fields of the chosen model (the server ignores the others; sending them would be confusing in the audit). */
export function uploadFieldsOf(values: Record<string, unknown>): PilotUploadFields {
  const model = values.model as PilotModel
  const layout = (values.binomialLayout as BinomialLayout | undefined) ?? 'counts'
  const body: Record<string, unknown> = { quantityId: Number(values.quantityId), name: String(values.name ?? '').trim(), model, delimiter: values.delimiter ?? ',' }
  for (const f of mappingFields(model, layout)) {
    const v = values[f]
    if (v !== undefined && v !== null && v !== '') body[f] = v
  }
  return body as unknown as PilotUploadFields
}
