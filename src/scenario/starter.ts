/**
 * The commented starter scenario written by `singleshot init`.
 */

const STARTER = `# singleshot scenario: an invented charge sensor next to a quantum dot.
# The sensor current is 0 pA while the dot is empty and 100 pA once an electron has tunnelled
# in; a spin state is read by mapping it to the dot being empty or loaded.
#
# Quantities are a number and a unit ("20 us", "10 MHz", "50 fA/rtHz", "0.5 meV/ns");
# a plain number is taken in SI units. Check this file with: singleshot check FILE
# A JSON Schema for editors: singleshot schema > scenario.schema.json
#
# With these numbers the expected mean assignment error is about 8e-4: relaxation in the
# window (about 1e-3 for the loaded state), the Landau-Zener mapping error (about 5e-4 for
# the loaded state); noise (SNR about 9) and the thermal preparation error add little.

name: Starter charge sensor
description: Invented device, baseband readout of a charge sensor with white noise.
seed: 1                  # run seed: the same seed gives the same shots
shots: 100000            # scored shots per point
# calibrationShots: 20000  # shots used to set the threshold (default: min(shots, 20000))
# batchSize: 4096          # shots simulated together

timing:
  sampleRate: 10 MHz
  recordLength: 20 us
  window: { start: 0 us, length: 10 us }   # the part of the record that is integrated
  # shotPeriod: 50 us                      # time between shot starts (default: recordLength)

states:                  # the hidden states; each reads as one of exactly two outcomes
  - name: empty
    level: 0 pA
    outcome: "0"
  - name: loaded
    level: 100 pA
    outcome: "1"

prepare: { empty: 0.5, loaded: 0.5 }       # weights of the prepared states

preparationError:        # keyed by the prepared state
  empty:
    # Boltzmann population of the upper state: about 9e-6 here.
    thermal: { splitting: 100 ueV, temperature: 100 mK, degeneracy: 1 }
    into: loaded
    # or simply:  probability: 1e-5

mappingError:            # keyed by the state after preparation
  loaded:
    # Landau-Zener probability of passing the anticrossing diabatically: about 5e-4 here.
    landauZener: { coupling: 20 ueV, sweepRate: 0.5 meV/ns }
    into: empty
    # or:  probability: 5e-4   (an optional extra  dephasing: 1e-4  is combined with it)

transitions:             # jumps during the record
  - { from: loaded, to: empty, lifetime: 5 ms }   # T1 of the loaded state (relaxation)

signal:
  unit: A
  carrier: none          # baseband; or baseband-iq (I and Q channels); or { shape: sine, frequency: 1 MHz, phase: 0 deg }
  gain: 1
  noise:
    white: { density: 50 fA/rtHz }   # or { perSample: 112 pA }

processing:
  referencePhase: auto   # or an angle such as 30 deg (matters for IQ readout)
  threshold: midpoint    # midpoint | optimal | { fixed: 50 pA }
`;

/** A commented YAML scenario to start from; it resolves without errors or warnings. */
export function starterScenario(): string {
  return STARTER;
}
