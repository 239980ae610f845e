/**
 * Entry file of the photo worker threads (piscina). Plain JavaScript so that it loads the same way
 * under vitest, `next start` and the CLI: Next's build does not compile it, so it loads the
 * TypeScript tasks through tsx at worker start (a few hundred milliseconds, once per thread).
 */
import { tsImport } from "tsx/esm/api";

const tasks = await tsImport("./photo-tasks.ts", import.meta.url);

export function decode(task) {
  return tasks.decode(task);
}

export function measure(task) {
  return tasks.measure(task);
}
