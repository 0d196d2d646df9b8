/** The one home of formatting: numbers, dates and distribution families, for screens, e-mail and the .docx. */
export * from './numbers'
export * from './dates'
export * from './families'
