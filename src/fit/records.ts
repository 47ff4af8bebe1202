/**
 * Recorded readout traces as the fit reads them: rows of real samples, or of I and Q. A record
 * set of src/io/records (any file format) is one; a test can hand in arrays.
 */

/** Rows of samples, read one at a time into the caller's buffers. */
export interface RecordSource {
  /** The file (and column or dataset) the records come from, for messages. */
  readonly source: string;
  readonly rows: number;
  readonly samples: number;
  /** Complex records: I and Q per sample. */
  readonly complex: boolean;
  /** Copies row r into outI (and its Q into outQ for complex records). */
  row(r: number, outI: Float64Array, outQ: Float64Array | null): void;
}

/** A source over records held in memory (row-major, `samples` per row; `quadrature` for complex records). */
export function recordsInMemory(source: string, samples: number, inPhase: Float64Array, quadrature: Float64Array | null = null): RecordSource {
  return {
    source, samples, rows: Math.floor(inPhase.length / samples), complex: quadrature !== null,
    row(r, outI, outQ) {
      outI.set(inPhase.subarray(r * samples, (r + 1) * samples));
      if (quadrature && outQ) outQ.set(quadrature.subarray(r * samples, (r + 1) * samples));
    },
  };
}
