/**
 * DICOM SR import, in process: SR files built with dcmjs from invented values
 * (test/sr/fixtures/build-sr.ts), read back through src/sr. The expected
 * values come from the unit definitions (1 L = 1000 mL, 1 cm = 10 mm,
 * 1 s = 1000 ms, 1 kg = 1000 g: SI) and from the template rules of DICOM
 * PS3.16 (finding site tells LVOT from RVOT; TID 5300 codes carry the method).
 */
import { execFileSync } from 'node:child_process';
import { closeSync, mkdtempSync, openSync, ftruncateSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';
import dcmjs from 'dcmjs';
import { NUMERIC_FIELDS } from '../../src/assessment/fields.js';
import { RawInputsSchema } from '../../src/assessment/inputs.js';
import { InputError } from '../../src/errors.js';
import { importStudy, type SrImport } from '../../src/sr/import.js';
import { MAX_SR_BYTES, parseSr, readSrFile } from '../../src/sr/read-dicom.js';
import { DCM, LN, MOD, SCT, VAL, buildSr, container, modifier, num, text, tid5300, writeSr } from './fixtures/build-sr.js';

const dir = mkdtempSync(join(tmpdir(), 'elastimate-sr-'));
afterAll(() => rmSync(dir, { recursive: true, force: true }));

const options = {
  inputKeys: new Set(Object.keys(RawInputsSchema.shape).filter((k) => k !== 'errors')),
  inputUnits: new Map(NUMERIC_FIELDS.map((f) => [f.key, f.unit])),
};

function load(content: ReturnType<typeof container>[], extra: Parameters<typeof buildSr>[0] extends infer O ? Partial<O> : never = {}) {
  return parseSr('test.dcm', buildSr({ studyDate: '20240105', content, ...extra }), dcmjs);
}
async function importOne(content: ReturnType<typeof container>[], decide?: Parameters<typeof importStudy>[1]['decide']): Promise<SrImport> {
  return importStudy([load(content)], { ...options, ...(decide ? { decide } : {}) });
}

const LV = DCM('121070', 'Findings');
/** A TID 5200-style section: a container with a finding-site modifier. */
function section(site: readonly [string, string, string], items: ReturnType<typeof num>[]) {
  return container(LV, [modifier(MOD.site, site), ...items]);
}

describe('TID 5200 (post-coordinated codes with modifiers)', () => {
  it('reads values by concept and finding site, converting L → mL, mm → cm, s → ms, g → kg, m → cm (SI definitions)', async () => {
    const r = await importOne([
      container(DCM('121118', 'Patient Characteristics'), [
        { RelationshipType: 'CONTAINS', ValueType: 'CODE', ConceptNameCodeSequence: [{ CodeValue: '121032', CodingSchemeDesignator: 'DCM', CodeMeaning: 'Subject Sex' }], ConceptCodeSequence: [{ CodeValue: 'F', CodingSchemeDesignator: 'DCM', CodeMeaning: 'Female' }] },
        num(LN('8302-2', 'Body height'), 1.62, 'm'),
        num(LN('29463-7', 'Body weight'), 61500, 'g'),
      ]),
      section(VAL.lv, [
        num(LN('18026-5', 'Left Ventricular End Diastolic Volume'), 0.118, 'L', [modifier(MOD.method, VAL.biplane)]),
        num(LN('18148-7', 'Left Ventricular End Systolic Volume'), 46, 'ml', [modifier(MOD.method, VAL.biplane)]),
        num(LN('29438-9', 'Left Ventricle Internal Systolic Dimension'), 32, 'mm'),
      ]),
      section(VAL.lvot, [num(SCT('399027007', 'Cardiovascular Orifice Diameter'), 21, 'mm'), num(LN('20354-7', 'Velocity Time Integral'), 21, 'cm')]),
      section(VAL.rvot, [num(LN('20354-7', 'Velocity Time Integral'), 15, 'cm')]),
      section(VAL.aorticValve, [num(LN('59085-1', 'Pre-Ejection Period'), 0.095, 's'), num(LN('20222-6', 'Ejection Time'), 285, 'ms')]),
    ]);
    expect(r.raw).toMatchObject({ edv: 118, esv: 46, lvids: 3.2, lvotDiameter: 2.1, lvotVti: 21, pep: 95, et: 285, height: 162, weight: 61.5, sex: 'female' });
    expect(r.sources.edv).toMatchObject({ code: 'LN 18026-5', method: 'biplane method of disks', studyDate: '2024-01-05', how: 'one measurement' });
    expect(r.sources.lvotVti?.code).toBe('LN 20354-7');
    expect(r.studyDate).toBe('2024-01-05');
  });

  it('reads legacy SNOMED-RT codes (scheme SRT) as their SNOMED CT concepts (PS3.16 mapping)', async () => {
    const srt = (code: string, meaning: string) => ['SRT', code, meaning] as const;
    const r = await importOne([
      container(LV, [modifier(srt('G-C0E3', 'Finding Site'), srt('T-32650', 'Left Ventricle Outflow Tract')), num(srt('G-038F', 'Cardiovascular Orifice Diameter'), 2.2, 'cm'), num(LN('20354-7', 'Velocity Time Integral'), 19, 'cm')]),
      container(LV, [modifier(srt('G-C0E3', 'Finding Site'), srt('T-32550', 'Right Ventricle Outflow Tract')), num(LN('20354-7', 'Velocity Time Integral'), 14, 'cm')]),
    ]);
    expect([r.raw.lvotDiameter, r.raw.lvotVti]).toEqual([2.2, 19]);
  });

  it('tells the LVOT VTI from the RVOT VTI by the finding site: an RVOT VTI alone is not an LVOT VTI', async () => {
    const r = await importOne([section(VAL.lv, [num(LN('18026-5', 'LVEDV'), 120, 'mL'), num(LN('18148-7', 'LVESV'), 50, 'mL')]), section(VAL.rvot, [num(LN('20354-7', 'Velocity Time Integral'), 15, 'cm')])]);
    expect(r.raw.lvotVti).toBeUndefined();
    expect(r.notFound).toContain('LVOT velocity–time integral');
  });

  it('takes the TR peak velocity only with the tricuspid site and regurgitant flow direction', async () => {
    const tr = num(LN('11726-7', 'Peak Systolic Velocity'), 280, 'cm/s', [modifier(MOD.flow, VAL.regurgitant)]);
    const forward = num(LN('11726-7', 'Peak Systolic Velocity'), 60, 'cm/s'); // tricuspid inflow: no regurgitant flow direction
    const mitral = num(LN('11726-7', 'Peak Systolic Velocity'), 510, 'cm/s', [modifier(MOD.flow, VAL.regurgitant)]);
    const r = await importOne([section(VAL.lv, [num(LN('18026-5', 'LVEDV'), 120, 'mL')]), section(VAL.tricuspid, [tr, forward]), section(VAL.mitral, [mitral])]);
    expect(String(r.raw.trVelocity)).toMatch(/^2\.8( m\/s)?$/); // 280 cm/s = 2.8 m/s
  });

  it('prefers the biplane method of disks over 3D over a single plane, and says which', async () => {
    const all = await importOne([
      section(VAL.lv, [
        num(LN('18026-5', 'LVEDV'), 140, 'mL', [modifier(MOD.mode, VAL.threeD)]),
        num(LN('18026-5', 'LVEDV'), 110, 'mL', [modifier(MOD.method, VAL.singlePlane)]),
        num(LN('18026-5', 'LVEDV'), 120, 'mL', [modifier(MOD.method, VAL.biplane)]),
      ]),
    ]);
    expect(all.raw.edv).toBe(120);
    expect(all.sources.edv?.method).toBe('biplane method of disks');
    const noBiplane = await importOne([section(VAL.lv, [num(LN('18026-5', 'LVEDV'), 110, 'mL', [modifier(MOD.method, VAL.singlePlane)]), num(LN('18026-5', 'LVEDV'), 140, 'mL', [modifier(MOD.mode, VAL.threeD)])])]);
    expect(noBiplane.raw.edv).toBe(140);
    expect(noBiplane.sources.edv?.method).toBe('3D');
  });

  it('refuses a volume measured by another method (Teichholz), by name', async () => {
    const r = await importOne([section(VAL.lv, [num(LN('18026-5', 'LVEDV'), 120, 'mL', [modifier(MOD.method, VAL.teichholz)]), num(LN('18148-7', 'LVESV'), 50, 'mL')])]);
    expect(r.raw.edv).toBeUndefined();
    expect(r.summary.join('\n')).toMatch(/not used: LN 18026-5 .*method other than/);
  });
});

describe('TID 5300 (pre-coordinated codes)', () => {
  it('reads the core echo measurements with their units', async () => {
    const r = await importOne(tid5300({ edv: 118, esv: 46, ef: 61, lvotDiameterMm: 21, lvotVtiCm: 21, pepMs: 95, lvidsMm: 32, pwtsMm: 13 }));
    expect(r.raw).toMatchObject({ edv: 118, esv: 46, ef: 61, lvotDiameter: 2.1, lvotVti: 21, pep: 95, lvids: 3.2, pwts: 1.3 });
    expect(r.sources.edv).toMatchObject({ code: 'LN 79996-5', method: 'biplane method of disks' });
    expect(r.summary[0]).toMatch(/TID 5300/);
    expect(r.notFound).toContain('Ejection time');
  });

  it('takes EDV and ESV from one method when both exist in it', async () => {
    const r = await importOne([
      container(DCM('125301', 'Pre-coordinated Measurements'), [
        num(LN('79996-5', 'LVEDV biplane'), 120, 'mL'),
        num(LN('79995-7', 'LVEDV 3D'), 130, 'mL'),
        num(LN('80000-3', 'LVESV 3D'), 55, 'mL'),
      ]),
    ]);
    expect(r.raw.edv).toBe(130);
    expect(r.raw.esv).toBe(55);
    expect(r.sources.edv?.method).toBe('3D');
  });

  it('takes TAPSE and TR velocity as the right-heart inputs', async () => {
    const r = await importOne(tid5300({ edv: 118, esv: 46, tapseMm: 21, trVelocity: 2.6 }));
    for (const [key, value] of [['tapse', 21], ['trVelocity', 2.6]] as const) expect(Number(String(r.raw[key]).split(' ')[0])).toBe(value);
  });
});

describe('repeated measurements', () => {
  const edv = (v: number, preferred = false) => num(LN('79996-5', 'LVEDV biplane'), v, 'mL', preferred ? [modifier(MOD.selection, VAL.userChosen)] : []);
  const esv = num(LN('80001-1', 'LVESV biplane'), 50, 'mL');
  const pre = (items: ReturnType<typeof num>[]) => [container(DCM('125301', 'Pre-coordinated Measurements'), [...items, esv])];

  it('uses the one marked preferred (Selection Status, PS3.16 CID 224)', async () => {
    const r = await importOne(pre([edv(118), edv(126, true), edv(122)]));
    expect(r.raw.edv).toBe(126);
    expect(r.sources.edv?.how).toBe('marked preferred in the report');
  });

  it('else the mean, and says so', async () => {
    const r = await importOne(pre([edv(118), edv(120), edv(122)]));
    expect(r.raw.edv).toBe(120);
    expect(r.sources.edv?.how).toBe('mean of 3 measurements');
  });

  it('refuses values that disagree by more than 10 % when no one can be asked', async () => {
    const r = await importOne(pre([edv(100), edv(130)]));
    expect(r.raw.edv).toBeUndefined();
    expect(r.summary.join('\n')).toMatch(/LV end-diastolic volume: repeated measurements disagree by 26 % \(100 mL, 130 mL\)/);
  });

  it('asks when it can, and uses the answer', async () => {
    const r = await importOne(pre([edv(100), edv(130)]), async (d) => d.found[1]!.value);
    expect(r.raw.edv).toBe(130);
    expect(r.sources.edv?.how).toBe('chosen at the prompt among repeats');
  });
});

describe('units, private codes and content that is never read', () => {
  it('accepts mL and ml alike (UCUM allows both litre symbols)', async () => {
    const a = await importOne([container(DCM('125301', 'P'), [num(LN('79996-5', 'EDV'), 118, 'mL'), num(LN('80001-1', 'ESV'), 46, 'ml')])]);
    expect([a.raw.edv, a.raw.esv]).toEqual([118, 46]);
  });

  it('refuses an item with an unknown or mismatched unit, by name, and keeps the rest', async () => {
    const r = await importOne([container(DCM('125301', 'P'), [num(LN('79996-5', 'EDV'), 118, '[fur_us]'), num(LN('80001-1', 'ESV'), 46, 'mm'), num(LN('79989-0', 'PEP'), 95, 'ms')])]);
    expect(r.raw.edv).toBeUndefined();
    expect(r.raw.esv).toBeUndefined();
    expect(r.raw.pep).toBe(95);
    const s = r.summary.join('\n');
    expect(s).toMatch(/not used: LN 79996-5 Left ventricular end diastolic volume biplane \(MOD\) in "test.dcm": unknown unit "\[fur_us\]"/);
    expect(s).toMatch(/not used: LN 80001-1 .*unit "mm" is not a volume unit/);
  });

  it('ignores vendor-private codes, and everything under a private container, even a concept it knows', async () => {
    const r = await importOne([
      container(DCM('125301', 'P'), [num(['99ACME', 'EDV1', 'Vendor EDV'], 200, 'mL'), num(LN('79996-5', 'EDV'), 118, 'mL'), modifier(['99ACME', 'X', 'x'], VAL.lv)]),
      container(['99ACME', 'SEC', 'Vendor section'], [num(LN('79996-5', 'EDV'), 190, 'mL')]),
    ]);
    expect(r.raw.edv).toBe(118);
    expect(r.summary.join('\n')).toMatch(/3 items with vendor-private codes ignored/);
  });

  it('keeps no text item, name or identifier: the document holds codes and numbers only', () => {
    const doc = load([container(DCM('125301', 'P'), [text(DCM('121106', 'Comment'), 'seen by Dr Quillfeather'), num(LN('79996-5', 'EDV'), 118, 'mL')])]);
    const dump = JSON.stringify(doc);
    for (const needle of ['Quillfeather', 'ZX-99173-Q', '19510817', 'ACC7741920', 'Marrowby', 'Thistlewood', '424242']) expect(dump).not.toContain(needle);
    expect(doc.identifying).toBeGreaterThanOrEqual(8);
  });
});

describe('bad files: one message naming the file', () => {
  const expectRefused = async (path: string, reason: RegExp) => {
    const err = await readSrFile(path).then(() => null, (e: unknown) => e);
    expect(err).toBeInstanceOf(InputError);
    expect((err as InputError).field).toBe('sr');
    expect((err as InputError).message).toContain(JSON.stringify(path));
    expect((err as InputError).message).toMatch(reason);
  };
  it('not DICOM', async () => {
    const p = join(dir, 'notes.dcm');
    writeFileSync(p, 'visit notes, not a DICOM file\n'.repeat(10));
    await expectRefused(p, /not a DICOM file/);
  });
  it('DICOM but not an SR', async () => {
    const p = writeSr(join(dir, 'image.dcm'), { studyDate: '20240105', content: tid5300({ edv: 118, esv: 46 }), sopClass: '1.2.840.10008.5.1.4.1.1.6.1', modality: 'US' });
    await expectRefused(p, /not a structured report/);
  });
  it('truncated in the middle of an element', async () => {
    const bytes = buildSr({ studyDate: '20240105', content: tid5300({ edv: 118, esv: 46 }) });
    const p = join(dir, 'cut.dcm');
    writeFileSync(p, bytes.subarray(0, bytes.length - 7));
    await expectRefused(p, /truncated or damaged/);
  });
  it('a study date of three digits (parsed by the library, refused by our own check)', async () => {
    const p = writeSr(join(dir, 'date.dcm'), { studyDate: '202', content: tid5300({ edv: 118, esv: 46 }) });
    await expectRefused(p, /study date is incomplete or damaged \(3 characters/);
  });
  it('oversized', async () => {
    const p = join(dir, 'huge.dcm');
    const fd = openSync(p, 'w');
    ftruncateSync(fd, MAX_SR_BYTES + 1);
    closeSync(fd);
    await expectRefused(p, /larger than 32 MiB|too large .*32 MiB/);
  });
  it('a special file (FIFO) is refused without waiting for a writer', async () => {
    const p = join(dir, 'pipe.dcm');
    execFileSync('mkfifo', [p]);
    await expectRefused(p, /not a regular file/);
  });
  it('a report tree nested deeper than any template (refused, not a stack overflow)', () => {
    let tree = container(DCM('125301', 'P'), [num(LN('79996-5', 'EDV'), 118, 'mL')]);
    for (let i = 0; i < 80; i++) tree = container(DCM('121070', 'Findings'), [tree]);
    expect(() => load([tree])).toThrow(/nested too deeply/);
  });
  it('files of two different studies in one set', async () => {
    const a = parseSr('a.dcm', buildSr({ studyDate: '20240105', studyUid: '1.2.826.0.1.3680043.99.1', content: tid5300({ edv: 118, esv: 46 }) }), dcmjs);
    const b = parseSr('b.dcm', buildSr({ studyDate: '20240312', studyUid: '1.2.826.0.1.3680043.99.2', content: tid5300({ edv: 120, esv: 47 }) }), dcmjs);
    await expect(importStudy([a, b], options)).rejects.toThrow(/sr: got "b.dcm"; belongs to a different study than "a.dcm" \(study dates 2024-01-05 and 2024-03-12\)/);
  });
  it('an SR with no echo measurements', async () => {
    const doc = load([container(DCM('121070', 'Findings'), [text(DCM('121106', 'Comment'), 'normal study')])]);
    await expect(importStudy([doc], options)).rejects.toThrow(/no echo measurements found/);
  });
});
