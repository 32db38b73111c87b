// Certificate upload: type by content (magic bytes), 10 MB cap (413), wrong type (415), every version kept
// and downloadable byte-identical, audited as "upload"; download needs a signed-in user.
import { createHash } from 'node:crypto';
import { existsSync, readdirSync } from 'node:fs';
import { join } from 'node:path';
import request from 'supertest';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { CERTIFICATE_MAX_BYTES, certificateListResponseSchema, certificateSchema } from '../../shared/schemas/inventory.ts';
import { recordTrail } from '../../server/services/audit.service.ts';
import { detectCertificateType } from '../../server/services/certificates.service.ts';
import { DEMO, expectErrorBody, makeTestApp, sessionCookie, type TestApp } from './helpers/test-app.ts';
import { JPEG_BYTES, PDF_BYTES, PNG_BYTES, validMaterial } from './helpers/inventory-fixtures.ts';

let t: TestApp;
let chemist: string;
let technician: string;
let materialId: number;

/** supertest buffers a binary response when told to. */
const binary = (res: request.Response, cb: (err: Error | null, body: Buffer) => void) => {
  const chunks: Buffer[] = [];
  res.on('data', (c: Buffer) => chunks.push(c));
  res.on('end', () => cb(null, Buffer.concat(chunks)));
};
const sha = (b: Buffer) => createHash('sha256').update(b).digest('hex');
const upload = (bytes: Buffer, name: string, note?: string, cookie = chemist, id = materialId) => {
  let req = request(t.app).post(`/api/materials/${id}/certificates`).set('Cookie', cookie);
  if (note !== undefined) req = req.field('note', note);
  return req.attach('file', bytes, name);
};

beforeAll(async () => {
  t = await makeTestApp();
  chemist = await sessionCookie(t.app, DEMO.chemist);
  technician = await sessionCookie(t.app, DEMO.technician);
  const res = await request(t.app).post('/api/materials').set('Cookie', chemist).send(validMaterial({ lot: 'CERT-1' }));
  materialId = res.body.id;
});
afterAll(() => t.close());

describe('detectCertificateType (magic bytes: ISO 32000-1 §7.5.2, PNG spec §5.2, JPEG SOI)', () => {
  it('when bytes start with %PDF-, the PNG signature or FF D8 FF, then the type; otherwise null', () => {
    expect(detectCertificateType(PDF_BYTES)).toBe('application/pdf');
    expect(detectCertificateType(PNG_BYTES)).toBe('image/png');
    expect(detectCertificateType(JPEG_BYTES)).toBe('image/jpeg');
    expect(detectCertificateType(Buffer.from('%PDF'))).toBeNull(); // no dash: truncated header
    expect(detectCertificateType(Buffer.from('hello, I am a text file'))).toBeNull();
    expect(detectCertificateType(Buffer.alloc(0))).toBeNull();
  });
});

