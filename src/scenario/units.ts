/**
 * Quantities with units, as written in scenario files: "100 MHz", "2 fA/rtHz", "2 meV/ns".
 *
 * A small dimension algebra: every unit is a factor to SI and a dimension vector over the base
 * dimensions below; a unit expression multiplies, divides, raises to powers and takes square
 * roots of units. Each scenario key then asks for a named dimension (`DIMENSIONS`).
 */
import { ELEMENTARY_CHARGE, PLANCK } from '../physics/constants.ts';
import { didYouMean } from './suggest.ts';

/** Exponents of the base dimensions time, current, energy, temperature, angle, in this order (halves allowed, for 1/√Hz). */
export type Dimension = readonly [number, number, number, number, number];

const NONE: Dimension = [0, 0, 0, 0, 0];
const ENERGY: Dimension = [0, 0, 1, 0, 0];
const FREQUENCY: Dimension = [-1, 0, 0, 0, 0];

interface UnitDef {
  /** Factor to SI, apart from powers of ten. */
  factor: number;
  dim: Dimension;
  /** Whether SI prefixes may be put in front. */
  prefixable: boolean;
}

/** The unit table: symbol → factor to SI and dimension. */
const UNITS: Record<string, UnitDef> = {
  s: { factor: 1, dim: [1, 0, 0, 0, 0], prefixable: true },
  Hz: { factor: 1, dim: [-1, 0, 0, 0, 0], prefixable: true },
  A: { factor: 1, dim: [0, 1, 0, 0, 0], prefixable: true },
  // V = J/C = J/(A·s)
  V: { factor: 1, dim: [-1, -1, 1, 0, 0], prefixable: true },
  J: { factor: 1, dim: [0, 0, 1, 0, 0], prefixable: true },
  eV: { factor: ELEMENTARY_CHARGE, dim: [0, 0, 1, 0, 0], prefixable: true },
  K: { factor: 1, dim: [0, 0, 0, 1, 0], prefixable: true },
  // Ω = V/A
  Ohm: { factor: 1, dim: [-1, -2, 1, 0, 0], prefixable: true },
  ohm: { factor: 1, dim: [-1, -2, 1, 0, 0], prefixable: true },
  'Ω': { factor: 1, dim: [-1, -2, 1, 0, 0], prefixable: true },
  rad: { factor: 1, dim: [0, 0, 0, 0, 1], prefixable: true },
  deg: { factor: Math.PI / 180, dim: [0, 0, 0, 0, 1], prefixable: false },
  '°': { factor: Math.PI / 180, dim: [0, 0, 0, 0, 1], prefixable: false },
  // √Hz, written the way spectrum analysers label it.
  rtHz: { factor: 1, dim: [-0.5, 0, 0, 0, 0], prefixable: false },
  // the Planck constant, so that an energy can be written as a frequency: "5 GHz*h" = h·5 GHz
  h: { factor: PLANCK, dim: [1, 0, 1, 0, 0], prefixable: false },
};

/**
 * Sample rates as digitizers state them: samples per second, "50 MS/s", "1 GSa/s", "250 kSPS"
 * (a sample is a count, so S/s is a frequency). Read as one symbol, before the unit table.
 */
const SAMPLE_RATE = /^([fpnuµμmkMGT]?)(?:S\/s|Sa\/s|SPS|sps)(?![A-Za-z])/;

/** SI prefixes accepted in front of a unit (both micro signs and "u"), as powers of ten. */
const PREFIXES: Record<string, number> = {
  f: -15, p: -12, n: -9, u: -6, 'µ': -6, 'μ': -6, m: -3, k: 3, M: 6, G: 9, T: 12,
};

/**
 * A unit's factor to SI, kept as 10^pow10 · scale so that decimal prefixes are applied by one
 * exact multiplication or division: "20 us" becomes 20 / 1e6 = 2e-5 exactly as written,
 * not 20 · 1e-6 = 1.9999999999999998e-5.
 */
interface Factor {
  pow10: number;
  scale: number;
  dim: Dimension;
}

/** x · 10^p, correctly rounded when p is an integer (10^|p| is exact in binary up to 1e22). */
function timesPow10(x: number, p: number): number {
  if (!Number.isInteger(p)) return x * 10 ** p;
  const ten = Number(`1e${Math.abs(p)}`);
  return p >= 0 ? x * ten : x / ten;
}

/** A parsed quantity: value in SI and its dimension; `plain` when no unit was written. */
export interface Quantity {
  value: number;
  dim: Dimension;
  plain: boolean;
}

/** A named dimension that a scenario key can ask for. */
export interface DimensionKind {
  /** Accepted dimensions (a signal may be a current or a voltage). */
  dims: Dimension[];
  /** Noun phrase for messages: "a frequency". */
  label: string;
  /** Example written in the file format: "100 MHz". */
  example: string;
}

