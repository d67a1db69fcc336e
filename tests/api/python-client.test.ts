/**
 * The Python client (clients/python/phasewright.py) driven end to end by the Python interpreter of the tests
 * against the real app listening on a loopback port, authenticated only with a personal access token: it saves
 * a design file whose picture is a file on disk, runs it, waits with its progress line, downloads every file,
 * loads the `.npy` arrays with numpy and fetches the fab package. Everything it got is checked against what the
 * API itself serves: file bytes byte for byte, arrays value for value (numpy's load on one side, our own
 * independent `.npy` reader on the other), the zip with Python's zipfile. The client is imported from its
 * folder through PYTHONPATH, as a copied file would be; nothing is pip-installed.
 */
import { spawn } from 'node:child_process';
import { createHash } from 'node:crypto';
import { copyFile, mkdir, mkdtemp, readFile, readdir, rm, writeFile } from 'node:fs/promises';
import type { Server } from 'node:http';
import { tmpdir } from 'node:os';
import { join, resolve } from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { decodeNpy } from '../../shared/optics/npy-decode';
import type { DesignInput } from '../../shared/schemas/design';
import type { Revision } from '../../shared/schemas/revisions';
import type { RunDetail } from '../../shared/schemas/runs';
import { download } from '../support/designs';
import { PYTHON } from '../support/python';
import { createTestApp, makeUser, signedInClient, type ApiClient, type TestApp } from '../support/test-app';

const CLIENT_FOLDER = resolve('clients/python');

let t: TestApp;
let server: Server;
let url: string;
let owner: ApiClient;
let projectId: number;
let writeToken: string;
let readToken: string;
let work: string;

/** Runs a Python script with the client importable; resolves with its output, rejects with all of it on failure. */
function python(script: string, args: string[]): Promise<{ stdout: string; stderr: string }> {
  return new Promise((resolvePromise, reject) => {
    // Asynchronous on purpose: the server answering the script lives in this process.
    const child = spawn(PYTHON, ['-c', script, ...args], {
      env: { ...process.env, PYTHONPATH: CLIENT_FOLDER, PYTHONDONTWRITEBYTECODE: '1', PYTHONIOENCODING: 'utf-8' },
      stdio: ['ignore', 'pipe', 'pipe'],
    });
    let stdout = '';
    let stderr = '';
    child.stdout.on('data', (d: Buffer) => (stdout += d.toString()));
    child.stderr.on('data', (d: Buffer) => (stderr += d.toString()));
    child.on('error', reject);
    child.on('close', (code) => (code === 0 ? resolvePromise({ stdout, stderr }) : reject(new Error(`python exited ${code}\n${stderr}\n${stdout}`))));
  });
}

const sha256 = (bytes: Uint8Array) => createHash('sha256').update(bytes).digest('hex');

async function createToken(scope: 'read' | 'write'): Promise<string> {
  const res = await owner.post('/api/access-tokens', { name: `python ${scope}`, scope, currentPassword: 'correct horse battery' });
  expect(res.status, JSON.stringify(res.body)).toBe(201);
  return res.body.token as string;
}

/**
 * A design file as the command line reads it, small enough to run in about a second: 64² cells, channel A a
 * picture named as a file beside the design (so the client must upload it), channel B an analytic tilt.
 */
function designFile(): DesignInput {
  return {
    format: 'phasewright-design/1',
    name: 'Scripted tag',
    setup: { wavelengthNm: 633, periodNm: 450, cells: 64 },
    polarization: { kind: 'circular', handedness: 'left' },
    channels: {
      a: {
        label: 'Lighthouse',
        terms: [{ kind: 'hologram', image: { source: 'file', path: 'pictures/lighthouse.png' }, window: { units: 'degrees', width: 14, centerX: 16 }, iterations: 6, seed: 3 }],
      },
      b: { label: 'Tilt', terms: [{ kind: 'tilt', thetaXDeg: -12 }] },
    },
  };
}

