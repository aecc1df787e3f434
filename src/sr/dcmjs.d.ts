// dcmjs ships no type declarations; the importer uses a few calls of its data API (src/sr/read-dicom.ts).
declare module 'dcmjs' {
  const dcmjs: {
    data: {
      DicomMessage: { readFile(buffer: ArrayBuffer, options?: Record<string, unknown>): { dict: Record<string, unknown>; meta: Record<string, unknown> } };
      DicomMetaDictionary: {
        naturalizeDataset(dict: Record<string, unknown>): Record<string, unknown>;
        denaturalizeDataset(dataset: Record<string, unknown>): Record<string, unknown>;
      };
      DicomDict: new (meta: Record<string, unknown>) => { dict: Record<string, unknown>; write(): ArrayBuffer };
    };
    log: { setLevel(level: string): void };
  };
  export default dcmjs;
}
