/** Timings of named stages on a clock the adapter passes in (the core reads no clock itself). */
export interface Stopwatch {
  time<T>(label: string, work: () => Promise<T>): Promise<T>
  readonly timings: Readonly<Record<string, number>>
}

/** Without a clock every stage runs untimed and `timings` stays empty. */
export function createStopwatch(now?: () => number): Stopwatch {
  const timings: Record<string, number> = {}
  return {
    timings,
    async time(label, work) {
      const start = now?.()
      const value = await work()
      if (now && start !== undefined) timings[label] = now() - start
      return value
    },
  }
}
