/**
 * Recorded readout traces as `analyze` and `fit` read them, whatever the file: one record per
 * row, `samples` samples each, real (one channel) or complex (I and Q), read row by row so that a
 * set larger than memory streams. Each reader (arrow.ts, npy.ts, hdf5.ts, parquet.ts) validates
 * what it reads and names the file and what it expected in one line (InputError, exit 2).
 */

/** What a file may say about its records, in SI units (each optional). */
export interface RecordAttributes {
  sampleRate?: number;
  carrierFrequency?: number;
  carrierPhase?: number;
  windowStart?: number;
  windowLength?: number;
  /** Signal units per stored unit (e.g. volts per ADC count). */
  scale?: number;
  /** The unit of the records after the scale ('A', 'V' or ''). */
  unit?: string;
}

/** A validated set of records. */
export interface RecordSet {
  /** The file (and dataset or column) the records come from, for messages. */
  source: string;
  rows: number;
  samples: number;
  /** Complex records: I and Q per sample. */
  complex: boolean;
  /** Copies row r into outI (and its Q into outQ for complex records; outQ may be null otherwise), scaled to signal units. */
  row(r: number, outI: Float64Array, outQ: Float64Array | null): void;
  attributes: RecordAttributes;
  /** The file's own key-value metadata (Arrow and Parquet schema metadata; empty elsewhere). */
  metadata: ReadonlyMap<string, string>;
  /** A numeric column beside the records (Arrow and Parquet; null elsewhere or when absent). */
  column(name: string): Float64Array | null;
  /** Releases the file (a no-op for sets read whole). */
  close(): void;
}

/** Labels of the records: the outcome index of each row, and the outcome names in index order. */
export interface LabelSet {
  source: string;
  values: Uint8Array;
  names: string[];
}

/**
 * Outcome indices of raw label values: numbers 0/1 (or booleans) map to themselves; any other set
 * of two distinct values maps in sorted order, named by their text. More than two values is an
 * error the caller reports.
 */
export function outcomeIndices(raw: readonly (number | string | boolean)[]): { values: Uint8Array; names: string[] } | null {
  const distinct = [...new Set(raw.map((v) => (typeof v === 'boolean' ? Number(v) : v)))];
  if (distinct.length > 2) return null;
  const numeric = distinct.every((v) => typeof v === 'number');
  const names = numeric && distinct.every((v) => v === 0 || v === 1)
    ? ['0', '1']
    // text labels in code-unit order, the same in every locale (localeCompare is not)
    : distinct.map(String).sort((a, b) => (numeric ? Number(a) - Number(b) : a < b ? -1 : a > b ? 1 : 0));
  const index = new Map(names.map((n, i) => [n, i]));
  const values = Uint8Array.from(raw, (v) => index.get(String(typeof v === 'boolean' ? Number(v) : v))!);
  return { values, names };
}
