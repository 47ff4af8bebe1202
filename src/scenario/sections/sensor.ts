/**
 * Sensor section (optional): a single-level sensor dot in sequential tunnelling (Beenakker,
 * Phys. Rev. B 44, 1646 (1991); physics/sensor.ts) sets the state levels. Each state shifts the
 * sensor's detuning by its `shifts` entry (energy, or gate voltage times the lever arm); the
 * level of a state is the sensor current at the operating detuning plus that shift. A
 * readout-induced relaxation law (phenomenological, no source) adds to — or replaces — a
 * transition's rate as a function of the bias.
 */
import { z } from 'zod';
import type { ReadoutRelaxationSpec, SensorSpec, StateSpec } from '../types.ts';
import { kindedQuantity, name, number, oneOf, quantity, section, type KindedValue } from '../fields.ts';
import type { ResolveContext } from '../context.ts';
import type { KeyPath } from '../issues.ts';
import type { SignalUse } from './states.ts';
import { formatQuantity } from '../units.ts';
import { BOLTZMANN, ELEMENTARY_CHARGE, REDUCED_PLANCK } from '../../physics/constants.ts';
import { sensorOperatingPoint } from '../../physics/sensor-scenario.ts';

const positive = { min: 0, minExclusive: true } as const;

const detuningSchema = kindedQuantity('energyOrVoltage', {}, 'Detuning: an energy, or a gate voltage (times leverArm)');

const relaxationSchema = section({
  from: name().meta({ description: 'State that relaxes' }),
  to: name().meta({ description: 'State it relaxes to' }),
  law: oneOf(['power', 'exponential']).meta({ description: 'power: rate·(|V|/atBias)^exponent; exponential: rate·e^(|V|/scale)' }),
  rate: quantity('rate', { min: 0 }, 'Rate at atBias (power) or the prefactor (exponential)'),
  atBias: quantity('voltage', positive, 'Reference bias of the power law').optional(),
  exponent: number({ min: 0 }).optional().meta({ description: 'Exponent of the power law' }),
  scale: quantity('voltage', positive, 'Bias scale of the exponential law').optional(),
  combine: oneOf(['add', 'replace']).optional().meta({ description: 'add to the transition\'s rate (default) or replace it' }),
});

const sensorSchema = section({
  tunnelRates: section({
    left: quantity('rate', positive, 'Tunnel rate to the source lead'),
    right: quantity('rate', positive, 'Tunnel rate to the drain lead'),
  }).meta({ description: 'Tunnel rates of the sensor dot to its leads' }),
  temperature: quantity('temperature', positive, 'Electron temperature of the leads'),
  bias: quantity('voltage', {}, 'Source–drain bias, split symmetrically'),
  leverArm: number(positive).optional().meta({ description: 'Lever arm (eV per V of gate) for detunings written as gate voltages' }),
  operatingPoint: z
    .union([z.literal('steepest'), detuningSchema], { error: () => '"steepest" or a detuning (e.g. "40 ueV")' })
    .optional()
    .meta({ description: '"steepest" (largest |dI/dε|, default) or a detuning from the peak' }),
  shifts: z
    .record(z.string(), detuningSchema, { error: () => 'a mapping from state names to detuning shifts' })
    .meta({ description: 'Detuning shift of the sensor in each state (unlisted states: 0)' }),
  readoutRelaxation: z
    .array(relaxationSchema, { error: () => 'a list of readout-induced relaxation laws' })
    .optional()
    .meta({ description: 'Relaxation that the readout itself induces, rising with the bias (phenomenological)' }),
}).optional().meta({ description: 'Optional sensor front end: the levels follow from a sensor dot' });

/** Top-level keys of the sensor section. */
export const sensorShape = { sensor: sensorSchema };

/** Validated sensor keys. */
export type SensorDoc = z.output<typeof sensorSchema>;

/**
 * Resolves the sensor, sets every state's level to its sensor current (A) and records the unit
 * use; returns null without a sensor section.
 */
export function resolveSensor(doc: SensorDoc, ctx: ResolveContext, states: StateSpec[], prepare: number[], uses: SignalUse[]): SensorSpec | null {
  if (doc === undefined) return null;
  const at: KeyPath = ['sensor'];
  const detuning = (v: KindedValue, path: KeyPath): number => {
    if (v.index === 0) return v.value;
    if (doc.leverArm === undefined) ctx.fail([...at, 'leverArm'], 'a lever arm (a detuning is written as a gate voltage)', 'nothing');
    return v.value * doc.leverArm * ELEMENTARY_CHARGE;
  };
  const shifts = states.map(() => 0);
  for (const [stateName, v] of Object.entries(doc.shifts)) {
    const path = [...at, 'shifts', stateName];
    shifts[ctx.stateIndex(stateName, path, `"${stateName}"`)] = detuning(v, path);
  }
  const op = doc.operatingPoint ?? 'steepest';
  const operatingPoint = op === 'steepest' ? 'steepest' : detuning(op, [...at, 'operatingPoint']);
  const readoutRelaxation: ReadoutRelaxationSpec[] = (doc.readoutRelaxation ?? []).map((r, i) => {
    const p: KeyPath = [...at, 'readoutRelaxation', i];
    const from = ctx.stateIndex(r.from, [...p, 'from']);
    const to = ctx.stateIndex(r.to, [...p, 'to']);
    if (from === to) ctx.fail([...p, 'to'], `a state other than "from" ("${r.from}")`);
    if (r.law === 'power') {
      if (r.atBias === undefined) ctx.fail([...p, 'atBias'], 'the reference bias of the power law', 'nothing');
      if (r.exponent === undefined) ctx.fail([...p, 'exponent'], 'the exponent of the power law', 'nothing');
      if (r.scale !== undefined) ctx.fail([...p, 'scale'], 'no scale (it belongs to the exponential law)');
      return { from, to, law: { kind: 'power', rate0: r.rate, bias0: r.atBias, exponent: r.exponent }, combine: r.combine ?? 'add' };
    }
    if (r.scale === undefined) ctx.fail([...p, 'scale'], 'the bias scale of the exponential law', 'nothing');
    if (r.atBias !== undefined || r.exponent !== undefined) ctx.fail([...p, r.atBias !== undefined ? 'atBias' : 'exponent'], 'no power-law keys with law: exponential');
    return { from, to, law: { kind: 'exponential', rate0: r.rate, scale: r.scale }, combine: r.combine ?? 'add' };
  });
  const spec: SensorSpec = {
    tunnelLeft: doc.tunnelRates.left, tunnelRight: doc.tunnelRates.right, temperature: doc.temperature, bias: doc.bias,
    operatingPoint, shifts, readoutRelaxation,
  };
  const point = sensorOperatingPoint(spec, prepare);
  states.forEach((s, i) => { s.level = { re: point.levels[i]!, im: 0 }; });
  uses.push({ path: at, unit: 'A' });

  const kT = BOLTZMANN * doc.temperature;
  const broadening = REDUCED_PLANCK * (doc.tunnelRates.left + doc.tunnelRates.right);
  if (broadening > 0.1 * kT) {
    ctx.warn([...at, 'tunnelRates'], `ħΓ = ${formatQuantity(broadening / ELEMENTARY_CHARGE, 'eV')} is not small against kT = ${formatQuantity(kT / ELEMENTARY_CHARGE, 'eV')}: the sequential-tunnelling model neglects lifetime broadening`);
  }
  const spread = Math.max(...point.levels) - Math.min(...point.levels);
  if (!(spread > 0)) ctx.warn([...at, 'shifts'], 'every state gives the same sensor current: no signal');
  return spec;
}
