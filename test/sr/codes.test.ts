/**
 * The SR code table (src/sr/codes.ts) against an independent copy of the
 * standard's codes: the DICOM code dictionary of pydicom as Debian ships it
 * (package python3-pydicom, modules pydicom.sr._concepts_dict and
 * pydicom.sr._cid_dict, generated from DICOM PS3.16). `.ci/run` installs the
 * package; it is called as /usr/bin/python3 because another Python may come
 * first on the PATH. Checked: every code exists under its scheme with the
 * meaning the table gives, and every context group (CID) a row cites lists it.
 */
import { spawnSync } from 'node:child_process';
import { describe, expect, it } from 'vitest';
import { NUMERIC_FIELDS } from '../../src/assessment/fields.js';
import {
  CONCEPTS, FINDING_SITE, FLOW_DIRECTION, IMAGE_MODE, MEASUREMENT_METHOD, METHOD_VALUES, PATIENT_CHARACTERISTICS,
  REGURGITANT_FLOW, SELECTION_STATUS, SELECTION_VALUES, SEX_VALUES, SITES, SR_TARGETS, SRT_EQUIVALENTS, SUBJECT_SEX, type Code,
} from '../../src/sr/codes.js';

const LOOKUP = `
import json, sys
from pydicom.sr._concepts_dict import concepts
from pydicom.sr._cid_dict import cid_concepts
wanted = json.load(sys.stdin)
out = {}
for scheme, code in wanted:
    meanings = []
    for name, codes in concepts.get(scheme, {}).items():
        if code in codes:
            meanings.append(codes[code][0])
    cids = [cid for cid, schemes in cid_concepts.items() if any(code in concepts[scheme].get(n, {}) for n in schemes.get(scheme, []))]
    out[scheme + ' ' + code] = {'meanings': meanings, 'cids': cids}
print(json.dumps(out))
`;

interface Entry {
  meanings: string[];
  cids: number[];
}

function lookUp(codes: Code[]): Record<string, Entry> {
  const run = spawnSync('/usr/bin/python3', ['-c', LOOKUP], { input: JSON.stringify(codes.map((c) => [c.scheme, c.code])), encoding: 'utf8', timeout: 60_000 });
  if (run.status !== 0) throw new Error(`pydicom's code dictionary is needed for this check (apt-get install python3-pydicom): ${run.stderr}`);
  return JSON.parse(run.stdout) as Record<string, Entry>;
}

/** Meanings compare without case and without SNOMED's "(observable entity)"-style tags. */
const plain = (m: string) => m.replace(/\s*\([a-z /]+\)$/i, '').trim().toLowerCase();

/**
 * Codes this table reads that pydicom's dictionary does not hold, each with the source that
 * was checked instead (LOINC's vital-sign codes as the HL7 FHIR vital-signs profiles fix them).
 */
const CHECKED_ELSEWHERE: Record<string, string> = {
  'LN 8302-2': 'HL7 FHIR R4 Body Height profile: Observation.code = LOINC 8302-2',
  'LN 29463-7': 'HL7 FHIR R4 Body Weight profile: Observation.code = LOINC 29463-7',
};
/** LOINC long names where PS3.16's CID 3611 spells the meaning otherwise (same code, same concept). */
const MEANING_ALIASES: Record<string, string> = {
  'LN 8480-6': 'intravascular systolic blood pressure',
  'LN 8462-4': 'intravascular diastolic blood pressure',
  'SCT 426865009': '3d mode',
};

const all: Code[] = [
  ...CONCEPTS.map((r) => r.concept),
  FINDING_SITE, MEASUREMENT_METHOD, IMAGE_MODE, FLOW_DIRECTION, SELECTION_STATUS, PATIENT_CHARACTERISTICS, SUBJECT_SEX,
  REGURGITANT_FLOW, ...SELECTION_VALUES, ...SEX_VALUES, ...METHOD_VALUES, ...Object.values(SITES),
];

describe('SR code table against pydicom\'s DICOM code dictionary (Debian python3-pydicom, from PS3.16)', () => {
  const dictionary = lookUp(all);

  it.each(all.map((c) => [`${c.scheme} ${c.code}`, c] as const))('%s exists with the meaning the table gives', (key, c) => {
    const entry = dictionary[key]!;
    if (CHECKED_ELSEWHERE[key]) {
      expect(entry.meanings, `${key} is in pydicom now: drop it from CHECKED_ELSEWHERE`).toEqual([]);
      return;
    }
    expect(entry.meanings.length, `${key} not in the dictionary`).toBeGreaterThan(0);
    const known = entry.meanings.map(plain);
    expect(known.includes(plain(c.meaning)) || known.includes(MEANING_ALIASES[key] ?? '\u0000'), `${key}: table says "${c.meaning}", dictionary ${JSON.stringify(entry.meanings)}`).toBe(true);
  });

  it('every SNOMED CT code of the table has its SNOMED-RT equivalent as PS3.16 maps it (pydicom.sr._snomed_dict)', () => {
    const run = spawnSync('/usr/bin/python3', ['-c', 'import json; from pydicom.sr._snomed_dict import mapping; print(json.dumps(mapping["SCT"]))'], { encoding: 'utf8', timeout: 60_000 });
    expect(run.status, run.stderr).toBe(0);
    const mapping = JSON.parse(run.stdout) as Record<string, string>;
    const sct = [...new Set(all.filter((c) => c.scheme === 'SCT').map((c) => c.code))];
    for (const code of sct) expect(SRT_EQUIVALENTS[code], `SCT ${code}`).toBe(mapping[code]);
    expect(Object.keys(SRT_EQUIVALENTS).sort()).toEqual(sct.sort());
  });

  it.each(CONCEPTS.filter((r) => /CID \d+/.test(r.list)).map((r) => [`${r.concept.scheme} ${r.concept.code} (${r.list})`, r] as const))('%s is in the context group it cites', (_name, row) => {
    const cited = [...row.list.matchAll(/CID (\d+)/g)].map((m) => Number(m[1]));
    const entry = dictionary[`${row.concept.scheme} ${row.concept.code}`]!;
    for (const cid of cited) expect(entry.cids, `CID ${cid}`).toContain(cid);
  });
});

describe('SR targets and the visit inputs', () => {
  it('every measurement the importer looks for is an input of a visit (so nothing read is silently dropped)', () => {
    const inputs = new Set(NUMERIC_FIELDS.map((f) => f.key as string));
    expect(SR_TARGETS.map((t) => t.key).filter((k) => !inputs.has(k))).toEqual([]);
  });
});