beforeAll(async () => {
  t = await createTestApp();
  server = t.app.listen(0, '127.0.0.1');
  await new Promise((r) => server.once('listening', r));
  url = `http://127.0.0.1:${(server.address() as { port: number }).port}`;
  const ownerUser = await makeUser({ name: 'Script Owner' });
  owner = await signedInClient(t.app, ownerUser);
  projectId = (await owner.post('/api/projects', { name: 'Scripted metasurface' })).body.project.id;
  await owner.post('/api/projects', { name: 'Another project' });
  writeToken = await createToken('write');
  readToken = await createToken('read');
  work = await mkdtemp(join(tmpdir(), 'pw-python-'));
  await writeFile(join(work, 'design.json'), JSON.stringify(designFile(), null, 2));
  await mkdir(join(work, 'pictures'));
  await copyFile('demo-assets/images/lighthouse.png', join(work, 'pictures', 'lighthouse.png'));
});
afterAll(async () => {
  server?.closeAllConnections();
  if (server) await new Promise((r) => server.close(r));
  await t?.close();
  if (work) await rm(work, { recursive: true, force: true });
});

/** The whole loop from Python; prints one JSON object describing what it got. */
const DRIVE = `
import hashlib, json, sys, zipfile
import numpy as np
import phasewright as pw

url, token, work = sys.argv[1:4]
server = pw.Workbench(url, token=token)
projects = server.projects()
project = next(p for p in projects if p["name"] == "Scripted metasurface")
revision = server.save_revision(project["id"], work + "/design.json", message="saved from Python")
run = server.start_run(project["id"], revision["number"])
run = server.wait(project["id"], run["id"], poll=0.2, timeout=120)
files = server.download(project["id"], run["id"], work + "/files")
arrays = files.arrays()
in_memory = server.array(project["id"], run["id"], "phase_a")
assert np.array_equal(in_memory, arrays["phase_a"]), "array() and download() disagree"
package = server.fab_package(project["id"], run["id"], work)
with zipfile.ZipFile(package) as z:
    first_bad = z.testzip()
    members = {i.filename: hashlib.sha256(z.read(i.filename)).hexdigest() for i in z.infolist()}

def data_hash(a):
    # The values in C order as little-endian bytes: equal hashes mean equal arrays, value for value.
    return hashlib.sha256(np.ascontiguousarray(a, dtype=a.dtype.newbyteorder("<")).tobytes()).hexdigest()

print(json.dumps({
    "projects": sorted(p["name"] for p in projects),
    "revision": revision["number"],
    "run": {"id": run["id"], "status": run["status"]},
    "files": {name: hashlib.sha256(files.path(name).read_bytes()).hexdigest() for name in files.names()},
    "arrays": {name: {"shape": list(a.shape), "dtype": a.dtype.str, "data": data_hash(a), "sum": float(np.nansum(a.astype("float64")))} for name, a in arrays.items()},
    "metricsKeys": sorted(files.json("metrics").keys()),
    "package": {"name": package.name, "firstBad": first_bad, "members": members},
}))
`;

interface Driven {
  projects: string[];
  revision: number;
  run: { id: number; status: string };
  files: Record<string, string>;
  arrays: Record<string, { shape: number[]; dtype: string; data: string; sum: number }>;
  metricsKeys: string[];
  package: { name: string; firstBad: string | null; members: Record<string, string> };
}

