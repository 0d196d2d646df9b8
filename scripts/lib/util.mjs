import { spawnSync } from 'node:child_process'

export function log(message) {
  process.stdout.write(`[priorsmith] ${message}\n`)
}

/** Runs a command, throwing with its output when it fails; quiet keeps output unless it fails. */
export function run(cmd, args, { quiet = false, cwd, env } = {}) {
  const r = spawnSync(cmd, args, { cwd, env: env ?? process.env, encoding: 'utf8', stdio: quiet ? 'pipe' : 'inherit' })
  if (r.error) throw r.error
  if (r.status !== 0) {
    const out = quiet ? `\n${r.stdout ?? ''}${r.stderr ?? ''}` : ''
    throw new Error(`${cmd} ${args.join(' ')} exited with ${r.status}${out}`)
  }
  return r.stdout
}