/** The named dimensions used by scenario keys. */
export const DIMENSIONS = {
  time: { dims: [[1, 0, 0, 0, 0]], label: 'a time', example: '20 us' },
  frequency: { dims: [[-1, 0, 0, 0, 0]], label: 'a frequency', example: '100 MHz' },
  rate: { dims: [[-1, 0, 0, 0, 0]], label: 'a rate', example: '5 kHz' },
  energy: { dims: [[0, 0, 1, 0, 0]], label: 'an energy', example: '150 ueV' },
  temperature: { dims: [[0, 0, 0, 1, 0]], label: 'a temperature', example: '120 mK' },
  angle: { dims: [[0, 0, 0, 0, 1]], label: 'an angle', example: '30 deg' },
  resistance: { dims: [[-1, -2, 1, 0, 0]], label: 'a resistance', example: '1 MOhm' },
  sweepRate: { dims: [[-1, 0, 1, 0, 0]], label: 'an energy sweep rate', example: '2 meV/ns' },
  signal: { dims: [[0, 1, 0, 0, 0], [-1, -1, 1, 0, 0]], label: 'a signal level', example: '120 pA' },
  noiseDensity: {
    dims: [[0.5, 1, 0, 0, 0], [-0.5, -1, 1, 0, 0]],
    label: 'a noise density',
    example: '2 fA/rtHz',
  },
  // noise and sensor keys (sections/noise.ts, sections/sensor.ts)
  current: { dims: [[0, 1, 0, 0, 0]], label: 'a current', example: '1 nA' },
  voltage: { dims: [[-1, -1, 1, 0, 0]], label: 'a voltage', example: '50 uV' },
  currentDensity: { dims: [[0.5, 1, 0, 0, 0]], label: 'a current noise density', example: '10 fA/rtHz' },
  voltageDensity: { dims: [[-0.5, -1, 1, 0, 0]], label: 'a voltage noise density', example: '1 nV/rtHz' },
  /** A level change: a signal level, or (with a sensor) a detuning energy. */
  signalOrEnergy: {
    dims: [[0, 1, 0, 0, 0], [-1, -1, 1, 0, 0], [0, 0, 1, 0, 0]],
    label: 'a signal level or a detuning energy',
    example: '20 pA',
  },
  /** A noise density of the signal, or (with a sensor) of the detuning. */
  densityOrEnergyDensity: {
    dims: [[0.5, 1, 0, 0, 0], [-0.5, -1, 1, 0, 0], [0.5, 0, 1, 0, 0]],
    label: 'a noise density (signal or detuning)',
    example: '5 pA/rtHz',
  },
  /** A detuning: an energy, or a gate voltage (times the lever arm). */
  energyOrVoltage: { dims: [[0, 0, 1, 0, 0], [-1, -1, 1, 0, 0]], label: 'an energy or a gate voltage', example: '40 ueV' },
} satisfies Record<string, DimensionKind>;

/** Name of a dimension a key can ask for. */
export type DimensionName = keyof typeof DIMENSIONS;

/** Quotes user text for a message, cut to 40 characters (a unit text may be any length). */
function shortQuote(text: string): string {
  return `"${text.length > 40 ? `${text.slice(0, 37)}...` : text}"`;
}

/** A unit text that could not be read; the message is a short phrase ("unknown unit \"x\""). */
export class UnitSyntaxError extends Error {
  /** The symbol that is no unit, when that was the problem (for a suggestion that fits the key). */
  constructor(message: string, readonly symbol?: string) {
    super(message);
  }
}

/** Whether two dimension vectors are equal. */
export function sameDimension(a: Dimension, b: Dimension): boolean {
  return a.every((x, i) => x === b[i]);
}

function combine(a: Dimension, b: Dimension, power: number): Dimension {
  return a.map((x, i) => x + power * b[i]!) as unknown as Dimension;
}

const ONE: Factor = { pow10: 0, scale: 1, dim: NONE };

/** a · b^power. */
function multiply(a: Factor, b: Factor, power: number): Factor {
  return { pow10: a.pow10 + power * b.pow10, scale: a.scale * b.scale ** power, dim: combine(a.dim, b.dim, power) };
}

