import { existsSync, mkdtempSync, readFileSync, readdirSync, rmSync, statSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterEach, beforeEach, describe, expect, it } from 'vitest';
import { InputError } from '../../src/errors.js';
import type { SchemaVersions } from '../../src/records/migrations.js';
import { FILE_MODE, backupStamp, readSubjectFile, readSubjectFileIfExists, updateSubjectFile } from '../../src/records/store.js';
import { CURRENT_SCHEMA_VERSION, newSubjectFile, type SubjectFile, type Visit } from '../../src/records/subject-schema.js';

let dir: string;
beforeEach(() => {
  dir = mkdtempSync(join(tmpdir(), 'elastimate-store-'));
});
afterEach(() => {
  rmSync(dir, { recursive: true, force: true });
});

const NOW = new Date('2024-06-03T10:11:12.345Z');
const visit = (date: string, note?: string): Visit => ({ date, inputs: { sbp: 120, dbp: 80, edv: 120, esv: 50, pep: 90, et: 290 }, ...(note ? { note } : {}) });
const addVisit = (v: Visit) => (current: SubjectFile | null): SubjectFile => {
  const base = current ?? newSubjectFile({ id: 'ST-001' });
  return { ...base, visits: [...base.visits, v] };
};

function expectRefused(path: string, pattern: RegExp): void {
  const before = readFileSync(path);
  let error: unknown;
  try {
    readSubjectFile(path);
  } catch (err) {
    error = err;
  }
  expect(error).toBeInstanceOf(InputError);
  expect((error as Error).message).toMatch(pattern);
  expect((error as Error).message).toContain(path);
  // Byte for byte untouched (Buffer comparison).
  expect(readFileSync(path).equals(before)).toBe(true);
}

async function expectUpdateRefused(path: string, pattern: RegExp): Promise<void> {
  const before = readFileSync(path);
  await expect(updateSubjectFile(path, addVisit(visit('2024-07-01')), { now: NOW })).rejects.toThrow(pattern);
  expect(readFileSync(path).equals(before)).toBe(true);
  expect(readdirSync(dir).filter((f) => f.endsWith('.bak'))).toEqual([]);
  expect(existsSync(`${path}.lock`)).toBe(false);
}

