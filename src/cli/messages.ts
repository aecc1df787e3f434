/**
 * Lines for the user on stderr. Kept free of heavy imports so that `batch` can use them without
 * loading the subject-file schema (zod). A message may quote user text (a subject id, a file
 * name): its control characters are made visible by the one sanitiser, one line per message.
 */
import { sanitizeText } from '../text/sanitize.js';

export function warn(message: string): void {
  process.stderr.write(`elastimate: warning: ${sanitizeText(message)}\n`);
}

export function info(message: string): void {
  process.stderr.write(`elastimate: ${sanitizeText(message)}\n`);
}
