import { createHash } from 'node:crypto';
import { crc32 } from 'node:zlib';
import { Jimp } from 'jimp';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { UploadModel } from '../../server/components/uploads/upload.model';
import { encodeNpy } from '../../shared/optics/npy';
import { decodeNpy } from '../../shared/optics/npy-decode';
import { UPLOAD_LIMITS } from '../../shared/schemas/uploads';
import { download, twinImageDesign, waitForRun } from '../support/designs';
import { pngChunk } from '../support/hostile-corpus';
import { createTestApp, makeUser, signedInClient, type ApiClient, type TestApp } from '../support/test-app';

let t: TestApp;
let designer: ApiClient;
let projectId: number;
let png: Buffer;
let jpeg: Buffer;

/** A 64×48 grayscale gradient with a bright square, as PNG or JPEG. */
async function picture(mime: 'image/png' | 'image/jpeg', width = 64, height = 48): Promise<Buffer> {
  const image = new Jimp({ width, height, color: 0x000000ff });
  for (let y = 0; y < height; y++) {
    for (let x = 0; x < width; x++) {
      const g = x > 20 && x < 40 && y >= 10 && y < 30 ? 255 : Math.round((200 * x) / width);
      image.setPixelColor(((g << 24) | (g << 16) | (g << 8) | 0xff) >>> 0, x, y);
    }
  }
  return mime === 'image/png' ? image.getBuffer('image/png') : image.getBuffer('image/jpeg', { quality: 90 });
}

/** Pearson correlation of two equally long lists. */
function pearson(a: number[], b: number[]): number {
  const mean = (v: number[]) => v.reduce((s, x) => s + x, 0) / v.length;
  const ma = mean(a);
  const mb = mean(b);
  let ab = 0;
  let aa = 0;
  let bb = 0;
  a.forEach((x, i) => {
    ab += (x - ma) * (b[i] - mb);
    aa += (x - ma) ** 2;
    bb += (b[i] - mb) ** 2;
  });
  return ab / Math.sqrt(aa * bb);
}

/** A PNG that only claims a size: valid signature and IHDR, a tiny IDAT, IEND. */
function claimedPng(width: number, height: number): Buffer {
  const ihdr = Buffer.alloc(13);
  ihdr.writeUInt32BE(width, 0);
  ihdr.writeUInt32BE(height, 4);
  ihdr[8] = 8; // bit depth
  ihdr[9] = 0; // grayscale
  return Buffer.concat([
    Buffer.from([0x89, 0x50, 0x4e, 0x47, 0x0d, 0x0a, 0x1a, 0x0a]),
    pngChunk('IHDR', ihdr),
    pngChunk('IDAT', Buffer.from([0x78, 0x9c, 0x03, 0x00, 0x00, 0x00, 0x00, 0x01])),
    pngChunk('IEND', Buffer.alloc(0)),
  ]);
}

function send(kind: string | null, bytes: Buffer | null, filename = 'target.png', contentType = 'image/png') {
  const req = designer.agent.post(`/api/projects/${projectId}/uploads`).set('x-csrf-token', designer.csrfToken);
  if (kind !== null) req.field('kind', kind);
  if (bytes) req.attach('file', bytes, { filename, contentType });
  return req;
}

beforeAll(async () => {
  t = await createTestApp();
  designer = await signedInClient(t.app, await makeUser({ name: 'Upload Designer' }));
  projectId = (await designer.post('/api/projects', { name: 'Uploads project' })).body.project.id;
  png = await picture('image/png');
  jpeg = await picture('image/jpeg');
});
afterAll(async () => {
  await t?.close();
});

