/**
 * Backup and restore with the real commands (`npm run backup`, `npm run restore`): a run's files survive a
 * backup, a wiped data folder (a fresh MariaDB on another port) and a restore byte for byte, as downloaded
 * through the API; a damaged or foreign file and a database that is not empty are refused with a message
 * and change nothing.
 */
import { spawn } from 'node:child_process';
import { createHash, randomBytes } from 'node:crypto';
import { chmodSync, mkdirSync, mkdtempSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import path from 'node:path';
import { gunzipSync, gzipSync } from 'node:zlib';
import type { Express } from 'express';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { RunDetail } from '../../shared/schemas/runs';
import { freePort } from '../../scripts/lib/free-port';
import { startMariaDb, type RunningMariaDb } from '../../scripts/lib/mariadb';
import { createApp } from '../../server/app';
import { ARTIFACT_CHUNK_BYTES, storeArtifacts } from '../../server/components/runs/run-artifacts';
import { createEmbeddedRunQueue } from '../../server/components/runs/run-queue';
import { RunModel } from '../../server/components/runs/run.model';
import type { AppConfig } from '../../server/config';
import { createSequelize, migrateUp } from '../../server/db/database';
import { download, twinImageDesign, waitForRun } from '../support/designs';
import { createTestApp, makeUser, signedInClient, type TestApp } from '../support/test-app';

let t: TestApp;
let work: string;
let restoredDb: RunningMariaDb | null = null;
let restoredSequelize: ReturnType<typeof createSequelize> | null = null;

beforeAll(async () => {
  t = await createTestApp();
  work = mkdtempSync(path.join(tmpdir(), 'pw-backup-test-'));
  // Reachable by the database's own system user, as a real installation folder is (the data folder inside
  // is closed to others by the start code itself).
  chmodSync(work, 0o755);
});
afterAll(async () => {
  await restoredSequelize?.close();
  await restoredDb?.stop();
  await t?.close();
  if (work) rmSync(work, { recursive: true, force: true });
});

interface Outcome {
  code: number | null;
  stdout: string;
  stderr: string;
}

/** `npm run <command> -- <args>` as a person would type it, with the database settings in the environment. */
function npmRun(command: 'backup' | 'restore', args: string[], env: Record<string, string>): Promise<Outcome> {
  return new Promise((resolve, reject) => {
    const child = spawn('npm', ['run', '--silent', command, '--', ...args], { env: { ...process.env, ...env }, stdio: ['ignore', 'pipe', 'pipe'] });
    let stdout = '';
    let stderr = '';
    child.stdout.on('data', (d: Buffer) => (stdout += d.toString()));
    child.stderr.on('data', (d: Buffer) => (stderr += d.toString()));
    child.once('error', reject);
    child.once('close', (code) => resolve({ code, stdout, stderr }));
  });
}

function dbEnv(config: Pick<AppConfig, 'DB_PORT' | 'DB_NAME' | 'DB_USER' | 'DB_PASSWORD'>, dataDir: string): Record<string, string> {
  return {
    DB_HOST: '127.0.0.1',
    DB_PORT: String(config.DB_PORT),
    DB_NAME: config.DB_NAME,
    DB_USER: config.DB_USER,
    DB_PASSWORD: config.DB_PASSWORD,
    DB_DATA_DIR: dataDir,
  };
}

const sha256 = (bytes: Buffer) => createHash('sha256').update(bytes).digest('hex');

/** Every file of the run, downloaded through the API, as name → SHA-256. */
async function runFileHashes(app: Express, user: { email: string; password: string }, projectId: number, runId: number) {
  const client = await signedInClient(app, user);
  const run = (await client.get(`/api/projects/${projectId}/runs/${runId}`).expect(200)).body.run as RunDetail;
  const hashes: Record<string, string> = {};
  for (const artifact of run.artifacts) {
    const res = await download(client, `/api/projects/${projectId}/runs/${runId}/artifacts/${encodeURIComponent(artifact.name)}`);
    expect(res.status).toBe(200);
    expect((res.body as Buffer).length).toBe(artifact.size);
    hashes[artifact.name] = sha256(res.body as Buffer);
  }
  return hashes;
}

describe('npm run backup / npm run restore', () => {
  it('brings back a succeeded run whose files download byte-identical into a fresh data folder', { timeout: 240_000 }, async () => {
    const designer = await makeUser({ name: 'Backup Designer' });
    const client = await signedInClient(t.app, designer);
    const project = (await client.post('/api/projects', { name: 'Backed-up project' })).body.project;
    await client.post(`/api/projects/${project.id}/revisions`, { design: twinImageDesign() }).expect(201);
    const queued = (await client.post(`/api/projects/${project.id}/revisions/1/runs`).expect(202)).body.run;
    const run = await waitForRun(client, project.id, queued.id);
    expect(run.status).toBe('succeeded');
    const before = await runFileHashes(t.app, designer, project.id, run.id);
    expect(Object.keys(before)).toEqual(expect.arrayContaining(['phase_a.npy', 'layout.gds', 'metrics.json']));
    // A second run with a large file: three chunks, two of the full 8 MiB (16 MiB statements as hex).
    const large = await RunModel.create({ projectId: project.id, revisionId: (await RunModel.findByPk(run.id))!.revisionId, startedById: designer.id, queuedAt: new Date(), status: 'succeeded', progress: 1, stage: 'done', finishedAt: new Date() });
    const largeDir = path.join(work, 'large-run');
    mkdirSync(largeDir);
    writeFileSync(path.join(largeDir, 'layout.gds'), randomBytes(2 * ARTIFACT_CHUNK_BYTES + 12_345));
    await storeArtifacts(large.id, largeDir, [{ name: 'layout.gds', bytes: 0 }]);
    const largeBefore = await runFileHashes(t.app, designer, project.id, large.id);

    // Back up the live database (the app is still connected to it).
    const file = path.join(work, 'phasewright.sql.gz');
    const sourceEnv = dbEnv(t.ctx.config, path.join(work, 'unused-data'));
    const backup = await npmRun('backup', [file], sourceEnv);
    expect(backup.stderr).toBe('');
    expect(backup.code).toBe(0);
    expect(backup.stdout).toMatch(/2 runs with \d+ run files/);
    expect(readFileSync(file).subarray(0, 2)).toEqual(Buffer.from([0x1f, 0x8b]));
    const dump = gunzipSync(readFileSync(file)).toString('latin1');
    expect(dump.slice(0, 512)).toMatch(/^-- MariaDB dump/m);
    expect(/INSERT INTO `run_artifact_chunks` VALUES\s*\(\d+,\d+,0,0x[0-9A-F]{64}/.test(dump)).toBe(true);

    const again = await npmRun('backup', [file], sourceEnv);
    expect(again.code).toBe(1);
    expect(again.stderr).toMatch(/already exists; a backup never overwrites a file/);

    // Wipe: a fresh, empty data folder on another port, nothing running there yet.
    const dataDir = path.join(work, 'restored-data');
    const target = { DB_PORT: await freePort(), DB_NAME: 'phasewright_restored', DB_USER: 'phasewright', DB_PASSWORD: 'restored "secret" \\ pass' };
    const targetEnv = dbEnv(target, dataDir);
    const restore = await npmRun('restore', [file], targetEnv);
    expect(restore.stderr).toBe('');
    expect(restore.code).toBe(0);
    expect(restore.stdout).toMatch(/Restored .* \d+ tables, 2 runs with \d+ run files/);

    // Bad files are refused before anything is touched.
    const bad = async (name: string, bytes: Buffer, message: RegExp) => {
      writeFileSync(path.join(work, name), bytes);
      const res = await npmRun('restore', [path.join(work, name)], targetEnv);
      expect(res.code).toBe(1);
      expect(res.stderr).toMatch(message);
      expect(res.stderr).not.toMatch(/\n\s+at /);
    };
    await bad('plain.sql', Buffer.from(dump.slice(0, 4000)), /not gzip-compressed/);
    await bad('truncated.sql.gz', readFileSync(file).subarray(0, Math.floor(readFileSync(file).length / 2)), /is damaged .*nothing was restored/);
    await bad('cut-short.sql.gz', gzipSync(Buffer.from(dump.slice(0, dump.lastIndexOf('-- Dump completed')), 'latin1')), /is incomplete/);
    await bad('other.sql.gz', gzipSync('-- MariaDB dump 10.19\nCREATE TABLE `t` (`id` int);\n-- Dump completed on 2026-12-03\n'), /not of a Phasewright database/);
    await bad('notes.txt.gz', gzipSync('shopping list'), /holds no MariaDB dump/);
    const missing = await npmRun('restore', [path.join(work, 'nowhere.sql.gz')], targetEnv);
    expect(missing.stderr).toMatch(/does not exist or is not a file/);
    const usage = await npmRun('restore', [], targetEnv);
    expect(usage.code).toBe(2);
    expect(usage.stderr).toMatch(/^Usage: npm run restore -- FILE/);

    // The restore stopped the server it started; bring the restored data folder up and read it through the API.
    restoredDb = await startMariaDb({ dataDir, port: target.DB_PORT, user: target.DB_USER, password: target.DB_PASSWORD, databases: [], grants: [target.DB_NAME, 'phasewright_broken'] });
    expect(restoredDb.started).toBe(true);
    const refused = await npmRun('restore', [file], targetEnv);
    expect(refused.code).toBe(1);
    expect(refused.stderr).toMatch(/^Restore refused: the database "phasewright_restored" on 127\.0\.0\.1:\d+ already holds \d+ tables/);

    // A load that fails half-way (here: a bad row after every table exists) is undone, leaving the database empty.
    const end = dump.lastIndexOf('-- Dump completed');
    const broken = `${dump.slice(0, end)}INSERT INTO \`users\` VALUES (1,'not a whole row');\n${dump.slice(end)}`;
    writeFileSync(path.join(work, 'broken.sql.gz'), gzipSync(Buffer.from(broken, 'latin1')));
    const failed = await npmRun('restore', [path.join(work, 'broken.sql.gz')], { ...targetEnv, DB_NAME: 'phasewright_broken' });
    expect(failed.code).toBe(1);
    expect(failed.stderr).toMatch(/^The restore failed and was undone \(the database is empty again\): mariadb stopped \(exit code 1\): ERROR 1136 .*Column count doesn't match value count at row 1\n$/);

    const config: AppConfig = { ...t.ctx.config, ...target };
    restoredSequelize = createSequelize(config);
    expect(await migrateUp(restoredSequelize)).toEqual([]);
    const [leftOver] = await restoredSequelize.query("SELECT COUNT(*) AS n FROM information_schema.tables WHERE table_schema = 'phasewright_broken'");
    expect(Number((leftOver as { n: number }[])[0].n)).toBe(0);
    const runQueue = createEmbeddedRunQueue({ logger: t.ctx.logger, threads: 1 });
    const { app } = createApp({ ...t.ctx, config, sequelize: restoredSequelize, runQueue });
    expect(await runFileHashes(app, designer, project.id, run.id)).toEqual(before);
    expect(await runFileHashes(app, designer, project.id, large.id)).toEqual(largeBefore);
  });
});
