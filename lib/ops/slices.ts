/**
 * Long synchronous work spread over event-loop turns: `steps` is a generator that yields often (every
 * few thousand rows); each turn runs it for up to `sliceMs`, then lets other callbacks (HTTP requests,
 * timers) run before the next turn. `finishNow()` runs the rest at once, for a caller that cannot wait
 * asynchronously; `done` settles with the generator's result either way.
 */
export type Sliced<T> = { done: Promise<T>; finishNow(): T; readonly finished: boolean };

export function runInSlices<T>(steps: Generator<unknown, T>, { sliceMs = 8 }: { sliceMs?: number } = {}): Sliced<T> {
  let outcome: { value: T } | { error: unknown } | undefined;
  let settle!: { resolve: (v: T) => void; reject: (e: unknown) => void };
  const done = new Promise<T>((resolve, reject) => (settle = { resolve, reject }));
  // A caller of finishNow() gets the error itself; `done` must not also count as unhandled then.
  done.catch(() => undefined);

  const advance = (until: number): boolean => {
    try {
      for (;;) {
        const r = steps.next();
        if (r.done) {
          outcome = { value: r.value };
          settle.resolve(r.value);
          return true;
        }
        if (performance.now() >= until) return false;
      }
    } catch (error) {
      outcome = { error };
      settle.reject(error);
      return true;
    }
  };
  const turn = () => {
    if (outcome || advance(performance.now() + sliceMs)) return;
    setImmediate(turn);
  };
  setImmediate(turn);

  return {
    done,
    get finished() {
      return outcome !== undefined;
    },
    finishNow() {
      if (!outcome) advance(Number.POSITIVE_INFINITY);
      if (outcome && "value" in outcome) return outcome.value;
      throw (outcome as { error: unknown }).error;
    },
  };
}