describe('uploads that are accepted', () => {
  it('stores a PNG with the size read from its header and serves it back unchanged', async () => {
    const res = await send('image', png, 'C:\\targets\\Lighthouse "v2".PNG');
    expect(res.status, JSON.stringify(res.body)).toBe(201);
    expect(res.body.upload).toMatchObject({ kind: 'image', mime: 'image/png', width: 64, height: 48, size: png.length, name: 'Lighthouse v2.png', createdBy: { name: 'Upload Designer' } });
    const id = res.body.upload.id;
    const list = await designer.get(`/api/projects/${projectId}/uploads`);
    expect(list.body.uploads.map((u: { id: number }) => u.id)).toContain(id);
    const content = await download(designer, `/api/projects/${projectId}/uploads/${id}/content`);
    expect(content.headers['content-type']).toBe('image/png');
    expect(content.headers['content-disposition']).toBe('inline; filename="Lighthouse v2.png"');
    expect(Buffer.compare(content.body, png)).toBe(0);
    // The hash is computed off the request thread, with the decode; it is the hash of the stored bytes.
    expect((await UploadModel.findByPk(id, { attributes: ['sha256'] }))?.sha256).toBe(createHash('sha256').update(png).digest('hex'));
    // …and the listing carries it, so a client sees a file it already uploaded (node:crypto, independent of the server's hashing).
    expect(list.body.uploads.find((u: { id: number }) => u.id === id).sha256).toBe(createHash('sha256').update(png).digest('hex'));
    expect((await designer.get(`/api/projects/${projectId}/uploads/99999/content`)).status).toBe(404);
  });

  it('trusts the bytes, not the declared type: a JPEG sent as "photo.png" is stored as JPEG', async () => {
    const res = await send('image', jpeg, 'photo.png', 'image/png');
    expect(res.status).toBe(201);
    expect(res.body.upload).toMatchObject({ mime: 'image/jpeg', width: 64, height: 48, name: 'photo.jpg' });
  });

  it('accepts a .npy phase map with its shape as the size', async () => {
    const phase = new Float64Array(32 * 16).map((_, i) => (i % 16) / 4);
    const res = await send('phase-map', Buffer.from(encodeNpy(phase, [32, 16])), 'ramp.npy', 'application/octet-stream');
    expect(res.status, JSON.stringify(res.body)).toBe(201);
    expect(res.body.upload).toMatchObject({ kind: 'phase-map', mime: 'application/x-npy', width: 16, height: 32 });
  });
});

