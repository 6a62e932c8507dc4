import type { WriteDatatype } from './nifti-write.js';
import type { Volume } from './volume.js';

/**
 * The narrowest NIfTI type that holds every physical value exactly: the stored type when the writer
 * keeps it bit for bit, else int16 when all values are whole and fit (CT stored as uint16 with an
 * intercept), else float32.
 */
export function exactWriteType(v: Volume): WriteDatatype {
  if (v.datatype === 'uint8' || v.datatype === 'int16' || v.datatype === 'float32') return v.datatype;
  for (let n = 0; n < v.data.length; n++) {
    const x = v.data[n] * v.slope + v.inter;
    if (!Number.isInteger(x) || x < -32768 || x > 32767) return 'float32';
  }
  return 'int16';
}
