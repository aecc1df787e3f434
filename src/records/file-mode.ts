/**
 * Owner read and write only: subject files, exports, batch results, reports and diagrams.
 * A module of its own, free of the subject-file schema, so `batch` can use it without loading zod.
 */
export const FILE_MODE = 0o600;
