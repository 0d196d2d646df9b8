import { execFileSync } from 'node:child_process'
import { readFileSync } from 'node:fs'
import { ENGINE_VERSION } from '../shared/stats/index'

/** What produced a record: the application's version, the engine's, and the repository commit when known. */
export interface BuildInfo {
  application: string
  version: string
  engineVersion: string
  commit?: string
}

function commitAtStart(env: NodeJS.ProcessEnv): string | undefined {
  const given = env.PRIORSMITH_COMMIT?.trim()
  if (given) return /^[0-9a-f]{7,40}$/i.test(given) ? given.toLowerCase() : undefined
  try {
    const head = execFileSync('git', ['rev-parse', 'HEAD'], { cwd: new URL('..', import.meta.url), stdio: ['ignore', 'pipe', 'ignore'], timeout: 5000 }).toString().trim()
    return /^[0-9a-f]{40}$/.test(head) ? head : undefined
  } catch {
    return undefined // not a git checkout (an installed copy): the commit is simply not stated
  }
}

/** Read once when the server starts: PRIORSMITH_COMMIT, else `git rev-parse HEAD`, else absent. */
export function readBuildInfo(env: NodeJS.ProcessEnv = process.env): BuildInfo {
  const pkg = JSON.parse(readFileSync(new URL('../package.json', import.meta.url), 'utf8')) as { version: string }
  const commit = commitAtStart(env)
  return { application: 'Priorsmith', version: pkg.version, engineVersion: ENGINE_VERSION, ...(commit ? { commit } : {}) }
}

export const BUILD_INFO: BuildInfo = readBuildInfo()
