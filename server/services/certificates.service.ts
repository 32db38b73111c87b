/**
 * Certificates of reference-material lots (PDF or image). The type comes from the file's first bytes,
 * never from its name or the browser's Content-Type. Files are stored under a generated name in
 * <dataDir>/certificates; every upload is a new version and none is ever replaced or removed.
 */
import { createHash, randomUUID } from 'node:crypto';
import { existsSync } from 'node:fs';
import { mkdir, unlink, writeFile } from 'node:fs/promises';
import { basename, join } from 'node:path';
import type { Transaction } from 'sequelize';
import type { Certificate as CertificateDto } from '../../shared/schemas/inventory.ts';
import { MaterialCertificate, ReferenceMaterial, User } from '../db/models/index.ts';
import { writeTransaction } from '../db/transaction.ts';
import { textProblem } from '../../shared/schemas/text.ts';
import { AppError } from '../errors/app-error.ts';
import { recordAudit } from './audit.service.ts';
import type { Actor } from './inventory.service.ts';

export type CertificateMime = CertificateDto['mimeType'];

const EXTENSION: Record<CertificateMime, string> = { 'application/pdf': 'pdf', 'image/png': 'png', 'image/jpeg': 'jpg' };

/** Magic bytes: "%PDF-" (ISO 32000-1 §7.5.2), PNG signature 89 50 4E 47 0D 0A 1A 0A (PNG spec §5.2), JPEG SOI FF D8 FF. */
export function detectCertificateType(bytes: Uint8Array): CertificateMime | null {
  const starts = (sig: number[]) => bytes.length >= sig.length && sig.every((b, i) => bytes[i] === b);
  if (starts([0x25, 0x50, 0x44, 0x46, 0x2d])) return 'application/pdf';
  if (starts([0x89, 0x50, 0x4e, 0x47, 0x0d, 0x0a, 0x1a, 0x0a])) return 'image/png';
  if (starts([0xff, 0xd8, 0xff])) return 'image/jpeg';
  return null;
}

/** The file-name extensions that go with each type; a name must end in one of them (or have none). */
const NAME_EXTENSIONS: Record<CertificateMime, string[]> = { 'application/pdf': ['pdf'], 'image/png': ['png'], 'image/jpeg': ['jpg', 'jpeg'] };

/**
 * True when the bytes after the magic number show markup a browser would run: an HTML or SVG document
 * (or a script) hidden behind "%PDF-" or an image signature. Checked in the first 4 KiB, where a polyglot
 * file must put its markup for a browser to sniff it (WHATWG MIME Sniffing §7.1 reads at most 1445 bytes).
 */
export function looksLikeMarkup(bytes: Uint8Array): boolean {
  const head = Buffer.from(bytes.subarray(0, 4096)).toString('latin1').toLowerCase();
  return /<(!doctype\s+html|html|head|body|script|svg|iframe|object|embed)[\s>/]|<\?xml[\s\S]*<svg/.test(head);
}

/** The name to store and serve: its extension must match the type; a name without one gets it. */
export function nameForType(name: string, mime: CertificateMime): string | null {
  const m = /\.([A-Za-z0-9]{1,10})$/.exec(name);
  if (!m) return `${name}.${EXTENSION[mime]}`;
  return NAME_EXTENSIONS[mime].includes(m[1]!.toLowerCase()) ? name : null;
}

export const certificatesDir = (dataDir: string) => join(dataDir, 'certificates');

/**
 * The name as the user's computer had it: path parts and control characters removed, at most 200
 * characters. Busboy reads header parameters as latin1; a name that is valid UTF-8 read that way is decoded.
 */
/** The file name as sent: busboy reads header parameters as latin1; a name that is valid UTF-8 read that way is decoded. */
export function decodeUploadName(raw: string | undefined): string {
  const name = raw ?? '';
  const asUtf8 = Buffer.from(name, 'latin1').toString('utf8');
  return /[\u0080-\u00ff]/.test(name) && !asUtf8.includes('\ufffd') ? asUtf8 : name;
}

export function cleanOriginalName(raw: string | undefined): string {
  let name = decodeUploadName(raw);
  name = basename(name.replace(/\\/g, '/')).replace(/[\u0000-\u001f\u007f]/g, '').trim();
  return (name || 'certificate').slice(0, 200);
}

function toDto(c: MaterialCertificate, users: Map<number, string>): CertificateDto {
  return {
    id: c.id,
    materialId: c.materialId,
    version: c.version,
    originalName: c.originalName,
    mimeType: c.mimeType,
    sizeBytes: c.sizeBytes,
    sha256: c.sha256,
    uploadedBy: { id: c.uploadedBy, fullName: users.get(c.uploadedBy) ?? '' },
    uploadedAt: c.uploadedAt,
    note: c.note,
  };
}

async function names(ids: number[], transaction?: Transaction): Promise<Map<number, string>> {
  const wanted = [...new Set(ids)];
  if (!wanted.length) return new Map();
  const users = await User.findAll({ where: { id: wanted }, attributes: ['id', 'fullName'], transaction });
  return new Map(users.map((u) => [u.id, u.fullName]));
}

