/** Invalid input to the statistics engine; `field` names the offending input so forms can show the message beside it. */
export class EngineInputError extends Error {
  readonly field: string

  constructor(field: string, message: string) {
    super(message)
    this.name = 'EngineInputError'
    this.field = field
  }
}

/** Throws EngineInputError unless value is a finite number. */
export function requireFinite(value: number, field: string, label = field): void {
  if (typeof value !== 'number' || !Number.isFinite(value)) throw new EngineInputError(field, `${label} must be a finite number.`)
}

/** Throws EngineInputError unless value is a finite number greater than 0. */
export function requirePositive(value: number, field: string, label = field): void {
  requireFinite(value, field, label)
  if (!(value > 0)) throw new EngineInputError(field, `${label} must be greater than 0.`)
}
