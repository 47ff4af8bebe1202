/** The first half of the pinned runs (pinned.ts). */
import { pinnedRuns } from './pinned.ts';

pinnedRuns(0, 2);
