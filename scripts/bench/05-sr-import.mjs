// DICOM SR import (`assess --sr`): informational. dcmjs loads only when an SR is given, so this
// row shows its cost on top of an assessment; the start-up rows above must not move. The SR is
// built here with dcmjs from invented values (TID 5300 codes), in a temporary folder.
import { mkdtempSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import dcmjs from 'dcmjs';

function srBytes() {
  const { DicomMetaDictionary, DicomDict } = dcmjs.data;
  const code = (scheme, value, meaning) => ({ CodeValue: value, CodingSchemeDesignator: scheme, CodeMeaning: meaning });
  const num = (c, meaning, value, unit) => ({
    RelationshipType: 'CONTAINS', ValueType: 'NUM', ConceptNameCodeSequence: [code('LN', c, meaning)],
    MeasuredValueSequence: [{ NumericValue: value, MeasurementUnitsCodeSequence: [code('UCUM', unit, unit)] }],
  });
  const sopClass = '1.2.840.10008.5.1.4.1.1.88.33';
  const instance = '1.2.826.0.1.3680043.99.5.1';
  const meta = { FileMetaInformationVersion: new Uint8Array([0, 1]).buffer, MediaStorageSOPClassUID: sopClass, MediaStorageSOPInstanceUID: instance, TransferSyntaxUID: '1.2.840.10008.1.2.1', ImplementationClassUID: '1.2.826.0.1.3680043.99.5.9' };
  const dict = new DicomDict(DicomMetaDictionary.denaturalizeDataset(meta));
  dict.dict = DicomMetaDictionary.denaturalizeDataset({
    SOPClassUID: sopClass, SOPInstanceUID: instance, Modality: 'SR', StudyDate: '20240105', ValueType: 'CONTAINER',
    ConceptNameCodeSequence: [code('DCM', '125200', 'Adult Echocardiography Procedure Report')],
    ContentSequence: [
      num('79996-5', 'Left ventricular end diastolic volume biplane (MOD)', 210, 'mL'),
      num('80001-1', 'Left ventricular end systolic volume biplane (MOD)', 150, 'mL'),
      num('79989-0', 'Left ventricular pre-ejection period', 130, 'ms'),
    ],
  });
  return new Uint8Array(dict.write());
}

export async function run({ bin, compare }) {
  const dir = mkdtempSync(join(tmpdir(), 'elastimate-bench-sr-'));
  try {
    const sr = join(dir, 'study.dcm');
    writeFileSync(sr, srBytes());
    const r = compare([bin, 'assess', '--sr', sr, '--sbp', '108', '--dbp', '68', '--et', '240', '--json']);
    return [{ name: 'assess --sr (dcmjs loads), --json', ratio: r.ratio, limit: 3.5, informational: true, detail: `${r.ms.toFixed(0)} ms vs ${r.refMs.toFixed(0)} ms` }];
  } finally {
    rmSync(dir, { recursive: true, force: true });
  }
}
