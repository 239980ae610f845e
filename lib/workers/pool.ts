/**
 * The worker pool for photo decoding and region statistics (piscina). The worker file is found from
 * the project folder (process.cwd()), not from this module's URL: under `next build` this module is
 * bundled into .next/server while the worker file stays where it is in the source tree.
 */
import os from "node:os";
import path from "node:path";
import { pathToFileURL } from "node:url";
import { Piscina } from "piscina";
import type { PipelineResult } from "../bench/pipeline";
import { ColorInputError } from "../color/errors";
import type { DecodedPhoto } from "../color/regions";
import type { DecodeTask, MeasureTask, TaskResult } from "./photo-tasks";

export const PHOTO_WORKER_FILE = path.join(process.cwd(), "lib", "workers", "photo-worker.mjs");

let pool: Piscina | undefined;

function photoPool(): Piscina {
  // One core stays with the main thread, which keeps answering requests; at least one worker.
  pool ??= new Piscina({
    filename: pathToFileURL(PHOTO_WORKER_FILE).href,
    maxThreads: Math.max(1, Math.min(4, os.availableParallelism() - 1)),
    minThreads: 0,
    idleTimeout: 60_000,
  });
  return pool;
}

function unwrap<T>(result: TaskResult<T>): T {
  if (!result.ok) throw new ColorInputError(result.colourError);
  return result.value;
}

/** Decodes on a worker; the pixels come back in shared memory. Throws ColorInputError as decodePhoto does. */
export async function decodeOnWorker(task: DecodeTask): Promise<DecodedPhoto> {
  return unwrap(await photoPool().run(task, { name: "decode" }));
}

/** Region statistics and the colour pipeline on a worker. Throws ColorInputError as runPipeline does. */
export async function measureOnWorker(task: MeasureTask): Promise<PipelineResult> {
  return unwrap(await photoPool().run(task, { name: "measure" }));
}

/** Stops the workers (tests, shutdown). */
export async function closePhotoPool(): Promise<void> {
  const p = pool;
  pool = undefined;
  await p?.destroy();
}
