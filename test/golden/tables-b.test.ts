/** The second half of the pinned runs (pinned.ts). */
import { pinnedRuns } from './pinned.ts';

pinnedRuns(1, 2);
