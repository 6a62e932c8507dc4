import * as dicomParserModule from 'dicom-parser';

/**
 * dicom-parser ships as a UMD bundle: Node's ESM loader exposes it only as `default`, a bundler as
 * named exports. One place resolves that.
 */
export const dicomParser: typeof dicomParserModule =
  (dicomParserModule as unknown as { default?: typeof dicomParserModule }).default ?? dicomParserModule;

export type { DataSet, Element } from 'dicom-parser';
