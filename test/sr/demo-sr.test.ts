/**
 * The demo SR in cases/sr/ is what scripts/demo-sr.mjs writes from cases/hypertension-trial.visit.json
 * (a freshness check of a generated file: it repeats the script's own output by design), and it
 * holds no identifying value: its UIDs are invented under the 2.25 root and no name or ID is set.
 */
import { spawnSync } from 'node:child_process';
import { readFileSync } from 'node:fs';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import dcmjs from 'dcmjs';
import { ROOT } from '../cli/fixtures/run-cli.js';

describe('cases/sr/hypertension-trial.sr.dcm', () => {
  it('is fresh (generated file equals the script output; a copy-of-itself check by design)', () => {
    const run = spawnSync(process.execPath, [join(ROOT, 'scripts', 'demo-sr.mjs'), '--check'], { encoding: 'utf8' });
    expect(run.stderr).toBe('');
    expect(run.status).toBe(0);
  });

  it('sets no patient name, ID, birth date, accession number, institution or operator', () => {
    const bytes = readFileSync(join(ROOT, 'cases', 'sr', 'hypertension-trial.sr.dcm'));
    const data = dcmjs.data.DicomMetaDictionary.naturalizeDataset(dcmjs.data.DicomMessage.readFile(bytes.buffer.slice(bytes.byteOffset, bytes.byteOffset + bytes.byteLength) as ArrayBuffer).dict);
    for (const key of ['PatientName', 'PatientID', 'PatientBirthDate', 'AccessionNumber', 'InstitutionName', 'OperatorsName', 'ReferringPhysicianName']) expect(data[key], key).toBeUndefined();
    for (const key of ['StudyInstanceUID', 'SeriesInstanceUID', 'SOPInstanceUID']) expect(String(data[key])).toMatch(/^2\.25\.\d+$/);
  });
});
