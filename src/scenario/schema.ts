/**
 * The scenario file schema, composed from one shape per section. A new section adds its file
 * under `sections/` and one line here (and one call in `resolve.ts`).
 */
import { section } from './fields.ts';
import { runShape } from './sections/run.ts';
import { timingShape } from './sections/timing.ts';
import { statesShape } from './sections/states.ts';
import { prepareShape } from './sections/prepare.ts';
import { flipsShape } from './sections/flips.ts';
import { transitionsShape } from './sections/transitions.ts';
import { signalShape } from './sections/signal.ts';
import { sensorShape } from './sections/sensor.ts';
import { processingShape } from './sections/processing.ts';
import { sweepShape } from './sections/sweep.ts';

/** All top-level keys, in the order a file usually lists them. */
export const scenarioShape = {
  ...runShape,
  ...timingShape,
  ...statesShape,
  ...prepareShape,
  ...flipsShape,
  ...transitionsShape,
  ...sensorShape,
  ...signalShape,
  ...processingShape,
  ...sweepShape,
};

/** The zod schema of a scenario document (before resolution: units read, defaults not filled). */
export const scenarioSchema = section(scenarioShape, 'a mapping of scenario keys (name, timing, states, …)').meta({
  title: 'singleshot scenario',
  description: 'A simulated single-shot readout: device states, errors, signal chain and processing',
});
