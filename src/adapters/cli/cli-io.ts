/** Where a CLI invocation runs and writes: the process's own streams in bin/, buffers in tests. */
export interface CliIo {
  readonly cwd: string
  readonly stdout: (text: string) => void
  readonly stderr: (text: string) => void
  /** stderr is a terminal: progress redraws one line instead of printing many. */
  readonly isTty: boolean
}