describe('the Python client', () => {
  let driven: Driven;
  let progress: string;
  let run: RunDetail;

  beforeAll(async () => {
    const { stdout, stderr } = await python(DRIVE, [url, writeToken, work]);
    driven = JSON.parse(stdout) as Driven;
    progress = stderr;
    const res = await owner.get(`/api/projects/${projectId}/runs/${driven.run.id}`);
    expect(res.status).toBe(200);
    run = res.body.run as RunDetail;
  }, 180_000);

  it('lists the projects of the token’s owner and saves the design file as a revision, its picture uploaded', async () => {
    expect(driven.projects).toEqual(['Another project', 'Scripted metasurface']);
    const res = await owner.get(`/api/projects/${projectId}/revisions/${driven.revision}`);
    expect(res.status).toBe(200);
    const revision = res.body.revision as Revision;
    expect(revision.message).toBe('saved from Python');
    expect(revision.design.setup.cells).toBe(64);
    const term = revision.design.channels.a.terms[0];
    expect(term.kind).toBe('hologram');
    const image = term.kind === 'hologram' ? term.image : null;
    expect(image).toMatchObject({ source: 'upload' });
    const id = image?.source === 'upload' ? image.id : 0;
    const content = await download(owner, `/api/projects/${projectId}/uploads/${id}/content`);
    expect(content.status).toBe(200);
    expect(sha256(content.body as Buffer)).toBe(sha256(await readFile('demo-assets/images/lighthouse.png')));
  });

  it('runs it to the end and shows a progress line that finishes at 100 %', () => {
    expect(driven.run.status).toBe('succeeded');
    expect(run.status).toBe('succeeded');
    expect(run.revisionNumber).toBe(driven.revision);
    // The line is rewritten in place with \\r and ends with a newline once the run has finished.
    const last = progress.split('\r').at(-1)!;
    expect(last).toMatch(new RegExp(`^run ${run.id} · succeeded · 100 % · \\d+ s\\s*\\n$`));
  });

  it('downloads every file of the run, byte for byte what the API serves', async () => {
    expect(Object.keys(driven.files).sort()).toEqual(run.artifacts.map((a) => a.name).sort());
    expect(Object.keys(driven.files)).toEqual(expect.arrayContaining(['phase_a.npy', 'phase_b.npy', 'theta.npy', 'atom_index.npy', 'farfield_a.npy', 'layout.gds', 'metrics.json']));
    for (const artifact of run.artifacts) {
      const res = await download(owner, `/api/projects/${projectId}/runs/${run.id}/artifacts/${artifact.name}`);
      expect(res.status).toBe(200);
      expect(driven.files[artifact.name], artifact.name).toBe(sha256(res.body as Buffer));
    }
    // Nothing else was left in the folder (no partial downloads).
    expect((await readdir(join(work, 'files'))).sort()).toEqual(Object.keys(driven.files).sort());
    expect(driven.metricsKeys).toEqual(expect.arrayContaining(['inputs']));
  });

  it('loads the .npy arrays with numpy, value for value equal to the server’s files read by an independent reader', async () => {
    const npyNames = run.artifacts.map((a) => a.name).filter((n) => n.endsWith('.npy'));
    expect(Object.keys(driven.arrays).sort()).toEqual(npyNames.map((n) => n.replace(/\.npy$/, '')).sort());
    for (const name of npyNames) {
      const res = await download(owner, `/api/projects/${projectId}/runs/${run.id}/artifacts/${name}`);
      const served = decodeNpy(new Uint8Array(res.body as Buffer));
      const got = driven.arrays[name.replace(/\.npy$/, '')];
      expect(got.shape, name).toEqual(served.shape);
      expect(got.shape, name).toEqual([64, 64]);
      // Both sides as little-endian values in C order (decodeNpy gives native, i.e. little-endian, typed arrays).
      expect(got.data, name).toBe(sha256(new Uint8Array(served.data.buffer, served.data.byteOffset, served.data.byteLength)));
      let sum = 0;
      let scale = 0;
      for (const v of served.data) {
        if (Number.isNaN(v)) continue;
        sum += v;
        scale += Math.abs(v);
      }
      // Same values summed in a different order: equal to rounding (relative 1e-9 of the magnitude summed).
      expect(Math.abs(got.sum - sum), name).toBeLessThanOrEqual(1e-9 * Math.max(1, scale));
    }
    expect(driven.arrays.phase_a.dtype).toBe('<f8');
    expect(driven.arrays.atom_index.dtype).toBe('<i4');
  });

  it('fetches the fab package: a valid zip holding the run’s arrays and layout unchanged', async () => {
    expect(driven.package.name).toBe(`fab-package-run${run.id}.zip`);
    expect(driven.package.firstBad).toBeNull();
    const members = Object.entries(driven.package.members);
    const member = (file: string) => members.find(([name]) => name.endsWith(`/${file}`))?.[1];
    for (const file of ['phase_a.npy', 'atom_index.npy', 'layout.gds']) {
      expect(member(file), file).toBe(driven.files[file]);
    }
    expect(members.some(([name]) => name.endsWith('/report.html'))).toBe(true);
    const zip = await readFile(join(work, driven.package.name));
    // Local file header signature "PK\\x03\\x04" (PKWARE APPNOTE.TXT 4.3.7).
    expect([...zip.subarray(0, 4)]).toEqual([0x50, 0x4b, 0x03, 0x04]);
  });
});

