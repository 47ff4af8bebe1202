/**
 * The `check` use case: everything `run` validates before it simulates — the file, the document,
 * and every point of its sweep (each resolved like a scenario of its own, so a swept value that
 * does not fit at one point is refused here, naming the point, as `run` would refuse it) — and
 * the one-line summary of what the scenario describes.
 */
import { loadScenarioDocument, loadScenarioFile, type LoadedScenario } from '../scenario/load.ts';
import { describeScenario } from '../scenario/summary.ts';
import { expandSweep } from '../run/sweep.ts';
import type { SweepPoint } from '../run/sweep-point.ts';

/** A checked scenario: its document, its points and warnings. */
export interface CheckedScenario {
  loaded: LoadedScenario;
  points: SweepPoint[];
  /** What the scenario describes, in one line. */
  summary: string;
}

function checked(loaded: LoadedScenario, file: string): CheckedScenario {
  const points = expandSweep(loaded.doc, loaded.scenario, file);
  const sweep = points.length > 1 ? `; ${points.length} sweep points` : '';
  return { loaded, points, summary: `${describeScenario(loaded.scenario)}${sweep}` };
}

/** Checks a scenario file as `run` would before simulating; problems are InputErrors. */
export async function checkScenarioFile(path: string): Promise<CheckedScenario> {
  return checked(await loadScenarioFile(path), path);
}

/** The same for a parsed document (`file` names it in messages). */
export function checkScenarioDocument(doc: unknown, file: string): CheckedScenario {
  return checked(loadScenarioDocument(doc, file), file);
}