describe('uploads that are refused', () => {
  it('refuses a file of another type with 415 naming the accepted types', async () => {
    const text = await send('image', Buffer.from('P6 this is not a picture at all'), 'sneaky.png', 'image/png');
    expect(text.status).toBe(415);
    expect(text.body.error).toMatch(/must be PNG or JPEG/);
    const npyAsImage = await send('image', Buffer.from(encodeNpy(new Float64Array(4), [2, 2])), 'map.png');
    expect(npyAsImage.status).toBe(415);
    expect(npyAsImage.body.error).toBe('This file is a NumPy .npy file; an image must be PNG or JPEG');
  });

  it('refuses an empty file, a missing file and a bad kind with 400', async () => {
    const empty = await send('image', Buffer.alloc(0));
    expect(empty.status).toBe(400);
    expect(empty.body.error).toMatch(/(empty|Choose a file)/);
    const none = await send('image', null);
    expect(none.status).toBe(400);
    expect(none.body.error).toMatch(/form field "file"/);
    const kind = await send('hologram', png);
    expect(kind.status).toBe(400);
    expect(kind.body.details.kind).toMatch(/image, phase-map/);
  });

  it('refuses truncated and corrupt files with 400', async () => {
    const truncated = await send('image', png.subarray(0, Math.floor(png.length / 2)));
    expect(truncated.status).toBe(400);
    expect(truncated.body.error).toMatch(/damaged or incomplete/);
    const corrupt = Buffer.from(png);
    const idat = corrupt.indexOf('IDAT', 0, 'latin1');
    corrupt.fill(0x55, idat + 6, idat + 40);
    const broken = await send('image', corrupt);
    expect(broken.status).toBe(400);
    expect(broken.body.error).toMatch(/IDAT chunk checksum does not match/);
    // The same damage with a checksum that matches it: found by inflating the image data.
    const length = corrupt.readUInt32BE(idat - 4);
    corrupt.writeUInt32BE(crc32(corrupt.subarray(idat, idat + 4 + length)), idat + 4 + length);
    const garbled = await send('image', corrupt);
    expect(garbled.status).toBe(400);
    expect(garbled.body.error).toMatch(/not a valid zlib stream|could not be decoded/);
    const badHeader = Buffer.from(png);
    badHeader[17] ^= 0xff;
    expect((await send('image', badHeader)).body.error).toMatch(/checksum/);
    const shortJpeg = await send('image', jpeg.subarray(0, 40), 'cut.jpg', 'image/jpeg');
    expect(shortJpeg.status).toBe(400);
    const npy = Buffer.from(encodeNpy(new Float64Array(64 * 64), [64, 64]));
    const shortNpy = await send('phase-map', npy.subarray(0, npy.length - 8), 'cut.npy');
    expect(shortNpy.status).toBe(400);
    expect(shortNpy.body.error).toMatch(/shorter than its shape/);
    const cube = await send('phase-map', Buffer.from(encodeNpy(new Float64Array(8), [2, 2, 2])), 'cube.npy');
    expect(cube.body.error).toMatch(/2-D array/);
    const nan = await send('phase-map', Buffer.from(encodeNpy(Float64Array.of(0, NaN, 1, 2), [2, 2])), 'nan.npy');
    expect(nan.body.error).toMatch(/not finite/);
  });

  it('refuses enormous or zero declared dimensions from the header, without decoding', async () => {
    const huge = await send('image', claimedPng(100_000, 100_000), 'bomb.png');
    expect(huge.status).toBe(400);
    expect(huge.body.error).toBe(`The file declares 100000×100000 pixels; at most ${UPLOAD_LIMITS.maxSide} per side is accepted. Scale it down and upload again.`);
    const zero = await send('image', claimedPng(0, 10), 'zero.png');
    expect(zero.status).toBe(400);
    expect(zero.body.error).toMatch(/0×10 pixels; it must have at least one pixel/);
    // JPEG: patch the height in the start-of-frame segment (FF C0, length, precision, height, width).
    const tall = Buffer.from(jpeg);
    const sof = tall.indexOf(Buffer.from([0xff, 0xc0]));
    tall.writeUInt16BE(60_000, sof + 5);
    const jpegRes = await send('image', tall, 'tall.jpg', 'image/jpeg');
    expect(jpegRes.status).toBe(400);
    expect(jpegRes.body.error).toMatch(/64×60000 pixels/);
    const wideNpy = Buffer.from(encodeNpy(new Uint8Array(5000), [1, 5000]));
    expect((await send('phase-map', wideNpy, 'wide.npy')).body.error).toMatch(/5000×1 pixels/);
  });

  it('refuses a file over the size limit with 413 and keeps answering', async () => {
    const big = Buffer.concat([png, Buffer.alloc(UPLOAD_LIMITS.maxBytes + 1 - png.length)]);
    const res = await send('image', big, 'big.png');
    expect(res.status).toBe(413);
    expect(res.body.error).toBe('The file is larger than 16 MiB; make it smaller and upload again');
    expect((await designer.get('/api/health')).status).toBe(200);
    expect((await send('image', png)).status).toBe(201);
  });
});

