/** Small scenario texts for sweep, refinement and report tests (invented numbers, a few thousand shots). */

/** A baseband two-state readout with relaxation; `sweep` is appended as the sweep section. */
export function smallScenario(sweep: string, name = 'small sweep test'): string {
  return `name: ${JSON.stringify(name)}
seed: 11
shots: 2048
calibrationShots: 1024
timing:
  sampleRate: 10 MHz
  recordLength: 12 us
  window: { start: 0.5 us, length: 4 us }
states:
  - { name: low, level: 0 pA, outcome: "0" }
  - { name: high, level: 100 pA, outcome: "1" }
prepare: { low: 0.5, high: 0.5 }
transitions:
  - { from: high, to: low, lifetime: 200 us }
signal:
  carrier: none
  noise:
    white: { density: 40 fA/rtHz }
processing:
  threshold: midpoint
${sweep}`;
}

/** A 3 × 4 grid over the window length and the lifetime. */
export const GRID_3x4 = `sweep:
  vary:
    - key: timing.window.length
      values: ["1 us", "2 us", "4 us"]
    - key: transitions[0].lifetime
      range: { from: 50 us, to: 400 us, count: 4, spacing: log }
`;

/** Four zipped points over the window length and the noise density. */
export const ZIP_4 = `sweep:
  combine: zip
  vary:
    - key: timing.window.length
      values: ["1 us", "2 us", "3 us", "4 us"]
    - key: signal.noise.white.density
      values: ["30 fA/rtHz", "35 fA/rtHz", "40 fA/rtHz", "45 fA/rtHz"]
`;