describe('POST /api/materials/:id/certificates', () => {
  let v1: { id: number; sha256: string };
  let v2: { id: number; sha256: string };

  it('when a PDF is uploaded with a note, then 201, version 1, its SHA-256 and size, stored under a generated name', async () => {
    const res = await upload(PDF_BYTES, 'KCl certificate.pdf', 'Original certificate');
    expect(res.status, JSON.stringify(res.body)).toBe(201);
    expect(certificateSchema.strict().safeParse(res.body).success, JSON.stringify(res.body)).toBe(true);
    expect(res.body).toMatchObject({
      materialId,
      version: 1,
      originalName: 'KCl certificate.pdf',
      mimeType: 'application/pdf',
      sizeBytes: PDF_BYTES.length,
      sha256: sha(PDF_BYTES),
      note: 'Original certificate',
      uploadedBy: { id: expect.any(Number), fullName: expect.any(String) },
    });
    v1 = res.body;
    const files = readdirSync(join(t.config.dataDir, 'certificates'));
    expect(files).toHaveLength(1);
    expect(files[0]).toMatch(/^[0-9a-f-]{36}\.pdf$/);
  });

  it('when a PNG is uploaded, then it is version 2, typed image/png by content (named .pdf it is refused: name and content must agree)', async () => {
    const misnamed = await upload(PNG_BYTES, 'scan.pdf');
    expect(misnamed.status).toBe(415);
    expect(misnamed.body.error.fields.file).toMatch(/rename the file to end in \.png/);
    const res = await upload(PNG_BYTES, 'scan.png');
    expect(res.status, JSON.stringify(res.body)).toBe(201);
    expect(res.body).toMatchObject({ version: 2, mimeType: 'image/png', note: null, sha256: sha(PNG_BYTES) });
    v2 = res.body;
  });

  it('when a JPEG is uploaded, then 201 image/jpeg, version 3', async () => {
    const res = await upload(JPEG_BYTES, 'photo.jpeg');
    expect(res.status).toBe(201);
    expect(res.body).toMatchObject({ version: 3, mimeType: 'image/jpeg' });
  });

  it('when a text file named .pdf is uploaded, then 415 JSON with fields.file, and nothing is stored', async () => {
    const before = readdirSync(join(t.config.dataDir, 'certificates')).length;
    const res = await upload(Buffer.from('not really a pdf\n'), 'certificate.pdf');
    expect(res.status).toBe(415);
    expectErrorBody(res.body, 'unsupported_media_type');
    expect(res.body.error.fields.file).toBeDefined();
    expect(readdirSync(join(t.config.dataDir, 'certificates')).length).toBe(before);
  });

  it('when the file is larger than 10 MB, then 413 JSON, never 500', async () => {
    const big = Buffer.concat([PDF_BYTES, Buffer.alloc(CERTIFICATE_MAX_BYTES + 1 - PDF_BYTES.length, 0x20)]);
    const res = await upload(big, 'huge.pdf');
    expect(res.status).toBe(413);
    expectErrorBody(res.body, 'payload_too_large');
    expect(res.body.error.fields.file).toMatch(/10 MB/);
  });

  it('when exactly 10 MB, then it is accepted', async () => {
    const max = Buffer.concat([PDF_BYTES, Buffer.alloc(CERTIFICATE_MAX_BYTES - PDF_BYTES.length, 0x20)]);
    const res = await upload(max, 'max.pdf');
    expect(res.status, JSON.stringify(res.body)).toBe(201);
    expect(res.body.sizeBytes).toBe(CERTIFICATE_MAX_BYTES);
  });

  it('when no file, a wrong field name or a non-multipart body is sent, then 400 JSON with fields.file', async () => {
    const none = await request(t.app).post(`/api/materials/${materialId}/certificates`).set('Cookie', chemist).field('note', 'x');
    expect(none.status).toBe(400);
    expect(none.body.error.fields.file).toBeDefined();
    const wrong = await request(t.app).post(`/api/materials/${materialId}/certificates`).set('Cookie', chemist).attach('document', PDF_BYTES, 'a.pdf');
    expect(wrong.status).toBe(400);
    expect(wrong.body.error.fields.file).toBeDefined();
    const json = await request(t.app).post(`/api/materials/${materialId}/certificates`).set('Cookie', chemist).send({ file: 'x' });
    expect(json.status).toBe(400);
    const broken = await request(t.app)
      .post(`/api/materials/${materialId}/certificates`)
      .set('Cookie', chemist)
      .set('Content-Type', 'multipart/form-data; boundary=XYZ')
      .send('--XYZ\r\nContent-Disposition: form-data; name="file"; filename="a.pdf"\r\n\r\n%PDF-1.4 truncated');
    expect(broken.status).toBe(400);
    expectErrorBody(broken.body);
  });

  it('when the material does not exist, then 404; when a technician uploads, then 403', async () => {
    expect((await upload(PDF_BYTES, 'a.pdf', undefined, chemist, 999999)).status).toBe(404);
    const res = await upload(PDF_BYTES, 'a.pdf', undefined, technician);
    expect(res.status).toBe(403);
  });

  it('then the list has every version, newest first, and each downloads byte-identical with its original name', async () => {
    const list = await request(t.app).get(`/api/materials/${materialId}/certificates`).set('Cookie', technician);
    expect(list.status).toBe(200);
    expect(certificateListResponseSchema.safeParse(list.body).success).toBe(true);
    expect(list.body.items.map((c: { version: number }) => c.version)).toEqual([4, 3, 2, 1]);

    const d1 = await request(t.app).get(`/api/certificates/${v1.id}/file`).set('Cookie', technician).buffer(true).parse(binary);
    expect(d1.status).toBe(200);
    expect(d1.headers['content-type']).toMatch(/^application\/pdf/);
    expect(d1.headers['content-disposition']).toBe('attachment; filename="KCl certificate.pdf"');
    expect(Buffer.compare(d1.body as Buffer, PDF_BYTES)).toBe(0);
    expect(sha(d1.body as Buffer)).toBe(v1.sha256);

    const d2 = await request(t.app).get(`/api/certificates/${v2.id}/file`).set('Cookie', technician).buffer(true).parse(binary);
    expect(d2.headers['content-type']).toMatch(/^image\/png/);
    expect(Buffer.compare(d2.body as Buffer, PNG_BYTES)).toBe(0);
  });

  it('when signed out, then download and list are 401; an unknown certificate is 404', async () => {
    const res = await request(t.app).get(`/api/certificates/${v1.id}/file`);
    expect(res.status).toBe(401);
    expectErrorBody(res.body, 'unauthenticated');
    expect((await request(t.app).get(`/api/materials/${materialId}/certificates`)).status).toBe(401);
    expect((await request(t.app).get('/api/certificates/999999/file').set('Cookie', chemist)).status).toBe(404);
  });

  it('then each upload is audited as "upload" with version, name, type, size and hash', async () => {
    const trail = await recordTrail('certificate', String(v1.id));
    expect(trail).toHaveLength(1);
    expect(trail[0]!.action).toBe('upload');
    expect(trail[0]!.changes).toEqual(
      expect.arrayContaining([
        { field: 'materialId', oldValue: null, newValue: materialId },
        { field: 'version', oldValue: null, newValue: 1 },
        { field: 'originalName', oldValue: null, newValue: 'KCl certificate.pdf' },
        { field: 'sha256', oldValue: null, newValue: v1.sha256 },
      ]),
    );
  });

  it('when a file name has a path and non-ASCII letters, then only the base name is kept, decoded', async () => {
    const res = await upload(PDF_BYTES, '../../etc/Zertifikat Müller.pdf');
    expect(res.status).toBe(201);
    expect(res.body.originalName).toBe('Zertifikat Müller.pdf');
    expect(existsSync(join(t.config.dataDir, 'certificates'))).toBe(true);
    const d = await request(t.app).get(`/api/certificates/${res.body.id}/file`).set('Cookie', chemist);
    expect(d.headers['content-disposition']).toContain("filename*=UTF-8''Zertifikat%20M%C3%BCller.pdf");
  });
});