/** Each failure from Python: the exception's class, status and message, or "no exception". */
const FAILURES = `
import json, sys
import phasewright as pw

url, good, read_only, project_id = sys.argv[1], sys.argv[2], sys.argv[3], int(sys.argv[4])
out = {}
def attempt(key, action):
    try:
        action()
        out[key] = "no exception"
    except pw.PhasewrightError as e:
        out[key] = {"type": type(e).__name__, "isRefusal": isinstance(e, pw.RequestRefused),
                    "status": getattr(e, "status", None), "message": getattr(e, "message", None),
                    "details": getattr(e, "details", None), "text": str(e)}

attempt("badToken", lambda: pw.Workbench(url, token="pwt_this-token-does-not-exist").projects())
attempt("readOnly", lambda: pw.Workbench(url, token=read_only).create_project("Not from a read token"))
attempt("badDesign", lambda: pw.Workbench(url, token=good).save_revision(project_id, {"name": "Too many cells", "setup": {"wavelengthNm": 633, "periodNm": 450, "cells": 100}, "polarization": {"kind": "linear", "angleDeg": 0}, "channels": {"a": {"terms": [{"kind": "tilt", "thetaXDeg": 5}]}, "b": {"terms": [{"kind": "tilt", "thetaXDeg": -5}]}}}))
attempt("noRun", lambda: pw.Workbench(url, token=good).run(project_id, 999999))
attempt("noServer", lambda: pw.Workbench("http://127.0.0.1:9", token=good).projects())
attempt("noToken", lambda: pw.Workbench(url, token=""))
print(json.dumps(out))
`;

describe('the Python client’s errors', () => {
  it('raises clear exceptions carrying the server’s message: bad token, read-only token, bad design, unknown run', async () => {
    const { stdout } = await python(FAILURES, [url, writeToken, readToken, String(projectId)]);
    const out = JSON.parse(stdout);
    expect(out.badToken).toMatchObject({
      type: 'TokenRejected',
      isRefusal: true,
      status: 401,
      message: 'This access token is not valid — check it, or create a new one in Settings',
    });
    expect(out.badToken.text).toBe('This access token is not valid — check it, or create a new one in Settings (401 on GET /api/projects?status=active)');
    expect(out.readOnly).toMatchObject({ type: 'NotAllowed', status: 403 });
    expect(out.readOnly.message).toMatch(/read-only scope "read"; POST needs a token with the "write" scope/);
    expect(out.badDesign).toMatchObject({ type: 'BadRequest', status: 400 });
    expect(out.badDesign.details['design.setup.cells']).toMatch(/64, 128, 256, 512, 1024, 2048, 4096/);
    // The server's message names the field already; the exception does not repeat it.
    expect(out.badDesign.text).toMatch(/^Invalid body — design\.setup\.cells: cells must be one of 64, 128, 256, 512, 1024, 2048, 4096 \(400 on POST \/api\/projects\/\d+\/revisions\)$/);
    expect(out.noRun).toMatchObject({ type: 'NotFound', status: 404, message: 'This project has no run 999999' });
    expect(out.noServer).toMatchObject({ type: 'ServerUnreachable', isRefusal: false });
    expect(out.noServer.text).toMatch(/^No answer from http:\/\/127\.0\.0\.1:9 /);
    expect(out.noToken.text).toMatch(/^No access token: pass token='pwt_…' or set PHASEWRIGHT_TOKEN/);
  });
});
