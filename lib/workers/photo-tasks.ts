/**
 * The photo work done on worker threads (see pool.ts): decoding a photo and measuring regions on it.
 * Both take seconds of CPU on a large photo with many regions; on the main thread they would stop
 * every other request from being answered. Decoded pixels go into a SharedArrayBuffer so the main
 * thread can keep them in its cache and hand them to any worker without copying.
 */
import { runPipeline, type PipelineResult, type ProfileForPipeline, type ReferenceInput } from "../bench/pipeline";
import { ColorInputError } from "../color/errors";
import { decodePhoto, type DecodedPhoto, type RegionSpec } from "../color/regions";

/** Colour-engine refusals cross the thread boundary as data: Error subclasses do not survive it. */
export type TaskResult<T> = { ok: true; value: T } | { ok: false; colourError: string };

export type DecodeTask = { bytes: Uint8Array; maxPixels: number };
export type MeasureTask = {
  photo: DecodedPhoto;
  input: { vials: RegionSpec[]; references: ReferenceInput[]; profile: ProfileForPipeline | null; takenAt?: Date | null };
};

async function refusalsAsData<T>(work: () => Promise<T> | T): Promise<TaskResult<T>> {
  try {
    return { ok: true, value: await work() };
  } catch (error) {
    if (error instanceof ColorInputError) return { ok: false, colourError: error.message };
    throw error;
  }
}

export function decode({ bytes, maxPixels }: DecodeTask): Promise<TaskResult<DecodedPhoto>> {
  return refusalsAsData(async () => {
    const photo = await decodePhoto(bytes, { maxPixels });
    const shared = new SharedArrayBuffer(photo.data.byteLength);
    const data = photo.bitDepth === 16 ? new Uint16Array(shared) : new Uint8Array(shared);
    data.set(photo.data);
    return { ...photo, data };
  });
}

export function measure({ photo, input }: MeasureTask): Promise<TaskResult<PipelineResult>> {
  return refusalsAsData(() => runPipeline(photo, input));
}
