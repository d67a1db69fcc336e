import * as accountsAndProjects from './20261201-0001-accounts-and-projects';

/** Every migration in order. Add a new file `YYYYMMDD-NNNN-what.ts` and list it here. */
export const migrations = [{ name: '20261201-0001-accounts-and-projects', ...accountsAndProjects }];