describe('designs that use uploads', () => {
  it('runs a hologram of an uploaded picture plus an uploaded phase map; the far field shows the picture', async () => {
    const image = (await send('image', await picture('image/png', 40, 40), 'mark.png')).body.upload;
    const ramp = new Float64Array(128 * 128).map((_, i) => ((i % 128) * 2 * Math.PI) / 128);
    const map = (await send('phase-map', Buffer.from(encodeNpy(ramp, [128, 128])), 'ramp.npy')).body.upload;
    const small = (await send('phase-map', Buffer.from(encodeNpy(new Float64Array(32 * 32), [32, 32])), 'small.npy')).body.upload;
    const design = twinImageDesign({ name: 'Uploaded targets', cells: 128 }) as { channels: { a: { terms: object[] }; b: { terms: object[] } } };
    // The window in far-field pixels, one per picture pixel: columns 74…113, rows 44…83 (zero order at 64, 64).
    design.channels.a.terms = [{ kind: 'hologram', image: { source: 'upload', id: image.id }, window: { units: 'cells', width: 40, height: 40, centerX: 30, centerY: 0 }, iterations: 40 }];
    design.channels.b.terms = [{ kind: 'custom', phaseMap: { source: 'upload', id: map.id } }];

    const wrongKind = await designer.post(`/api/projects/${projectId}/revisions`, {
      design: { ...design, channels: { ...design.channels, a: { terms: [{ ...(design.channels.a.terms[0] as object), image: { source: 'upload', id: map.id } }] } } },
    });
    expect(wrongKind.status).toBe(400);
    expect(wrongKind.body.details['design.channels.a.terms.0.image.id']).toMatch(/is a phase-map; this term needs image/);

    const number = (await designer.post(`/api/projects/${projectId}/revisions`, { design })).body.revision.number;
    const run = await waitForRun(designer, projectId, (await designer.post(`/api/projects/${projectId}/revisions/${number}/runs`)).body.run.id);
    expect(run.status, run.error ?? '').toBe('succeeded');
    expect(run.convergence.a).toHaveLength(40);

    // The realized far field under input A, inside the window, against the uploaded picture's grey values
    // (Pearson correlation; the picture is symmetric top to bottom, so the check holds whichever way the
    // rows run, and asymmetric left to right: a bright square on the right of a rising ramp).
    const npy = await download(designer, `/api/projects/${projectId}/runs/${run.id}/artifacts/farfield_a.npy`);
    const farField = decodeNpy(new Uint8Array(npy.body.buffer, npy.body.byteOffset, npy.body.byteLength));
    expect(farField.shape).toEqual([128, 128]);
    const grey = (x: number, y: number) => (x > 20 && x < 40 && y >= 10 && y < 30 ? 255 : Math.round((200 * x) / 40));
    const seen: number[] = [];
    const wanted: number[] = [];
    for (let y = 0; y < 40; y++) {
      for (let x = 0; x < 40; x++) {
        seen.push(farField.data[(44 + y) * 128 + 74 + x]);
        wanted.push(grey(x, y));
      }
    }
    expect(pearson(seen, wanted)).toBeGreaterThanOrEqual(0.9);
    // Mirrored left to right, the picture no longer matches.
    expect(pearson(seen, wanted.map((_, i) => wanted[Math.floor(i / 40) * 40 + 39 - (i % 40)]))).toBeLessThan(0.5);

    design.channels.b.terms = [{ kind: 'custom', phaseMap: { source: 'upload', id: small.id } }];
    const badNumber = (await designer.post(`/api/projects/${projectId}/revisions`, { design })).body.revision.number;
    const failed = await waitForRun(designer, projectId, (await designer.post(`/api/projects/${projectId}/revisions/${badNumber}/runs`)).body.run.id);
    expect(failed.status).toBe('failed');
    expect(failed.error).toBe(`channel B, term 1 (custom phase map), phase map: upload ${small.id} ("small.npy") has shape (32, 32), the design needs (128, 128)`);
  });

  it('a black target picture fails the run with the engine saying why, not an internal error', async () => {
    const black = await new Jimp({ width: 16, height: 16, color: 0x000000ff }).getBuffer('image/png');
    const upload = (await send('image', black, 'black.png')).body.upload;
    const design = twinImageDesign({ name: 'Dark target' }) as { channels: { a: { terms: { image: object }[] } } };
    design.channels.a.terms[0].image = { source: 'upload', id: upload.id };
    const number = (await designer.post(`/api/projects/${projectId}/revisions`, { design })).body.revision.number;
    const run = await waitForRun(designer, projectId, (await designer.post(`/api/projects/${projectId}/revisions/${number}/runs`)).body.run.id);
    expect(run.status).toBe('failed');
    expect(run.error).toMatch(/dark/i);
    expect(run.error).not.toMatch(/internal error/);
  });
});