/** Looks up one unit symbol, with an optional SI prefix. */
function lookupSymbol(symbol: string): Factor {
  const exact = UNITS[symbol];
  if (exact) return { pow10: 0, scale: exact.factor, dim: exact.dim };
  for (const [prefix, pow10] of Object.entries(PREFIXES)) {
    if (!symbol.startsWith(prefix)) continue;
    const unit = UNITS[symbol.slice(prefix.length)];
    if (unit && unit.prefixable) return { pow10, scale: unit.factor, dim: unit.dim };
  }
  // "50 MS" or "1 GSa": samples without the "/s" — never megaseconds or gigaseconds
  const samples = /^([fpnuµμmkMGT]?)(?:S|Sa)$/.exec(symbol);
  if (samples) throw new UnitSyntaxError(`unknown unit ${shortQuote(symbol)} (did you mean "${samples[1]}S/s", samples per second?)`);
  throw new UnitSyntaxError(`unknown unit ${shortQuote(symbol)}${didYouMean(symbol, unitSpellings())}`, symbol);
}

/** Every unit as it may be written, with and without prefixes (for suggestions), optionally only those of some dimensions. */
function unitSpellings(dims?: readonly Dimension[]): string[] {
  const out: string[] = [];
  for (const [symbol, unit] of Object.entries(UNITS)) {
    if (dims && !dims.some((d) => sameDimension(d, unit.dim))) continue;
    out.push(symbol);
    if (unit.prefixable) for (const prefix of Object.keys(PREFIXES)) out.push(prefix + symbol);
  }
  return out;
}

/**
 * The message for a unit text that could not be read where a key of `kind` expects it: an
 * unknown symbol is compared with the units that key accepts first ("pX" for a level suggests
 * "pA", not "ps"; where an energy is accepted, frequencies too), then with every unit.
 */
export function unitProblem(e: UnitSyntaxError, kind: DimensionName): string {
  if (e.symbol === undefined) return e.message;
  const dims = DIMENSIONS[kind].dims as readonly Dimension[];
  const accepted = dims.some((d) => sameDimension(d, ENERGY)) ? [...dims, FREQUENCY] : dims;
  const near = didYouMean(e.symbol, unitSpellings(accepted));
  return near ? `unknown unit ${shortQuote(e.symbol)}${near}` : e.message;
}

/** Recursive-descent reader of a unit expression: factors joined by '/', '*' or '·'. */
class UnitReader {
  private pos = 0;
  constructor(private readonly text: string) {}

  read(): Factor {
    const result = this.expression();
    if (this.pos < this.text.length) throw new UnitSyntaxError(`unexpected ${shortQuote(this.text.slice(this.pos))}`);
    return result;
  }

  private expression(): Factor {
    let result = ONE;
    let sign = 1;
    this.space();
    // A leading '/' means "1/…" ("5 /s").
    if (this.peek() === '/') {
      this.pos++;
      sign = -1;
    }
    for (;;) {
      result = multiply(result, this.factor(), sign);
      this.space();
      const op = this.peek();
      if (op === '/') sign = -1;
      else if (op === '*' || op === '·') sign = 1;
      else return result;
      this.pos++;
      this.space();
    }
  }

  private factor(): Factor {
    let base: Factor;
    if (this.text.startsWith('sqrt(', this.pos) || this.peek() === '√') {
      const bracketed = this.peek() !== '√' || this.text[this.pos + 1] === '(';
      this.pos += this.peek() === '√' ? 1 : 4;
      if (bracketed) {
        this.pos++; // '('
        const inner = this.expression();
        if (this.peek() !== ')') throw new UnitSyntaxError('missing ")"');
        this.pos++;
        base = multiply(ONE, inner, 0.5);
      } else {
        base = multiply(ONE, this.atom(), 0.5);
      }
    } else if (this.peek() === '(') {
      this.pos++;
      base = this.expression();
      if (this.peek() !== ')') throw new UnitSyntaxError('missing ")"');
      this.pos++;
    } else {
      base = this.atom();
    }
    const power = /^\^(-?\d+)/.exec(this.text.slice(this.pos));
    if (power) {
      this.pos += power[0].length;
      return multiply(ONE, base, Number(power[1]));
    }
    return base;
  }

  private atom(): Factor {
    const rate = SAMPLE_RATE.exec(this.text.slice(this.pos));
    if (rate) {
      this.pos += rate[0].length;
      return { pow10: rate[1] ? (PREFIXES[rate[1]] ?? 0) : 0, scale: 1, dim: [-1, 0, 0, 0, 0] };
    }
    const m = /^(?:1(?![0-9])|[A-Za-zµμΩ°]+)/.exec(this.text.slice(this.pos));
    if (!m) throw new UnitSyntaxError(this.pos < this.text.length ? `unexpected ${shortQuote(this.text.slice(this.pos))}` : 'missing unit');
    this.pos += m[0].length;
    if (m[0] === '1') return ONE;
    return lookupSymbol(m[0]);
  }

  private peek(): string | undefined {
    return this.text[this.pos];
  }

  private space(): void {
    while (this.text[this.pos] === ' ') this.pos++;
  }
}


