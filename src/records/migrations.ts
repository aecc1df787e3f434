/**
 * Upgrading subject files written by older versions. Each migration takes a
 * parsed document of schema version `from` to version `from + 1`. Reading
 * migrates in memory only; the store writes the upgraded form (keeping a
 * backup of the old bytes) the next time the file is changed.
 *
 * Version 1 is the first published version, so the list is empty today; the
 * machinery is exercised in test/records/store.test.ts with a migration
 * defined there. Add a step here when the format changes, and bump
 * CURRENT_SCHEMA_VERSION in ./subject-schema.ts.
 */
import { CURRENT_SCHEMA_VERSION } from './subject-schema.js';

export interface Migration {
  from: number;
  /** One line for the backup notice, e.g. "moved height to the subject". */
  describe: string;
  migrate(doc: Record<string, unknown>): Record<string, unknown>;
}

export interface SchemaVersions {
  /** The version this build writes. */
  current: number;
  migrations: readonly Migration[];
}

export const SUBJECT_MIGRATIONS: readonly Migration[] = [];

export const SUBJECT_VERSIONS: SchemaVersions = { current: CURRENT_SCHEMA_VERSION, migrations: SUBJECT_MIGRATIONS };

/**
 * Bring a document from `from` up to `versions.current`. Throws a plain Error
 * when a step is missing (a programming error, not bad input).
 */
export function migrateDocument(doc: Record<string, unknown>, from: number, versions: SchemaVersions): { doc: Record<string, unknown>; applied: Migration[] } {
  let current = doc;
  const applied: Migration[] = [];
  for (let v = from; v < versions.current; v++) {
    const step = versions.migrations.find((m) => m.from === v);
    if (!step) throw new Error(`no migration from subject-file schema version ${v} to ${v + 1}`);
    current = { ...step.migrate(current), schemaVersion: v + 1 };
    applied.push(step);
  }
  return { doc: current, applied };
}
