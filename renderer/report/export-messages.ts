/** Messages of the export worker: one visit's segment map, encoded as .nii.gz bytes. */
export type ExportRequest = { type: 'segment-map'; patientId: string; visitId: string };

export type ExportMessage =
  | { type: 'segment-map'; visitId: string; bytes: Uint8Array }
  | { type: 'error'; message: string };
