/**
 * A counting semaphore: at most `limit` tasks run at once; the others wait in arrival order.
 *
 * Our own rather than a library: the need is these few lines, and p-limit or similar is not among
 * the dependencies (adding one is the owner's call). A released slot passes straight to the next
 * waiter, so the count never drops below the number of running tasks.
 */
export type Semaphore = <T>(task: () => Promise<T>) => Promise<T>

export function createSemaphore(limit: number): Semaphore {
  if (!Number.isInteger(limit) || limit < 1) throw new RangeError(`createSemaphore needs a whole number >= 1, got ${limit}`)
  let running = 0
  const waiting: Array<() => void> = []
  const acquire = (): Promise<void> => {
    if (running < limit) {
      running++
      return Promise.resolve()
    }
    return new Promise((resolve) => waiting.push(resolve))
  }
  const release = () => {
    const next = waiting.shift()
    if (next) next()
    else running--
  }
  return async (task) => {
    await acquire()
    try {
      return await task()
    } finally {
      release()
    }
  }
}
