// Entry of a worker thread started by ts-worker.ts on a TypeScript module: loads the module named by the
// worker's first argument through tsx (resolved from this file, so from the repository's node_modules).
import { tsImport } from 'tsx/esm/api';

await tsImport(process.argv[2], import.meta.url);
