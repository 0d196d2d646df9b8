#!/usr/bin/env node
// One entry point for the two commands a newcomer runs: `npm start` and `npm test`.
// Plain JavaScript with no dependencies, because it runs before `npm ci` has installed any.
//   node scripts/stack.mjs start   install what is missing, start PostgreSQL, migrate, seed, build, serve
//   node scripts/stack.mjs test    same bootstrap, then type-check, build and every test suite
//   node scripts/stack.mjs db      only start PostgreSQL and prepare the development database
//   node scripts/stack.mjs stop    stop the project's PostgreSQL cluster
//   node scripts/stack.mjs backup [file]          pg_dump of the development database (default .data/backups/…)
//   node scripts/stack.mjs restore <file> [name]  pg_restore into a new database (default priorsmith_restored)
import { spawn, spawnSync } from 'node:child_process'
import { createHash, randomBytes } from 'node:crypto'
import { existsSync, mkdirSync, readFileSync, writeFileSync } from 'node:fs'
import path from 'node:path'
import { fileURLToPath } from 'node:url'
import { backupDatabase, ensureCluster, ensureDatabase, restoreDatabase, stopCluster } from './lib/postgres.mjs'
import { log, run } from './lib/util.mjs'

const root = path.resolve(path.dirname(fileURLToPath(import.meta.url)), '..')
const isRoot = typeof process.getuid === 'function' && process.getuid() === 0
const bin = (name) => path.join(root, 'node_modules', '.bin', name)
const timings = []

async function step(label, fn) {
  const t0 = Date.now()
  const result = await fn()
  timings.push([label, (Date.now() - t0) / 1000])
  return result
}

/** npm ci from the committed lockfile when node_modules is missing or was installed from another lockfile. */
function ensureDependencies() {
  const lock = readFileSync(path.join(root, 'package-lock.json'))
  const digest = createHash('sha256').update(lock).digest('hex')
  const marker = path.join(root, 'node_modules', '.priorsmith-lock-sha256')
  if (existsSync(marker) && readFileSync(marker, 'utf8') === digest) return
  log('installing npm dependencies from package-lock.json (npm ci)')
  run('npm', ['ci', '--no-audit', '--no-fund'], { cwd: root })
  writeFileSync(marker, digest)
}

function ensureChromium() {
  const browser = process.env.CHROMIUM_PATH ?? '/usr/bin/chromium'
  if (existsSync(browser)) return
  if (!isRoot) throw new Error(`Browser tests need Debian's chromium at ${browser}. Install it once with: sudo apt-get install -y chromium`)
  log("installing Debian's chromium for the browser tests (a few minutes on a fresh machine)")
  run('apt-get', ['update'], { quiet: true })
  run('apt-get', ['install', '-y', '--no-install-recommends', 'chromium'], { quiet: true, env: { ...process.env, DEBIAN_FRONTEND: 'noninteractive' } })
}

async function loadDotEnv() {
  const file = path.join(root, '.env')
  if (!existsSync(file)) return
  const dotenv = await import('dotenv')
  dotenv.config({ path: file, quiet: true })
}

function tool(name, args, env = process.env) {
  run(bin(name), args, { cwd: root, env })
}

async function prepareDevDatabase() {
  const cluster = await step('PostgreSQL start', () => ensureCluster(root))
  const databaseUrl = process.env.DATABASE_URL ?? ensureDatabase(cluster, process.env.DB_NAME ?? 'priorsmith')
  const env = { ...process.env, DATABASE_URL: databaseUrl }
  await step('migrate + seed', () => tool('tsx', ['server/db/cli.ts', 'migrate', 'seed'], env))
  return env
}

function printTimings() {
  const total = timings.reduce((sum, [, s]) => sum + s, 0)
  log(`timings: ${timings.map(([l, s]) => `${l} ${s.toFixed(1)} s`).join(', ')}; total ${total.toFixed(1)} s`)
}

