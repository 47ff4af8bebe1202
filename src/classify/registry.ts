/**
 * The classifiers a pipeline can use (`classifier:` in a scenario), each one file behind the
 * classifier contract (contract.ts). A new classifier is its file and a line here.
 */
import type { PipelineSpec } from '../scenario/types.ts';
import type { ClassifierKind } from './contract.ts';
import { thresholdClassifier } from './threshold-classifier.ts';
import { likelihoodClassifier } from './likelihood-classifier.ts';
import { peakClassifier } from './peak-classifier.ts';

export const CLASSIFIERS: readonly ClassifierKind[] = [thresholdClassifier, likelihoodClassifier, peakClassifier];

/** The classifier every pipeline uses unless it names another. */
export const DEFAULT_CLASSIFIER = thresholdClassifier.name;

/** The classifier called `name` (a name not registered is a bug: the scenario refuses it). */
export function classifierNamed(name: string): ClassifierKind {
  const kind = CLASSIFIERS.find((k) => k.name === name);
  if (!kind) throw new Error(`unknown classifier "${name}"`);
  return kind;
}

/** The classifier of a pipeline. */
export function classifierOf(spec: Pick<PipelineSpec, 'classifier'>): ClassifierKind {
  return classifierNamed(spec.classifier ?? DEFAULT_CLASSIFIER);
}

/** Whether calibration needs the decimated records of this pipeline's calibration shots (calibrated weights, or a classifier that reads bins). */
export function needsCalibrationBins(spec: Pick<PipelineSpec, 'classifier' | 'weights'>): boolean {
  return (spec.weights ?? 'boxcar') !== 'boxcar' || classifierOf(spec).readsBins;
}

/** Whether scoring needs the decimated record of every scored shot (a classifier that reads bins). */
export function needsScoreBins(spec: Pick<PipelineSpec, 'classifier'>): boolean {
  return classifierOf(spec).readsBins;
}
