/**
 * `--sr` and `sr-cohort` as a user runs them (the built CLI, spawned). SR
 * files are built with dcmjs from a visit in cases/ and from invented values;
 * the identifying attributes hold invented values that must appear nowhere.
 */
import { existsSync, mkdirSync, mkdtempSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { ROOT, ok, requireBuild, runCli, type CliRun } from '../cli/fixtures/run-cli.js';
import { DCM, IDENTITY_NEEDLES, LN, MOD, SCT, VAL, container, modifier, num, tid5300, writeSr } from './fixtures/build-sr.js';

let dir: string;
beforeAll(() => {
  requireBuild();
  dir = mkdtempSync(join(tmpdir(), 'elastimate-sr-cli-'));
});
afterAll(() => rmSync(dir, { recursive: true, force: true }));

const visit = JSON.parse(readFileSync(join(ROOT, 'cases', 'hypertension-trial.visit.json'), 'utf8')) as Record<string, unknown>;

const section = (site: readonly [string, string, string], items: ReturnType<typeof num>[]) => container(DCM('121070', 'Findings'), [modifier(MOD.site, site), ...items]);
const code = (name: readonly [string, string, string], value: readonly [string, string, string]) => ({
  RelationshipType: 'CONTAINS', ValueType: 'CODE',
  ConceptNameCodeSequence: [{ CodingSchemeDesignator: name[0], CodeValue: name[1], CodeMeaning: name[2] }],
  ConceptCodeSequence: [{ CodingSchemeDesignator: value[0], CodeValue: value[1], CodeMeaning: value[2] }],
});

/**
 * cases/hypertension-trial.visit.json as an echo machine would export it (TID 5200 sections),
 * in other units than the visit file: litres, millimetres, seconds, grams, metres. Cuff
 * pressures as three repeats each (mean 150/93, as the visit's three readings).
 */
function hypertensionTrialSr(path: string): string {
  return writeSr(path, {
    studyDate: '20240311',
    content: [
      container(DCM('121118', 'Patient Characteristics'), [
        code(DCM('121032', 'Subject Sex'), DCM('M', 'Male')),
        num(LN('8302-2', 'Body height'), 1.74, 'm'),
        num(LN('29463-7', 'Body weight'), 88000, 'g'),
        num(LN('8480-6', 'Systolic blood pressure'), 152, 'mm[Hg]'),
        num(LN('8480-6', 'Systolic blood pressure'), 148, 'mm[Hg]'),
        num(LN('8480-6', 'Systolic blood pressure'), 150, 'mm[Hg]'),
        num(LN('8462-4', 'Diastolic blood pressure'), 94, 'mm[Hg]'),
        num(LN('8462-4', 'Diastolic blood pressure'), 92, 'mm[Hg]'),
        num(LN('8462-4', 'Diastolic blood pressure'), 93, 'mm[Hg]'),
      ]),
      section(VAL.lv, [
        num(LN('18026-5', 'Left Ventricular End Diastolic Volume'), 0.118, 'L', [modifier(MOD.method, VAL.biplane)]),
        num(LN('18148-7', 'Left Ventricular End Systolic Volume'), 46, 'ml', [modifier(MOD.method, VAL.biplane)]),
        num(LN('18043-0', 'Left Ventricular Ejection Fraction by US'), 61, '%', [modifier(MOD.method, VAL.biplane)]),
        num(LN('29438-9', 'Left Ventricle Internal Systolic Dimension'), 32, 'mm'),
        num(LN('18156-0', 'Left Ventricle Posterior Wall Systolic Thickness'), 13, 'mm'),
        num(LN('8867-4', 'Heart rate'), 68, '{beats}/min'),
      ]),
      section(VAL.lvot, [num(SCT('399027007', 'Cardiovascular Orifice Diameter'), 21, 'mm'), num(LN('20354-7', 'Velocity Time Integral'), 0.21, 'm')]),
      section(VAL.rvot, [num(LN('20354-7', 'Velocity Time Integral'), 16, 'cm')]),
      section(VAL.aorticValve, [num(LN('59085-1', 'Pre-Ejection Period'), 0.095, 's'), num(LN('20222-6', 'Ejection Time'), 285, 'ms')]),
      section(VAL.mitral, [num(LN('59111-5', 'E Velocity to Annulus E Velocity Ratio'), 11, '{ratio}')]),
    ],
  });
}

/** stderr with wrapped lines joined again (continuation lines are indented by four or more spaces). */
const unwrapped = (stderr: string) => stderr.replace(/\nelastimate: {4,}/g, ' ');

function expectNoIdentity(...texts: string[]): void {
  for (const t of texts) for (const needle of IDENTITY_NEEDLES) expect(t).not.toContain(needle);
}

function expectRefusal(run: CliRun, file: string, reason: RegExp): void {
  expect(run.timedOut).toBe(false);
  expect(run.code).toBe(2);
  expect(run.stdout).toBe('');
  expect(run.stderr).toContain(JSON.stringify(file));
  expect(run.stderr).toMatch(reason);
  expect(run.stderr.trim().split('\n')).toHaveLength(1);
}

describe('assess --sr', () => {
  it('gives the same results as the same visit typed as flags (cases/hypertension-trial.visit.json)', async () => {
    const sr = hypertensionTrialSr(join(dir, 'ht.dcm'));
    const fromSr = ok(await runCli(['assess', '--sr', sr, '--age', String(visit.age), '--json']));
    const typed = ok(await runCli([
      'assess', '--json', '--sbp', '152,148,150', '--dbp', '94,92,93', '--hr', '68', '--edv', '118', '--esv', '46', '--ef', '61',
      '--lvot-diameter', '2.1', '--lvot-vti', '21', '--pep', '95', '--et', '285', '--height', '174', '--weight', '88', '--age', '58',
      '--sex', 'male', '--lvids', '3.2', '--pwts', '1.3', '--e-over-e-prime', '11',
    ]));
    const a = JSON.parse(fromSr.stdout) as { inputs: unknown; results: unknown; flags: unknown; inputSources: Record<string, string> };
    const b = JSON.parse(typed.stdout) as { inputs: unknown; results: unknown; flags: unknown };
    expect(a.inputs).toEqual(b.inputs); // the cuff repeats arrive as three readings each, as typed
    expect(a.results).toEqual(b.results);
    expect(a.flags).toEqual(b.flags);
    expect(a.inputSources.edv).toBe('from DICOM SR LN 18026-5 Left Ventricular End Diastolic Volume, biplane method of disks, study 2024-03-11 (one measurement)');
    expect(a.inputSources.sbp).toMatch(/LN 8480-6 .*mean of 3 measurements/);
    expect(a.inputSources.age).toBeUndefined();
    expect(unwrapped(fromSr.stderr)).toMatch(/identifying attributes? in the file .* ignored/);
    expectNoIdentity(fromSr.stdout, fromSr.stderr);
  });

  it('shows where each value came from in the inputs-as-used view, and a flag overrides the SR', async () => {
    const sr = hypertensionTrialSr(join(dir, 'ht2.dcm'));
    const run = ok(await runCli(['assess', '--sr', sr, '--age', '58', '--edv', '125']));
    const inputs = run.stdout.split('Inputs as used')[1]!.split('\n\n')[0]!.replace(/\n {40,}/g, ' '); // long sources continue on indented lines
    expect(inputs).toMatch(/LV end-diastolic volume\s+125 mL\s+as entered/);
    expect(inputs).toMatch(/LV end-systolic volume\s+46 mL\s+from DICOM SR LN 18148-7 .*study 2024-03-11/);
    expect(inputs).toMatch(/Pre-ejection period\s+95 ms\s+from DICOM SR LN 59085-1/);
    expectNoIdentity(run.stdout, run.stderr);
  });

  it('TAPSE and TR velocity from the SR feed the right-heart coupling (PASP = 4·v² + RAP, simplified Bernoulli)', async () => {
    const sr = writeSr(join(dir, 'rv.dcm'), { studyDate: '20240105', content: tid5300({ edv: 118, esv: 46, ef: 61, tapseMm: 21, trVelocity: 2.6 }) });
    const run = ok(await runCli(['assess', '--sr', sr, '--sbp', '130', '--dbp', '80', '--pep', '95', '--et', '285', '--rap', '5', '--json']));
    const results = JSON.parse(run.stdout).results as Record<string, { value: number | null }>;
    expect(results.pasp!.value).toBeCloseTo(4 * 2.6 * 2.6 + 5, 10); // 32.04 mmHg
    expect(results.tapsePasp!.value).toBeCloseTo(21 / (4 * 2.6 * 2.6 + 5), 10);
    expectNoIdentity(run.stdout, run.stderr);
  });

  it('off a terminal, names every input still missing in one error (PEP and ET are often not in the report)', async () => {
    const sr = writeSr(join(dir, 'nopep.dcm'), { studyDate: '20240105', content: tid5300({ edv: 118, esv: 46, ef: 61 }) });
    const run = await runCli(['assess', '--sr', sr, '--sbp', '120', '--dbp', '80']);
    expect(run.code).toBe(2);
    expect(run.stderr).toMatch(/^elastimate: pep: missing; required/m);
    expect(run.stderr).toMatch(/^elastimate: et: missing; required/m);
    expect(unwrapped(run.stderr)).toMatch(/not in the report: .*Pre-ejection period, Ejection time/);
    expectNoIdentity(run.stdout, run.stderr);
  });

  it('refuses a bad file in one message naming it, exit 2', async () => {
    const bad = join(dir, 'short-date.dcm');
    writeSr(bad, { studyDate: '202', content: tid5300({ edv: 118, esv: 46 }) });
    expectRefusal(await runCli(['assess', '--sr', bad, '--sbp', '120', '--dbp', '80', '--pep', '90', '--et', '290']), bad, /study date is incomplete/);
    const text = join(dir, 'text.dcm');
    writeFileSync(text, 'just text');
    expectRefusal(await runCli(['assess', '--sr', text]), text, /not a DICOM file/);
  });
});

describe('record add --sr', () => {
  it('stores the provenance with the visit, dates the visit by the study, and stores no identifier', async () => {
    const sr = hypertensionTrialSr(join(dir, 'ht3.dcm'));
    const file = join(dir, 'HT-900.subject.json');
    const run = ok(await runCli(['record', 'add', file, '--subject', 'HT-900', '--sr', sr, '--no-input']));
    const stored = readFileSync(file, 'utf8');
    const data = JSON.parse(stored) as { subject: { sex?: string }; visits: { date: string; inputs: Record<string, unknown>; sources: Record<string, Record<string, string>> }[] };
    expect(data.visits[0]!.date).toBe('2024-03-11');
    expect(data.subject.sex).toBe('male');
    expect(data.visits[0]!.sources.edv).toEqual({ from: 'DICOM SR', code: 'LN 18026-5', meaning: 'Left Ventricular End Diastolic Volume', method: 'biplane method of disks', studyDate: '2024-03-11', how: 'one measurement' });
    expect(data.visits[0]!.inputs.lvotDiameter).toBe(2.1);
    expectNoIdentity(stored, run.stdout, run.stderr);
    const shown = ok(await runCli(['record', 'show', file, '--json']));
    expectNoIdentity(shown.stdout);
    // An edited input loses its source; the others keep theirs.
    ok(await runCli(['record', 'edit', file, '1', '--edv', '125', '--yes']));
    const edited = JSON.parse(readFileSync(file, 'utf8')) as typeof data;
    expect(edited.visits[0]!.sources.edv).toBeUndefined();
    expect(edited.visits[0]!.sources.esv?.code).toBe('LN 18148-7');
  });

  it('writes nothing when the SR is refused', async () => {
    const file = join(dir, 'HT-901.subject.json');
    const bad = join(dir, 'image.dcm');
    writeSr(bad, { studyDate: '20240105', content: tid5300({ edv: 118, esv: 46 }), sopClass: '1.2.840.10008.5.1.4.1.1.6.1', modality: 'US' });
    expectRefusal(await runCli(['record', 'add', file, '--subject', 'HT-901', '--sr', bad, '--no-input']), bad, /not a structured report/);
    expect(existsSync(file)).toBe(false);
  });
});

describe('sr-cohort', () => {
  it('one row per study (files grouped by study), ids from the user\'s map, readable by batch, no identifier written', async () => {
    const folder = join(dir, 'cohort');
    mkdirSync(folder);
    // Study A in two files (volumes; Doppler and timing), study B in one.
    const cuff = container(DCM('121118', 'Patient Characteristics'), [
      num(LN('8480-6', 'Systolic blood pressure'), 152, 'mm[Hg]'), num(LN('8480-6', 'Systolic blood pressure'), 148, 'mm[Hg]'),
      num(LN('8462-4', 'Diastolic blood pressure'), 94, 'mm[Hg]'), num(LN('8462-4', 'Diastolic blood pressure'), 92, 'mm[Hg]'),
    ]);
    writeSr(join(folder, 'a1.dcm'), { studyDate: '20240105', studyUid: '1.2.826.0.1.3680043.99.424242.10', instance: 1, content: [...tid5300({ edv: 118, esv: 46, ef: 61 }), cuff] });
    writeSr(join(folder, 'a2.dcm'), { studyDate: '20240105', studyUid: '1.2.826.0.1.3680043.99.424242.10', instance: 2, content: tid5300({ edv: 120, esv: 46, lvotDiameterMm: 21, pepMs: 95 }) });
    writeSr(join(folder, 'b1.dcm'), { studyDate: '20231120', studyUid: '1.2.826.0.1.3680043.99.424242.11', instance: 3, content: tid5300({ edv: 150, esv: 80 }) });
    const ids = join(dir, 'ids.csv');
    writeFileSync(ids, 'file,subject\na1.dcm,CO-301\na2.dcm,CO-301\nb1.dcm,CO-302\n');
    const out = join(dir, 'cohort.csv');
    const run = ok(await runCli(['sr-cohort', folder, '--ids', ids, '--out', out]));
    const csv = readFileSync(out, 'utf8');
    const lines = csv.trim().split('\r\n');
    expect(lines[0]).toMatch(/^subject,visit_date,edv,esv,ef,sv,lvot-diameter,lvot-vti,pep,et,hr,lvids,pwts,e-over-e-prime,/);
    expect(lines).toHaveLength(3);
    expect(lines[1]).toMatch(/^CO-302,2023-11-20,150,80,/);
    expect(lines[2]).toMatch(/^CO-301,2024-01-05,119,46,61,,2\.1,,95,/); // EDV 118 and 120 (1.7 % apart): their mean
    expect(lines[2]).toMatch(/,152;148,94;92,/); // cuff repeats as readings, the way batch reads them
    expectNoIdentity(csv, run.stdout, run.stderr);
    // batch reads it: rows without cuff pressures, PEP or ET get their reason, none is misread.
    // A formula-looking id in the user's map, or a file that is not an SR: one message, nothing written.
    const badIds = join(dir, 'bad-ids.csv');
    writeFileSync(badIds, 'file,subject\na1.dcm,=HYPERLINK("x")\n');
    const out2 = join(dir, 'cohort2.csv');
    const refused = await runCli(['sr-cohort', folder, '--ids', badIds, '--out', out2]);
    expect(refused.code).toBe(2);
    expect(refused.stderr).toMatch(/^elastimate: ids row 2: got .*accepted: a pseudonymous id/);
    // --out over the id map it reads: refused, the map untouched.
    const overIds = await runCli(['sr-cohort', folder, '--ids', ids, '--out', ids]);
    expect(overIds.code).toBe(2);
    expect(overIds.stderr).toMatch(/^elastimate: out: /);
    expect(readFileSync(ids, 'utf8')).toBe('file,subject\na1.dcm,CO-301\na2.dcm,CO-301\nb1.dcm,CO-302\n');
    writeFileSync(join(folder, 'readme.txt'), 'not a report');
    const withText = await runCli(['sr-cohort', folder, '--out', out2]);
    expectRefusal(withText, join(folder, 'readme.txt'), /not a DICOM file/);
    expect(existsSync(out2)).toBe(false);
    const batch = await runCli(['batch', out]);
    expect(batch.code).toBe(0);
    expect(batch.stdout.split('\r\n')[0]).toMatch(/^subject,visit_date,edv/);
  });
});