const NUMBER = /^\s*([+-]?(?:\d+\.?\d*|\.\d+)(?:[eE][+-]?\d+)?)\s*(.*?)\s*$/;

/**
 * Reads a quantity: a plain number (taken as SI) or a string "number [space] unit".
 * Throws `UnitSyntaxError` when the text is not a number followed by a known unit.
 */
export function parseQuantity(input: number | string): Quantity {
  if (typeof input === 'number') {
    if (!Number.isFinite(input)) throw new UnitSyntaxError('not a finite number');
    return { value: input, dim: NONE, plain: true };
  }
  const m = NUMBER.exec(input);
  if (!m) throw new UnitSyntaxError('not a number followed by a unit');
  const number = Number(m[1]);
  if (!Number.isFinite(number)) throw new UnitSyntaxError('not a finite number');
  const unitText = m[2]!;
  if (unitText === '') return { value: number, dim: NONE, plain: true };
  const unit = new UnitReader(unitText).read();
  const value = timesPow10(number, unit.pow10) * unit.scale;
  // "1e308 GHz" overflows once the prefix is applied
  if (!Number.isFinite(value)) throw new UnitSyntaxError('too large once the unit is applied');
  return { value, dim: unit.dim, plain: false };
}

/**
 * Index of the accepted dimension of `kind` that `q` has (0 for a plain number, which is
 * taken as SI in whatever the key expects), or -1 when it has none of them.
 */
export function matchDimension(q: Quantity, kind: DimensionName): number {
  if (q.plain) return 0;
  return DIMENSIONS[kind].dims.findIndex((d) => sameDimension(q.dim, d as Dimension));
}

/**
 * A quantity read for a key of `kind`: its SI value and the index of the accepted dimension it
 * has (as `matchDimension`), or null when it has none. Where an energy is accepted, a frequency
 * is the energy h·f ("5 GHz" = 20.68 µeV), as spectroscopists write splittings.
 */
export function quantityAs(q: Quantity, kind: DimensionName): { value: number; index: number } | null {
  const index = matchDimension(q, kind);
  if (index >= 0) return { value: q.value, index };
  if (!sameDimension(q.dim, FREQUENCY)) return null;
  const energy = DIMENSIONS[kind].dims.findIndex((d) => sameDimension(d as Dimension, ENERGY));
  return energy >= 0 ? { value: q.value * PLANCK, index: energy } : null;
}

/** The energy h·f of a quantity that is a frequency, else the quantity as it is (for values that must agree with an energy). */
export function frequencyAsEnergy(q: Quantity): Quantity {
  return !q.plain && sameDimension(q.dim, FREQUENCY) ? { value: q.value * PLANCK, dim: ENERGY, plain: false } : q;
}

const FORMAT_PREFIXES: [number, string][] = [
  [1e12, 'T'], [1e9, 'G'], [1e6, 'M'], [1e3, 'k'], [1, ''],
  [1e-3, 'm'], [1e-6, 'µ'], [1e-9, 'n'], [1e-12, 'p'], [1e-15, 'f'],
];

/** Units that are never given a prefix in reports. */
const UNPREFIXED = new Set(['', 'deg', '°', '%']);

/**
 * Formats a value expressed in `unit` with an SI prefix and `digits` significant digits,
 * trailing zeros dropped: formatQuantity(2e-5, 's') → "20 µs"; formatQuantity(0.5, '') → "0.5".
 * Energies in joules read in electronvolts and angles in radians in degrees, as a scenario file
 * would write them: formatQuantity(2.4e-23, 'J') → "149.8 µeV"; formatQuantity(Math.PI / 6, 'rad') → "30 deg".
 */
export function formatQuantity(value: number, unit: string, digits = 4): string {
  if (unit === 'J') return formatQuantity(value / ELEMENTARY_CHARGE, 'eV', digits);
  if (unit === 'rad') return formatQuantity((value * 180) / Math.PI, 'deg', digits);
  const join = (text: string, u: string): string => (u ? `${text} ${u}` : text);
  if (!Number.isFinite(value)) return join(String(value), unit);
  const trim = (x: number): string => String(Number(x.toPrecision(digits)));
  if (value === 0 || UNPREFIXED.has(unit)) return join(trim(value), unit);
  for (const [scale, prefix] of FORMAT_PREFIXES) {
    const mantissa = Number((value / scale).toPrecision(digits));
    if (Math.abs(mantissa) >= 1 && Math.abs(mantissa) < 1000) return join(String(mantissa), prefix + unit);
  }
  // Outside the prefix range: scientific notation in the plain unit ("1.5e-20 A").
  return join(value.toExponential(digits - 1).replace(/\.?0+e/, 'e'), unit);
}
