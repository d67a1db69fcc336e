import * as accountsAndProjects from './20261201-0001-accounts-and-projects';
import * as designsAndRuns from './20261201-0002-designs-and-runs';
import * as atomLibraries from './20261201-0003-atom-libraries';
import * as designRulesAndExports from './20261201-0004-design-rules-and-exports';
import * as toleranceStudies from './20261201-0005-tolerance-studies';
import * as review from './20261201-0006-review';
import * as linksAndTokens from './20261201-0007-links-and-tokens';
import * as runFilesAndQuotas from './20261203-0020-run-files-and-quotas';
import * as accountBoundaries from './20261203-0030-account-boundaries';
import * as atomLibraryShares from './20261203-0031-atom-library-shares';
import * as auditEvents from './20261203-0040-audit-events';
import * as libraryBuilds from './20261203-0050-library-builds';

/** Every migration in order. Add a new file `YYYYMMDD-NNNN-what.ts` and list it here. */
export const migrations = [
  { name: '20261201-0001-accounts-and-projects', ...accountsAndProjects },
  { name: '20261201-0002-designs-and-runs', ...designsAndRuns },
  { name: '20261201-0003-atom-libraries', ...atomLibraries },
  { name: '20261201-0004-design-rules-and-exports', ...designRulesAndExports },
  { name: '20261201-0005-tolerance-studies', ...toleranceStudies },
  { name: '20261201-0006-review', ...review },
  { name: '20261201-0007-links-and-tokens', ...linksAndTokens },
  { name: '20261203-0020-run-files-and-quotas', ...runFilesAndQuotas },
  { name: '20261203-0030-account-boundaries', ...accountBoundaries },
  { name: '20261203-0031-atom-library-shares', ...atomLibraryShares },
  { name: '20261203-0040-audit-events', ...auditEvents },
  { name: '20261203-0050-library-builds', ...libraryBuilds },
];
