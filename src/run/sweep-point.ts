/** One point of a sweep: the swept values and the scenario with them applied. */
import type { Scenario } from '../scenario/types.ts';

export interface SweepPoint {
  parameters: Record<string, number>;
  /** SI unit of each parameter ('' for plain numbers), for the tables' field metadata. */
  units?: Record<string, string>;
  scenario: Scenario;
}
