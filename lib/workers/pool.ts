/**
 * The worker pool for photo decoding and region statistics (piscina). Next's build does not compile a
 * worker file, and loading TypeScript through a loader in every thread took seconds, so on first use
 * the tasks (photo-tasks.ts and what it imports) are bundled by esbuild into one ES module under
 * node_modules/.cache/solvatlas (packages stay external and resolve from node_modules). Paths start
 * from the project folder (process.cwd()): under `next start` this module runs from .next/server.
 */
import { createHash } from "node:crypto";
import fs from "node:fs";
import { createRequire } from "node:module";
import os from "node:os";
import path from "node:path";
import { pathToFileURL } from "node:url";
import { Piscina } from "piscina";
import type { PipelineResult } from "../bench/pipeline";
import { ColorInputError } from "../color/errors";
import type { DecodedPhoto } from "../color/regions";
import type { DecodeTask, MeasureTask, TaskResult } from "./photo-tasks";

export const PHOTO_TASKS_SOURCE = path.join(process.cwd(), "lib", "workers", "photo-tasks.ts");

type Esbuild = { buildSync(options: Record<string, unknown>): { outputFiles: { text: string }[] } };

/** Bundles the tasks once per content; the file name carries its hash, written via a temporary file. */
function workerFile(): string {
  const esbuild = createRequire(path.join(process.cwd(), "package.json"))("esbuild") as Esbuild;
  const { outputFiles } = esbuild.buildSync({
    entryPoints: [PHOTO_TASKS_SOURCE],
    bundle: true,
    platform: "node",
    format: "esm",
    target: "node20",
    packages: "external",
    write: false,
    logLevel: "silent",
  });
  const text = outputFiles[0].text;
  const dir = path.join(process.cwd(), "node_modules", ".cache", "solvatlas");
  const file = path.join(dir, `photo-worker-${createHash("sha256").update(text).digest("hex").slice(0, 16)}.mjs`);
  if (!fs.existsSync(file)) {
    fs.mkdirSync(dir, { recursive: true });
    const temp = `${file}.${process.pid}.tmp`;
    fs.writeFileSync(temp, text);
    fs.renameSync(temp, file);
  }
  return file;
}

let pool: Piscina | undefined;

function photoPool(): Piscina {
  // One core stays with the main thread, which keeps answering requests; at least one worker.
  pool ??= new Piscina({
    filename: pathToFileURL(workerFile()).href,
    maxThreads: Math.max(1, Math.min(4, os.availableParallelism() - 1)),
    minThreads: 0,
    // Starting a thread (sharp, the colour code) costs seconds on a busy machine: keep it a while.
    idleTimeout: 10 * 60_000,
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
