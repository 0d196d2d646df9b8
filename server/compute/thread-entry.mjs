// Entry of a compute thread. Plain JavaScript: a worker thread does not inherit the TypeScript loader of the process
// that starts it (tsx, or vitest in the tests), so it loads the TypeScript thread through tsx's API.
import { tsImport } from 'tsx/esm/api'

await tsImport('./thread.ts', import.meta.url)
