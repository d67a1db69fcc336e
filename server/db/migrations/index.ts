import * as accountsAndProjects from './20261201-0001-accounts-and-projects';
import * as designsAndRuns from './20261201-0002-designs-and-runs';

/** Every migration in order. Add a new file `YYYYMMDD-NNNN-what.ts` and list it here. */
export const migrations = [
  { name: '20261201-0001-accounts-and-projects', ...accountsAndProjects },
  { name: '20261201-0002-designs-and-runs', ...designsAndRuns },
];