async function materialOr404(materialId: number, transaction?: Transaction): Promise<ReferenceMaterial> {
  const material = await ReferenceMaterial.findByPk(materialId, { transaction });
  if (!material) throw AppError.notFound('Reference material');
  return material;
}

export interface UploadedFile {
  buffer: Buffer;
  originalname: string;
  size: number;
}

export async function uploadCertificate(
  dataDir: string,
  materialId: number,
  file: UploadedFile | undefined,
  note: string | null,
  actor: Actor,
): Promise<CertificateDto> {
  await materialOr404(materialId);
  if (!file || file.size === 0) {
    throw AppError.validation('Attach the certificate file (PDF, PNG or JPEG)', { file: 'Attach the certificate file (PDF, PNG or JPEG)' });
  }
  const mimeType = detectCertificateType(file.buffer);
  if (!mimeType) {
    throw new AppError('unsupported_media_type', 415, 'The file is not a PDF, PNG or JPEG (checked by its content, not its name)', {
      fields: { file: 'Upload a PDF, PNG or JPEG file' },
    });
  }
  if (looksLikeMarkup(file.buffer)) {
    throw new AppError('unsupported_media_type', 415, 'The file holds web-page markup (HTML or SVG) behind its PDF or image header and was refused', {
      fields: { file: 'Upload the certificate as a plain PDF, PNG or JPEG file' },
    });
  }
  // direction overrides and the like are refused (they make the name read differently); control characters
  // that a browser put there are removed by cleanOriginalName as before
  const nameProblem = textProblem(decodeUploadName(file.originalname).replace(/[\u0000-\u001f\u007f-\u009f]/g, ''));
  if (nameProblem) throw AppError.validation(`The file name: ${nameProblem}`, { file: `Rename the file: ${nameProblem}` });
  const originalName = nameForType(cleanOriginalName(file.originalname), mimeType);
  if (!originalName) {
    const ext = EXTENSION[mimeType];
    throw new AppError('unsupported_media_type', 415, `The file's name does not end in .${ext} but its content is ${mimeType}`, {
      fields: { file: `The content is ${mimeType}: rename the file to end in .${ext}` },
    });
  }
  const dir = certificatesDir(dataDir);
  await mkdir(dir, { recursive: true });
  const storedName = `${randomUUID()}.${EXTENSION[mimeType]}`;
  const path = join(dir, storedName);
  const sha256 = createHash('sha256').update(file.buffer).digest('hex');
  // The file is written first; if the database write fails the file is removed again.
  await writeFile(path, file.buffer, { flag: 'wx', mode: 0o640 });
  try {
    return await writeTransaction(async (transaction) => {
      await materialOr404(materialId, transaction);
      const last = (await MaterialCertificate.max('version', { where: { materialId }, transaction })) as number | null;
      const row = await MaterialCertificate.create(
        {
          materialId,
          version: (last ?? 0) + 1,
          originalName,
          storedName,
          mimeType,
          sizeBytes: file.size,
          sha256,
          note,
          uploadedBy: actor.id,
          uploadedAt: new Date().toISOString(),
        },
        { transaction },
      );
      await recordAudit(
        {
          actor,
          action: 'upload',
          entity: 'certificate',
          entityId: row.id,
          changes: [
            { field: 'materialId', oldValue: null, newValue: materialId },
            { field: 'version', oldValue: null, newValue: row.version },
            { field: 'originalName', oldValue: null, newValue: row.originalName },
            { field: 'mimeType', oldValue: null, newValue: mimeType },
            { field: 'sizeBytes', oldValue: null, newValue: row.sizeBytes },
            { field: 'sha256', oldValue: null, newValue: sha256 },
            { field: 'note', oldValue: null, newValue: note },
          ],
        },
        transaction,
      );
      return toDto(row, new Map([[actor.id, actor.fullName]]));
    });
  } catch (err) {
    await unlink(path).catch(() => undefined);
    throw err;
  }
}

/** Every version, newest first. */
export async function listCertificates(materialId: number): Promise<CertificateDto[]> {
  await materialOr404(materialId);
  const rows = await MaterialCertificate.findAll({ where: { materialId }, order: [['version', 'DESC']] });
  const users = await names(rows.map((r) => r.uploadedBy));
  return rows.map((r) => toDto(r, users));
}

export async function certificateFile(dataDir: string, id: number): Promise<{ path: string; originalName: string; mimeType: CertificateMime }> {
  const row = await MaterialCertificate.findByPk(id);
  if (!row) throw AppError.notFound('Certificate');
  const path = join(certificatesDir(dataDir), basename(row.storedName));
  if (!existsSync(path)) throw new AppError('file_missing', 404, `The stored file of certificate ${id} is missing from the data folder`);
  // rows stored before names had to match their type are served with the type's extension
  return { path, originalName: nameForType(row.originalName, row.mimeType) ?? `${row.originalName}.${EXTENSION[row.mimeType]}`, mimeType: row.mimeType };
}
