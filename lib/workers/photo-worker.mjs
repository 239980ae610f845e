/**
 * Entry file of the photo worker threads (piscina). Plain JavaScript so that it loads the same way
 * under vitest, `next start` and the CLI: Next's build does not compile it, so it loads the
 * TypeScript tasks through tsx at worker start (a few hundred milliseconds, once per thread).
 */
import os from "node:os";
import { tsImport } from "tsx/esm/api";

// On Linux a priority set with pid 0 applies to the calling thread only (setpriority(2), "BUGS"):
// the photo work yields the CPU to the main thread, which answers everyone else's requests.
try {
  os.setPriority(0, os.constants.priority.PRIORITY_BELOW_NORMAL);
} catch {
  /* not permitted or not supported: run at normal priority */
}

const tasks = await tsImport("./photo-tasks.ts", import.meta.url);

export function decode(task) {
  return tasks.decode(task);
}

export function measure(task) {
  return tasks.measure(task);
}
