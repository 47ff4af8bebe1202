/**
 * Recorded readout traces as the fit reads them: rows of real samples, or of I and Q. A record
 * set of src/io/records (any file format) is one.
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

