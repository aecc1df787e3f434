#!/usr/bin/env node
// Writes the demo DICOM SR cases/sr/hypertension-trial.sr.dcm: the invented visit of
// cases/hypertension-trial.visit.json as an echo machine might export it (TID 5200 sections with
// finding sites, TID 5201 patient characteristics), in other units than the visit file (L, mm,
// s, g, m). No identifying attribute is filled in. `--check` compares instead of writing
// (test/sr/demo-sr.test.ts keeps the committed file fresh).
import { readFileSync, writeFileSync } from 'node:fs';
import { dirname, join } from 'node:path';
import { fileURLToPath } from 'node:url';
import dcmjs from 'dcmjs';

const root = join(dirname(fileURLToPath(import.meta.url)), '..');
const target = join(root, 'cases', 'sr', 'hypertension-trial.sr.dcm');
const v = JSON.parse(readFileSync(join(root, 'cases', 'hypertension-trial.visit.json'), 'utf8'));

const coded = (scheme, value, meaning) => ({ CodeValue: value, CodingSchemeDesignator: scheme, CodeMeaning: meaning });
const num = (name, value, unit, children = []) => ({
  RelationshipType: 'CONTAINS', ValueType: 'NUM', ConceptNameCodeSequence: [name],
  MeasuredValueSequence: [{ NumericValue: value, MeasurementUnitsCodeSequence: [coded('UCUM', unit, unit)] }],
  ...(children.length ? { ContentSequence: children } : {}),
});
const mod = (name, value) => ({ RelationshipType: 'HAS CONCEPT MOD', ValueType: 'CODE', ConceptNameCodeSequence: [name], ConceptCodeSequence: [value] });
const section = (title, site, items) => ({
  RelationshipType: 'CONTAINS', ValueType: 'CONTAINER', ContinuityOfContent: 'SEPARATE', ConceptNameCodeSequence: [title],
  ContentSequence: [...(site ? [mod(coded('SCT', '363698007', 'Finding Site'), site)] : []), ...items],
});
const biplane = [mod(coded('SCT', '370129005', 'Measurement Method'), coded('DCM', '125207', 'Method of Disks, Biplane'))];
const findings = coded('DCM', '121070', 'Findings');
const round = (x) => Number(x.toPrecision(6));

const content = [
  section(coded('DCM', '121118', 'Patient Characteristics'), null, [
    { RelationshipType: 'CONTAINS', ValueType: 'CODE', ConceptNameCodeSequence: [coded('DCM', '121032', 'Subject Sex')], ConceptCodeSequence: [v.sex === 'female' ? coded('DCM', 'F', 'Female') : coded('DCM', 'M', 'Male')] },
    num(coded('LN', '8302-2', 'Body height'), round(v.height / 100), 'm'),
    num(coded('LN', '29463-7', 'Body weight'), round(v.weight * 1000), 'g'),
    ...v.sbp.map((x) => num(coded('LN', '8480-6', 'Systolic blood pressure'), x, 'mm[Hg]')),
    ...v.dbp.map((x) => num(coded('LN', '8462-4', 'Diastolic blood pressure'), x, 'mm[Hg]')),
  ]),
  section(findings, coded('SCT', '87878005', 'Left Ventricle'), [
    num(coded('LN', '18026-5', 'Left Ventricular End Diastolic Volume'), round(v.edv / 1000), 'L', biplane),
    num(coded('LN', '18148-7', 'Left Ventricular End Systolic Volume'), v.esv, 'ml', biplane),
    num(coded('LN', '18043-0', 'Left Ventricular Ejection Fraction by US'), v.ef, '%', biplane),
    num(coded('LN', '29438-9', 'Left Ventricle Internal Systolic Dimension'), round(v.lvids * 10), 'mm'),
    num(coded('LN', '18156-0', 'Left Ventricle Posterior Wall Systolic Thickness'), round(v.pwts * 10), 'mm'),
    num(coded('LN', '8867-4', 'Heart rate'), v.hr, '{beats}/min'),
  ]),
  section(findings, coded('SCT', '13418002', 'Left Ventricle Outflow Tract'), [
    num(coded('SCT', '399027007', 'Cardiovascular Orifice Diameter'), round(parseFloat(v.lvotDiameter) * 10), 'mm'),
    num(coded('LN', '20354-7', 'Velocity Time Integral'), round(parseFloat(v.lvotVti)), 'cm'),
  ]),
  section(findings, coded('SCT', '34202007', 'Aortic Valve'), [
    num(coded('LN', '59085-1', 'Pre-Ejection Period'), round(v.pep / 1000), 's'),
    num(coded('LN', '20222-6', 'Ejection Time'), v.et, 'ms'),
  ]),
  section(findings, coded('SCT', '91134007', 'Mitral Valve'), [num(coded('LN', '59111-5', 'E Velocity to Annulus E Velocity Ratio'), v.eOverEPrime, '{ratio}')]),
];

// Invented UIDs under the 2.25 (UUID-derived) root: they identify nothing.
const sopClass = '1.2.840.10008.5.1.4.1.1.88.33';
const instance = '2.25.190270437045383766106411196651372611201';
const meta = { FileMetaInformationVersion: new Uint8Array([0, 1]).buffer, MediaStorageSOPClassUID: sopClass, MediaStorageSOPInstanceUID: instance, TransferSyntaxUID: '1.2.840.10008.1.2.1', ImplementationClassUID: '2.25.190270437045383766106411196651372611202' };
const { DicomMetaDictionary, DicomDict } = dcmjs.data;
const dict = new DicomDict(DicomMetaDictionary.denaturalizeDataset(meta));
dict.dict = DicomMetaDictionary.denaturalizeDataset({
  SOPClassUID: sopClass, SOPInstanceUID: instance, Modality: 'SR', StudyDate: '20240311',
  StudyInstanceUID: '2.25.190270437045383766106411196651372611203', SeriesInstanceUID: '2.25.190270437045383766106411196651372611204',
  ValueType: 'CONTAINER', ContinuityOfContent: 'SEPARATE',
  ConceptNameCodeSequence: [coded('DCM', '125200', 'Adult Echocardiography Procedure Report')],
  ContentSequence: content,
});
const bytes = Buffer.from(dict.write());

if (process.argv.includes('--check')) {
  const same = Buffer.compare(readFileSync(target), bytes) === 0;
  if (!same) console.error(`${target} is stale: run node scripts/demo-sr.mjs`);
  process.exitCode = same ? 0 : 1;
} else {
  writeFileSync(target, bytes);
  console.log(`wrote ${target} (${bytes.length} bytes)`);
}
