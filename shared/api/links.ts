/** Response and request shapes of the round-link routes, returned by the server's mappers and read by the client. */

export type LinkAnswerStatus = 'draft' | 'submitted'

/** One of the two quantities of a link, as the round names it. */
export interface LinkedQuantity {
  quantityId: number
  name: string
  symbol: string
}

/**
 * Two quantities of one round that may move together. The expert is asked about `second` on the condition that
 * `first` turned out above their middle value; the order is the wording's.
 */
export interface RoundLink {
  id: number
  roundId: number
  first: LinkedQuantity
  second: LinkedQuantity
  wording: string
  position: number
  version: number
  createdAt: string
  updatedAt: string
}

/** Body of POST /api/rounds/:id/links; an empty wording takes the default question built from the two names. */
export interface LinkWriteBody {
  firstQuantityId: number
  secondQuantityId: number
  wording?: string
}

/** Body of PATCH /api/links/:id. */
export type LinkPatchBody = LinkWriteBody & { version: number }

/** Body of PUT /api/rounds/:id/links/order: every link of the round, in the new order. */
export interface LinkOrderBody {
  linkIds: number[]
}

/** One expert's answer to one link's question (GET /api/rounds/:id/link-answers): their own, or all for the study team. */
export interface LinkAnswer {
  id: number
  linkId: number
  expertId: number
  /** The expert's name and study-wide anonymous label ("Expert 2"), for the study team only. */
  expertName?: string
  expertLabel?: string
  /** P(second above the expert's median | first above theirs), strictly between 0 and 1; null while not given. */
  probability: number | null
  rationale: string
  status: LinkAnswerStatus
  version: number
  submittedAt: string | null
  updatedAt: string
}

/** Body of PUT /api/rounds/:id/link-answers/:linkId (`version` 0 for a first save). */
export interface LinkAnswerSave {
  probability: number | null
  rationale: string
  version: number
}

/** One saved version of a link answer (GET /api/link-answers/:id/history, oldest first). */
export interface LinkAnswerVersion {
  version: number
  probability: number | null
  rationale: string
  status: LinkAnswerStatus
  savedAt: string
  savedBy: string
}
