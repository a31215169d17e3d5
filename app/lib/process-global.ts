// A value kept once per process, across module reloads: the dev server and the test runner
// load a module again, and a second database pool, job client or sign-in instance would leak
// connections or lose what was plugged in.
export function processGlobal<T>(name: string) {
  const holder = globalThis as unknown as Record<string, T | undefined>;
  const key = `__dipwell_${name}`;
  return {
    get: (): T | undefined => holder[key],
    set: (value: T | undefined) => {
      holder[key] = value;
    },
    /** The value, made by `make` the first time it is asked for. */
    once: (make: () => T): T => (holder[key] ??= make()),
  };
}
