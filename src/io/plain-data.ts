/**
 * Plain data with typed arrays as JSON, exact for every double: JSON's shortest round-trip form
 * does that for finite doubles; −0, NaN and ±∞ and typed arrays are written as small tagged
 * objects. Functions (e.g. a built classifier's methods) are not data: they are recorded by name
 * and come back as stubs that throw if called (a merge never needs them: it only recomputes
 * tables). Used by tallies.json and by the calibration stored with kept traces.
 */

const TYPED = {
  Float64Array, Float32Array, Int32Array, Uint32Array, Int16Array, Uint16Array, Int8Array, Uint8Array,
} as const;
type TypedName = keyof typeof TYPED;

function encodeNumber(x: number): unknown {
  if (Number.isNaN(x)) return { $num: 'NaN' };
  if (x === Infinity) return { $num: 'Infinity' };
  if (x === -Infinity) return { $num: '-Infinity' };
  if (Object.is(x, -0)) return { $num: '-0' };
  return x;
}

function decodeNumber(tag: string): number {
  return tag === 'NaN' ? NaN : tag === 'Infinity' ? Infinity : tag === '-Infinity' ? -Infinity : -0;
}

/** A JSON-safe form of plain data with typed arrays, exact for every double. */
export function encodeData(v: unknown): unknown {
  if (typeof v === 'number') return encodeNumber(v);
  if (typeof v === 'function') return { $function: v.name || 'anonymous' };
  if (v === null || typeof v !== 'object') return v;
  if (ArrayBuffer.isView(v)) {
    const name = v.constructor.name as TypedName;
    if (!(name in TYPED)) throw new Error(`plain data: cannot store a ${name}`);
    return { $typed: name, values: Array.from(v as unknown as ArrayLike<number>, encodeNumber) };
  }
  if (Array.isArray(v)) return v.map(encodeData);
  const out: Record<string, unknown> = {};
  for (const [k, x] of Object.entries(v)) if (x !== undefined) out[k] = encodeData(x);
  return out;
}

/** The inverse of encodeData. */
export function decodeData(v: unknown): unknown {
  if (v === null || typeof v !== 'object') return v;
  if (Array.isArray(v)) return v.map(decodeData);
  const o = v as Record<string, unknown>;
  if (typeof o.$num === 'string') {
    if (!['NaN', 'Infinity', '-Infinity', '-0'].includes(o.$num)) throw new Error(`plain data: unknown number tag ${o.$num}`);
    return decodeNumber(o.$num);
  }
  if (typeof o.$function === 'string') {
    const name = o.$function;
    return () => { throw new Error(`${name} is not available in merged results`); };
  }
  if (typeof o.$typed === 'string' && Array.isArray(o.values)) {
    const Ctor = Object.hasOwn(TYPED, o.$typed) ? TYPED[o.$typed as TypedName] : undefined;
    if (!Ctor) throw new Error(`plain data: unknown array type ${o.$typed}`);
    const values = o.values.map((x) => decodeData(x));
    if (values.some((x) => typeof x !== 'number')) throw new Error('plain data: a typed array of something other than numbers');
    return Ctor.from(values as number[]);
  }
  const out: Record<string, unknown> = {};
  for (const [k, x] of Object.entries(o)) out[k] = decodeData(x);
  return out;
}

