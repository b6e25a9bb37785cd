/**
 * Polls `check` until it returns something other than undefined, for changes that reach the app
 * asynchronously (a change notice from PostgreSQL); throws naming `what` after `timeoutMs`.
 */
export async function eventually<T>(what: string, check: () => Promise<T | undefined>, timeoutMs = 15_000): Promise<T> {
  const deadline = Date.now() + timeoutMs;
  for (;;) {
    const value = await check();
    if (value !== undefined) return value;
    if (Date.now() > deadline) throw new Error(`still waiting after ${timeoutMs} ms for ${what}`);
    await new Promise((r) => setTimeout(r, 20));
  }
}
