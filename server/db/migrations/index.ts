import * as accountsAndProjects from './20261201-0001-accounts-and-projects';
import * as designsAndRuns from './20261201-0002-designs-and-runs';
import * as atomLibraries from './20261201-0003-atom-libraries';
import * as designRulesAndExports from './20261201-0004-design-rules-and-exports';
import * as toleranceStudies from './20261201-0005-tolerance-studies';

/** Every migration in order. Add a new file `YYYYMMDD-NNNN-what.ts` and list it here. */
export const migrations = [
  { name: '20261201-0001-accounts-and-projects', ...accountsAndProjects },
  { name: '20261201-0002-designs-and-runs', ...designsAndRuns },
  { name: '20261201-0003-atom-libraries', ...atomLibraries },
  { name: '20261201-0004-design-rules-and-exports', ...designRulesAndExports },
  { name: '20261201-0005-tolerance-studies', ...toleranceStudies },
];