describe('subject file store', () => {
  it('creates a file readable and writable by its owner only (mode 0600)', async () => {
    const path = join(dir, 'st-001.subject.json');
    const result = await updateSubjectFile(path, addVisit(visit('2024-01-10')), { now: NOW });
    expect(result.created).toBe(true);
    expect(statSync(path).mode & 0o777).toBe(FILE_MODE);
    expect(FILE_MODE).toBe(0o600);
    expect(readSubjectFile(path).visits).toHaveLength(1);
    expect(existsSync(`${path}.lock`)).toBe(false);
  });

  it('keeps the mode of an existing file and writes a 0600 backup of the exact old bytes when asked', async () => {
    const path = join(dir, 's.json');
    await updateSubjectFile(path, addVisit(visit('2024-01-10')), { now: NOW });
    const { chmodSync } = await import('node:fs');
    chmodSync(path, 0o640);
    const before = readFileSync(path);
    const result = await updateSubjectFile(path, addVisit(visit('2024-02-10')), { now: NOW, backup: true });
    expect(statSync(path).mode & 0o777).toBe(0o640);
    expect(result.backups).toHaveLength(1);
    const backup = result.backups[0]!;
    expect(backup).toBe(`${path}.${backupStamp(NOW)}.bak`);
    expect(backupStamp(NOW)).toBe('20240603T101112Z');
    expect(readFileSync(backup).equals(before)).toBe(true);
    expect(statSync(backup).mode & 0o777).toBe(0o600);
    // A second backup in the same second gets its own name; nothing is overwritten.
    const again = await updateSubjectFile(path, addVisit(visit('2024-03-10')), { now: NOW, backup: true });
    expect(again.backups[0]).toBe(`${path}.${backupStamp(NOW)}-2.bak`);
    expect(readSubjectFile(backup).visits).toHaveLength(1);
  });

  it('refuses a file written by a newer version, leaving its bytes unchanged', async () => {
    const path = join(dir, 'newer.json');
    writeFileSync(path, JSON.stringify({ format: 'elastimate-subject', schemaVersion: CURRENT_SCHEMA_VERSION + 1, subject: { id: 'ST-002' }, visits: [], extra: 'from the future' }, null, 1));
    expectRefused(path, /schemaVersion: got 2; written by a newer elastimate/);
    await expectUpdateRefused(path, /newer elastimate/);
  });

  it('refuses a file that is not JSON (truncated mid-write elsewhere), leaving its bytes unchanged', async () => {
    const path = join(dir, 'broken.json');
    writeFileSync(path, '{"format": "elastimate-subject", "schemaVersion": 1, "subject": {"id": "ST-0');
    expectRefused(path, /not valid JSON.*left untouched/);
    await expectUpdateRefused(path, /not valid JSON/);
  });

  it('refuses a file that fails the schema, naming where, leaving its bytes unchanged', async () => {
    const path = join(dir, 'bad-date.json');
    writeFileSync(path, JSON.stringify({ format: 'elastimate-subject', schemaVersion: 1, subject: { id: 'ST-003' }, visits: [{ date: '2024-02-30', inputs: { sbp: 120 } }] }));
    expectRefused(path, /visits\[0\]\.date: got "2024-02-30"; fails the subject-file schema.*calendar date/);
    await expectUpdateRefused(path, /visits\[0\]\.date/);
  });

  it('refuses unknown keys, a wrong format tag and a non-integer version', async () => {
    const unknown = join(dir, 'unknown.json');
    writeFileSync(unknown, JSON.stringify({ format: 'elastimate-subject', schemaVersion: 1, subject: { id: 'ST-004', name: 'someone' }, visits: [] }));
    expectRefused(unknown, /unknown key name/);
    // The message names what is there, never "missing" for a key that is present (regression).
    expectRefused(unknown, /subject: got "name"; fails the subject-file schema \(unknown key name\)/);
    const wrongShape = join(dir, 'wrong-shape.json');
    writeFileSync(wrongShape, JSON.stringify({ format: 'elastimate-subject', schemaVersion: 1, subject: { id: 'ST-006' }, visits: { date: '2024-01-01' } }));
    expectRefused(wrongShape, /visits: got an object; fails the subject-file schema/);
    const other = join(dir, 'other.json');
    writeFileSync(other, JSON.stringify({ format: 'elastimate-visit', sbp: 120 }));
    expectRefused(other, /format: got "elastimate-visit"/);
    const fractional = join(dir, 'fractional.json');
    writeFileSync(fractional, JSON.stringify({ format: 'elastimate-subject', schemaVersion: 1.5, subject: { id: 'ST-005' }, visits: [] }));
    expectRefused(fractional, /schemaVersion: got 1.5/);
  });

  it('names a missing file, and reports none when asked whether it exists', () => {
    expect(() => readSubjectFile(join(dir, 'nope.json'))).toThrow(/file not found/);
    expect(readSubjectFileIfExists(join(dir, 'nope.json'))).toBeNull();
  });

  it('abandons a change when the update throws, writing nothing', async () => {
    const path = join(dir, 's.json');
    await updateSubjectFile(path, addVisit(visit('2024-01-10')), { now: NOW });
    const before = readFileSync(path);
    await expect(
      updateSubjectFile(path, () => {
        throw new InputError({ field: 'visit', value: '"9"', accepted: 'a visit number 1–1' });
      }, { now: NOW, backup: true }),
    ).rejects.toThrow(/visit: got "9"/);
    expect(readFileSync(path).equals(before)).toBe(true);
    expect(existsSync(`${path}.lock`)).toBe(false);
  });

  it('serialises writers inside one process too: twenty parallel updates all land', async () => {
    const path = join(dir, 'many.json');
    await Promise.all(Array.from({ length: 20 }, (_v, i) => updateSubjectFile(path, addVisit(visit('2024-01-10', `writer ${i}`)), { now: NOW })));
    const notes = readSubjectFile(path).visits.map((v) => v.note).sort();
    expect(notes).toEqual(Array.from({ length: 20 }, (_v, i) => `writer ${i}`).sort());
  });

  it('migrates an older schema version in memory on read and on write, keeping a backup of the old bytes', async () => {
    // A made-up version 2 for this test only: it adds a `note` to visits that lack one.
    const versions: SchemaVersions = {
      current: 2,
      migrations: [{ from: 1, describe: 'every visit gets a note', migrate: (doc) => ({ ...doc, visits: (doc.visits as Visit[]).map((v) => ({ note: 'migrated', ...v })) }) }],
    };
    const path = join(dir, 'old.json');
    writeFileSync(path, JSON.stringify({ format: 'elastimate-subject', schemaVersion: 1, subject: { id: 'ST-006' }, visits: [visit('2024-01-10')] }));
    const oldBytes = readFileSync(path);
    const read = readSubjectFile(path, { versions });
    expect(read.schemaVersion).toBe(2);
    expect(read.visits[0]!.note).toBe('migrated');
    expect(readFileSync(path).equals(oldBytes)).toBe(true); // reading never writes
    const result = await updateSubjectFile(path, addVisit(visit('2024-02-10')), { now: NOW, versions });
    expect(result.migrated.map((m) => m.describe)).toEqual(['every visit gets a note']);
    expect(result.backups).toEqual([`${path}.${backupStamp(NOW)}.v1.bak`]);
    expect(readFileSync(result.backups[0]!).equals(oldBytes)).toBe(true);
    const written = JSON.parse(readFileSync(path, 'utf8')) as SubjectFile;
    expect(written.schemaVersion).toBe(2);
    expect(written.visits.map((v) => v.note)).toEqual(['migrated', undefined]);
    // A file of version 3 is newer than this (test) build: refused, untouched.
    writeFileSync(path, JSON.stringify({ ...written, schemaVersion: 3 }));
    expect(() => readSubjectFile(path, { versions })).toThrow(/reads up to version 2/);
  });

  it('says when the folder does not exist', async () => {
    await expect(updateSubjectFile(join(dir, 'missing', 's.json'), addVisit(visit('2024-01-10')), { now: NOW })).rejects.toThrow(/does not exist/);
  });
});
