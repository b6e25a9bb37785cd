// Keeps the app process of `npm start` running. Node built-ins only.

/** After the n-th failure in a row: 1 s, doubling, at most 30 s. */
export function restartDelayMs(failuresInARow) {
  return Math.min(30_000, 1000 * 2 ** (failuresInARow - 1));
}

const exitOf = (child) =>
  new Promise((resolve) => {
    if (child.exitCode !== null || child.signalCode !== null) resolve({ code: child.exitCode, signal: child.signalCode });
    else child.once('exit', (code, signal) => resolve({ code, signal }));
  });

/**
 * Runs `start()` (which spawns the child) and starts it again whenever it dies: exits with a
 * signal or a non-zero code, waiting `restartDelayMs` longer after each failure in a row. A child
 * that ran `stableMs` before dying counts as the first failure again. A clean exit (code 0) is the
 * app's own decision to stop and ends the supervision, as do `giveUpAfter` failures in a row (an
 * app that cannot start at all, e.g. with a setting it refuses). `stop()` sends SIGTERM (SIGKILL
 * after `killAfterMs`), ends the supervision and resolves with how the child ended.
 */
export function supervise({ start, log, stableMs = 60_000, giveUpAfter = 10, killAfterMs = 20_000, wait = (ms, signal) => pause(ms, signal), now = Date.now }) {
  let child = null;
  let stopping = false;
  const stopped = new AbortController();

  const done = (async () => {
    let failuresInARow = 0;
    for (;;) {
      const startedAt = now();
      child = start();
      const ended = await exitOf(child);
      if (stopping || ended.code === 0) return ended;
      failuresInARow = now() - startedAt >= stableMs ? 1 : failuresInARow + 1;
      if (failuresInARow >= giveUpAfter) {
        log(`the app process ended ${failuresInARow} times in a row within ${stableMs / 1000} s of starting; giving up`);
        return ended;
      }
      const delay = restartDelayMs(failuresInARow);
      log(`the app process ended (${ended.signal ?? `exit code ${ended.code}`}); starting it again in ${delay / 1000} s`);
      await wait(delay, stopped.signal);
      if (stopping) return ended;
    }
  })();

  return {
    done,
    get child() {
      return child;
    },
    async stop() {
      if (!stopping) {
        stopping = true;
        stopped.abort();
        if (child && child.exitCode === null && child.signalCode === null) {
          child.kill('SIGTERM');
          const killer = setTimeout(() => child.kill('SIGKILL'), killAfterMs);
          await exitOf(child);
          clearTimeout(killer);
        }
      }
      return done;
    },
  };
}

function pause(ms, signal) {
  return new Promise((resolve) => {
    if (signal.aborted) return resolve();
    const timer = setTimeout(resolve, ms);
    signal.addEventListener('abort', () => {
      clearTimeout(timer);
      resolve();
    }, { once: true });
  });
}
