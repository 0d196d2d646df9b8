/** Response shape of the calibration-question routes, returned by the server's services and read by the client. */

/** A seed question with a known (or later known) answer; `trueValue` is absent for experts, null while not known yet. */
export interface CalibrationQuestion {
  id: number
  studyId: number
  question: string
  unit: string
  position: number
  version: number
  trueValue?: number | null
}
