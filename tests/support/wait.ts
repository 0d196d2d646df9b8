/** Polls `probe` every 200 ms until it returns something truthy, which it returns; fails after `deadlineMs`. */
export async function waitFor<T>(what: string, probe: () => Promise<T | false | null | undefined>, deadlineMs = 30_000): Promise<T> {
  const until = Date.now() + deadlineMs
  for (;;) {
    const value = await probe()
    if (value) return value
    if (Date.now() > until) throw new Error(`timed out after ${deadlineMs} ms waiting for ${what}`)
    await new Promise((r) => setTimeout(r, 200))
  }
}
