/**
 * lib/ops/slices: long work spread over event-loop turns, finished at once on demand. Behaviour checks
 * only (common practice, no source).
 */
import { describe, expect, it } from "vitest";
import { runInSlices } from "@/lib/ops/slices";

function* counting(steps: number, fail = false): Generator<void, number> {
  for (let i = 0; i < steps; i++) yield;
  if (fail) throw new Error("broken step");
  return steps;
}

describe("runInSlices", () => {
  it("runs a step per turn with a zero slice, letting other callbacks run in between", async () => {
    const sliced = runInSlices(counting(5), { sliceMs: 0 });
    let others = 0;
    const tick = () => {
      others++;
      if (!sliced.finished) setImmediate(tick);
    };
    setImmediate(tick);
    expect(await sliced.done).toBe(5);
    expect(sliced.finished).toBe(true);
    expect(others).toBeGreaterThanOrEqual(5);
  });

  it("finishNow() completes the same run at once and `done` settles with its value", async () => {
    const sliced = runInSlices(counting(1000), { sliceMs: 0 });
    await new Promise((r) => setImmediate(r));
    expect(sliced.finished).toBe(false);
    expect(sliced.finishNow()).toBe(1000);
    expect(sliced.finishNow()).toBe(1000);
    expect(await sliced.done).toBe(1000);
  });

  it("hands a failing step's error to finishNow() and to `done`", async () => {
    const sliced = runInSlices(counting(3, true), { sliceMs: 0 });
    expect(() => sliced.finishNow()).toThrow("broken step");
    await expect(sliced.done).rejects.toThrow("broken step");
  });
});
