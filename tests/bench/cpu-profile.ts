// Summary of a V8 CPU profile (prints figures; not a test): where the app's main thread spent its time, by part of
// the code (our server, shared engine, each npm package, Node's own internals, idle) and by function. Profiles come
// from `LOAD_CPU_PROFILE=<folder> npm run bench:load`; run `npx tsx tests/bench/cpu-profile.ts <file.cpuprofile>`.
// Only the busiest stretch is counted when LOAD_PROFILE_FROM / LOAD_PROFILE_TO (seconds from the profile's start) are set.
import { readFileSync } from 'node:fs'

interface ProfileNode {
  id: number
  callFrame: { functionName: string; url: string; lineNumber: number }
  children?: number[]
}
interface Profile { nodes: ProfileNode[]; samples: number[]; timeDeltas: number[]; startTime: number; endTime: number }

const file = process.argv[2]
if (!file) throw new Error('usage: tsx tests/bench/cpu-profile.ts <file.cpuprofile>')
const profile: Profile = JSON.parse(readFileSync(file, 'utf8'))
const from = Number(process.env.LOAD_PROFILE_FROM ?? 0) * 1e6
const to = Number(process.env.LOAD_PROFILE_TO ?? Infinity) * 1e6

const byId = new Map(profile.nodes.map((n) => [n.id, n]))
const parent = new Map<number, number>()
for (const n of profile.nodes) for (const c of n.children ?? []) parent.set(c, n.id)

/** Which part of the code a frame belongs to: an npm package, a folder of ours, Node's internals, or V8's own states. */
function partOf(url: string, name: string): string {
  if (!url) return name.startsWith('(') ? name : '(native)'
  const pkg = url.match(/node_modules\/((?:@[^/]+\/)?[^/]+)/)
  if (pkg) return pkg[1]
  if (url.startsWith('node:')) return 'node:internals'
  const ours = url.match(/\/(server|shared|seeds)\/(?:([^/]+)\/)?/)
  if (ours) return ours[2] && !ours[2].includes('.') ? `${ours[1]}/${ours[2]}` : ours[1]
  return url
}

const self = new Map<number, number>()
let t = 0
let total = 0
profile.samples.forEach((id, i) => {
  t += profile.timeDeltas[i]
  if (t < from || t > to) return
  const dt = profile.timeDeltas[i + 1] ?? 0
  self.set(id, (self.get(id) ?? 0) + dt)
  total += dt
})

const parts = new Map<string, number>()
const functions = new Map<string, number>()
/** Time under each of our own functions, callees included (the first frame of ours above a sample takes it). */
const oursInclusive = new Map<string, number>()
for (const [id, us] of self) {
  const n = byId.get(id)!
  const { functionName, url, lineNumber } = n.callFrame
  const part = partOf(url, functionName)
  parts.set(part, (parts.get(part) ?? 0) + us)
  const fn = `${functionName || '(anonymous)'} ${url.replace(/^.*\/(node_modules|server|shared)\//, '$1/')}:${lineNumber + 1}`
  functions.set(fn, (functions.get(fn) ?? 0) + us)
  const seen = new Set<string>()
  for (let a: number | undefined = id; a !== undefined; a = parent.get(a)) {
    const f = byId.get(a)!.callFrame
    if (!/\/(server|shared)\//.test(f.url) || f.url.includes('node_modules')) continue
    const key = `${f.functionName || '(anonymous)'} ${f.url.replace(/^.*\/(server|shared)\//, '$1/')}:${f.lineNumber + 1}`
    if (seen.has(key)) continue
    seen.add(key)
    oursInclusive.set(key, (oursInclusive.get(key) ?? 0) + us)
  }
}

const pct = (us: number) => `${((100 * us) / total).toFixed(1).padStart(5)} %  ${(us / 1000).toFixed(0).padStart(6)} ms`
const top = (m: Map<string, number>, n: number) => [...m].sort((a, b) => b[1] - a[1]).slice(0, n)
console.log(`${file}: ${(total / 1e6).toFixed(1)} s sampled`)
console.log('\nby part of the code (self time):')
for (const [k, v] of top(parts, 25)) console.log(`  ${pct(v)}  ${k}`)
console.log('\nby function (self time):')
for (const [k, v] of top(functions, 30)) console.log(`  ${pct(v)}  ${k}`)
console.log('\nour functions, callees included:')
for (const [k, v] of top(oursInclusive, 25)) console.log(`  ${pct(v)}  ${k}`)
