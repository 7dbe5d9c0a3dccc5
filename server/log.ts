/** A minimal logger: info to stdout (silent when quiet), errors to stderr with their stack. */
export interface Logger {
  info(message: string): void;
  error(message: string, err?: unknown): void;
}

export function createLogger(quiet: boolean): Logger {
  return {
    info: (message) => { if (!quiet) console.log(message); },
    error: (message, err) => {
      const detail = err instanceof Error ? (err.stack ?? err.message) : err === undefined ? '' : String(err);
      console.error(detail ? `${message}\n${detail}` : message);
    },
  };
}