/** SESSION_SECRET from the environment, else one random secret kept in the ignored .data folder. */
function sessionSecret() {
  if (process.env.SESSION_SECRET) return process.env.SESSION_SECRET
  const file = path.join(root, '.data', 'session-secret')
  if (!existsSync(file)) {
    mkdirSync(path.dirname(file), { recursive: true })
    writeFileSync(file, randomBytes(32).toString('hex'), { mode: 0o600 })
  }
  return readFileSync(file, 'utf8').trim()
}

async function start() {
  await step('npm dependencies', ensureDependencies)
  await loadDotEnv()
  const env = await prepareDevDatabase()
  await step('client build', () => tool('vite', ['build', '--logLevel', 'warn'], env))
  printTimings()
  const server = spawn(bin('tsx'), ['server/index.ts'], { cwd: root, env: { ...env, NODE_ENV: env.NODE_ENV ?? 'production', SESSION_SECRET: sessionSecret() }, stdio: 'inherit' })
  for (const sig of ['SIGINT', 'SIGTERM']) process.on(sig, () => server.kill(sig))
  server.on('exit', (code) => process.exit(code ?? 0))
}

async function test() {
  await step('npm dependencies', ensureDependencies)
  await loadDotEnv()
  await step('chromium', ensureChromium)
  await step('PostgreSQL start', () => ensureCluster(root))
  await step('type-check (vue-tsc)', () => tool('vue-tsc', ['--noEmit', '-p', 'tsconfig.json']))
  await step('client build', () => tool('vite', ['build', '--logLevel', 'warn']))
  const extra = process.argv.slice(3)
  const report = path.join(root, 'artifacts', 'vitest-report.json')
  mkdirSync(path.dirname(report), { recursive: true })
  const result = await step('vitest (unit, api, e2e)', () =>
    spawnSync(bin('vitest'), ['run', '--reporter=default', '--reporter=json', `--outputFile.json=${report}`, ...extra], { cwd: root, stdio: 'inherit', env: { ...process.env, PRIORSMITH_ROOT: root } }))
  printTimings()
  if (existsSync(report)) {
    const r = JSON.parse(readFileSync(report, 'utf8'))
    // A plain closing line that any CI can read.
    process.stdout.write(`tests: ${r.numPassedTests} passed, ${r.numFailedTests} failed, ${r.numPendingTests + r.numTodoTests} skipped\n`)
  }
  process.exit(result.status ?? 1)
}

const command = process.argv[2]
try {
  if (command === 'start') await start()
  else if (command === 'test') await test()
  else if (command === 'db') { await step('npm dependencies', ensureDependencies); await loadDotEnv(); await prepareDevDatabase(); printTimings() }
  else if (command === 'stop') stopCluster(root)
  else if (command === 'backup') {
    await loadDotEnv()
    const cluster = ensureCluster(root)
    const url = process.env.DATABASE_URL ?? ensureDatabase(cluster, process.env.DB_NAME ?? 'priorsmith')
    const file = process.argv[3] ?? path.join(root, '.data', 'backups', `priorsmith-${new Date().toISOString().replace(/[:.]/g, '-')}.dump`)
    mkdirSync(path.dirname(file), { recursive: true })
    log(`backup written to ${backupDatabase(cluster, url, file)}`)
  } else if (command === 'restore') {
    await loadDotEnv()
    const file = process.argv[3]
    if (!file || !existsSync(file)) throw new Error('usage: npm run db:restore -- <backup file> [database name]')
    const url = restoreDatabase(ensureCluster(root), file, process.argv[4] ?? 'priorsmith_restored')
    log(`restored into ${url.replace(/:[^:@/]+@/, ':***@')}; point DATABASE_URL at it to use it`)
  }
  else { console.error('usage: node scripts/stack.mjs start|test|db|stop|backup|restore'); process.exit(2) }
} catch (err) {
  console.error(`[priorsmith] ${err instanceof Error ? err.message : err}`)
  process.exit(1)
}
