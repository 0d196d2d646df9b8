/** Resolves once `idle()` holds, checking every 50 ms, or after `limitMs` whether or not it does (shutdown must end). */
export async function waitUntilIdle(idle: () => boolean, limitMs: number): Promise<void> {
  for (let waited = 0; waited < limitMs && !idle(); waited += 50) {
    await new Promise((r) => setTimeout(r, 50))
  }
}
