/**
 * Lines for the user on stderr. Kept free of heavy imports so that `batch` can use them without
 * loading the subject-file schema (zod).
 */
export function warn(message: string): void {
  process.stderr.write(`elastimate: warning: ${message}\n`);
}

export function info(message: string): void {
  process.stderr.write(`elastimate: ${message}\n`);
}
