// Client bundle sizes (not a test): `npm run bench:bundle` after `npm run build`. Prints the gzip size of the first
// screen (the entry and everything index.html preloads) and of the answering screen's own chunk, with the lazy chunks
// it pulls in beyond the first screen, read from Vite's manifest.
import { existsSync, readFileSync } from 'node:fs'
import path from 'node:path'
import { fileURLToPath } from 'node:url'
import { gzipSync } from 'node:zlib'

const root = path.resolve(path.dirname(fileURLToPath(import.meta.url)), '../..')
const dist = path.join(root, 'dist')
const manifestFile = path.join(dist, '.vite', 'manifest.json')
if (!existsSync(manifestFile)) {
  console.log('no dist/.vite/manifest.json: run `npm run build` first')
  process.exit(1)
}
type Chunk = { file: string; src?: string; isEntry?: boolean; imports?: string[]; dynamicImports?: string[]; css?: string[] }
const manifest = JSON.parse(readFileSync(manifestFile, 'utf8')) as Record<string, Chunk>
const kb = (bytes: number): string => `${(bytes / 1024).toFixed(1)} KB`
const gz = (file: string): number => gzipSync(readFileSync(path.join(dist, file))).length

/** A chunk's files with everything it imports statically (JS and CSS), each once. */
function closure(key: string, seen = new Set<string>()): Set<string> {
  const c = manifest[key]
  if (!c || seen.has(c.file)) return seen
  seen.add(c.file)
  for (const css of c.css ?? []) seen.add(css)
  for (const i of c.imports ?? []) closure(i, seen)
  return seen
}

const entryKey = Object.keys(manifest).find((k) => manifest[k].isEntry)!
const first = closure(entryKey)
const firstTotal = [...first].reduce((s, f) => s + gz(f), 0)
console.log(`first screen (entry and its static imports): ${kb(firstTotal)} gzip in ${first.size} files (aim < 150 KB)`)

const answerKey = Object.keys(manifest).find((k) => k.endsWith('views/AnswerView.vue'))
if (answerKey) {
  const own = manifest[answerKey]
  const ownJs = gz(own.file)
  const ownCss = (own.css ?? []).reduce((s, f) => s + gz(f), 0)
  const extra = [...closure(answerKey)].filter((f) => !first.has(f) && f !== own.file && !(own.css ?? []).includes(f))
  const extraTotal = extra.reduce((s, f) => s + gz(f), 0)
  console.log(`answering screen's own chunk: ${kb(ownJs)} JS + ${kb(ownCss)} CSS gzip (aim < 40 KB JS)`)
  console.log(`  shared chunks it loads beyond the first screen: ${kb(extraTotal)} gzip in ${extra.length} files${extra.length ? `: ${extra.map((f) => `${path.basename(f)} ${kb(gz(f))}`).join(', ')}` : ''}`)
}
