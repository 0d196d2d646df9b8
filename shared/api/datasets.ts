import type { PilotMapping, PilotModel, PilotSummary } from '../elicitation/pilot'
import type { PilotData } from '../stats/types'

/** Request and response shapes of the pilot-data routes (POST/GET /api/studies/:id/datasets, GET /api/datasets/:id). */

export type Delimiter = ',' | ';' | '\t'

/** A stored pilot dataset. */
export interface Dataset {
  id: number
  studyId: number
  quantityId: number
  /** 1, 2, … per quantity: each upload is a new version. */
  version: number
  name: string
  filename: string
  model: PilotModel
  mapping: PilotMapping & { delimiter?: Delimiter }
  rowCount: number
  data: PilotData
  summary: PilotSummary
  sha256: string
  createdAt: string
  /** Header and the first rows of the stored file (single GET and create only). */
  preview?: string[][]
}

/** POST /api/studies/:id/datasets/preview: the file's columns and first rows, before a model is chosen. */
export interface CsvPreview {
  columns: string[]
  rows: string[][]
  rowCount: number
}

/** The form fields sent beside the file (shared/schemas/pilot.ts); only the ones of the chosen model. */
export interface PilotUploadFields {
  quantityId: number
  name: string
  model: PilotModel
  delimiter: Delimiter
  valueColumn?: string
  sigma?: number
  sigmaPriorScale?: number
  binomialLayout?: 'counts' | 'binary'
  successesColumn?: string
  trialsColumn?: string
  binaryColumn?: string
  countColumn?: string
  exposureColumn?: string
  /** Store the file although the same file is already a version of this quantity's pilot data. */
  allowDuplicate?: boolean
}
